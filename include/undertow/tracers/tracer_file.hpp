#pragma once
// Tracers given by the user: a CSV file with columns id, x_kpc, y_kpc, z_kpc, vx_kms, vy_kms,
// vz_kms (Galactocentric, docs/conventions.md), or an HDF5 file with datasets id, position
// (N x 3, kpc) and velocity (N x 3, km/s) at its root, or an undertow snapshot file (its last
// snapshot). Every value is checked: finite, and inside max_radius_kpc of the centre.
#include <string>

#include "undertow/orbit/phase_space.hpp"

namespace undertow::tracers {

orbit::PhaseSpace read_tracer_file(const std::string& path, double max_radius_kpc);

} // namespace undertow::tracers

#pragma once
// Integral properties of the axisymmetric part of a model.
#include <optional>

#include "undertow/potential/model.hpp"

namespace undertow::dynamics {

// Mass inside the sphere of radius r (Msun), by Gauss's theorem: the inward force integrated
// over the sphere (adaptive Gauss-Kronrod in cos(theta)); exact for any component shape.
double enclosed_mass(const potential::Model& m, double r);

// Escape speed from (R, z = 0), km/s: sqrt(2 (Phi(r_far) - Phi(R))). With no r_far the
// potential must vanish at infinity; a model with an unbounded halo (logarithmic) needs an
// explicit r_far, or InputError is thrown.
double escape_speed(const potential::Model& m, double R, std::optional<double> r_far_kpc = {});

} // namespace undertow::dynamics

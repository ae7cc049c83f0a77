#pragma once
// A disk population of tracers in an axisymmetric model: surface density proportional to
// exp(-R/R_d) between R_min and R_max, a sech^2 or exponential vertical profile, Gaussian
// velocities with dispersions sigma_R(R), sigma_z(R) falling as exp(-(R - R_ref)/R_sigma), the
// azimuthal dispersion from the epicyclic ratio sigma_phi/sigma_R = kappa/(2 Omega), and the
// mean rotation from the circular speed with an optional asymmetric-drift correction
// (Binney & Tremaine 2008, §4.8.2(a), eq. 4.228, for a flat vertical velocity ellipsoid).
#include <cstdint>
#include <limits>
#include <string>

#include "undertow/orbit/phase_space.hpp"
#include "undertow/potential/model.hpp"

namespace undertow::tracers {

struct DiskPopulation {
  std::uint64_t count = 0;
  double scale_length_kpc = 3;
  double r_min_kpc = 3, r_max_kpc = 15;
  enum class Vertical { sech2, exponential } vertical = Vertical::sech2;
  double scale_height_kpc = 0.05;
  double sigma_r_kms = 8, sigma_z_kms = 4; // at dispersion_radius_kpc
  double dispersion_radius_kpc = 8;
  double dispersion_scale_kpc = std::numeric_limits<double>::infinity(); // R_sigma
  bool asymmetric_drift = true;

  void validate() const; // throws detail::ParameterError naming the key
};

// Tracers with ids [first_id, first_id + n), drawn from their own (seed, id) streams.
orbit::PhaseSpace sample(const potential::Model& m, const DiskPopulation& d, std::uint64_t seed,
                         std::uint64_t first_id, std::uint64_t n);

// Mean azimuthal speed of the population at R (km/s, in the sense of rotation).
double mean_rotation(const potential::Model& m, const DiskPopulation& d, double R);

} // namespace undertow::tracers

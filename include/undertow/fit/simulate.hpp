#pragma once
// Catalogs of young sources simulated from a known kinematic truth and observed by undertow's own
// mock observation (observe::observe): sources drawn from the space density of the fit's disk
// prior, exp(-R/h_R - |z|/h_z) (uniform in R for h_R = 0), between two heliocentric distances and
// away from the direction of the Galactic centre (a cut on direction only, so the distances of the
// sources still follow the prior exactly), moving on circular orbits of
// the truth's rotation curve plus its mean peculiar motion, its Gaussian dispersion and,
// optionally, a spiral streaming pattern; observed from the truth's Sun with the given errors and
// parallax signal-to-noise cut. For injection-and-recovery tests, benchmarks and examples.
#include <cstdint>
#include <vector>

#include "undertow/fit/kinematic_model.hpp"
#include "undertow/observe/observation.hpp"
#include "undertow/residuals/catalog.hpp"

namespace undertow::fit {

// Sources on logarithmic spiral arms instead of the smooth disk: the disk's density times
// exp(−δ²/(2w²)), δ the distance across the nearest arm (arms/spiral_geometry.hpp) of an m-armed
// pattern of pitch p whose arm "arm0" passes radius_kpc at ψ = 0. Each source's group names its
// arm: "arm1" the next inward, "arm-1" the next outward (one name per winding).
struct ArmPlacement {
  int arms = 0; // 0: the smooth disk
  double pitch_deg = 12, radius_kpc = 8, width_kpc = 0.2;
  double psi_min_deg = -180, psi_max_deg = 180; // sources only in this range of azimuth
  std::vector<int> only;                        // when given, only these arms
};

struct KinematicTruth {
  FullParams params{};  // R0, Θ0, solar motion, mean motion, σ...
  KinematicModel model; // its rotation form (not "model")
  std::size_t sources = 200;
  double distance_min_kpc = 2, distance_max_kpc = 12; // true heliocentric distance
  double longitude_min_deg = 30; // no source within this angle of the Galactic centre's direction
  double dec_min_deg = -90;      // the survey's sky: declination at least this (a northern array)
  double disk_scale_length_kpc = 5; // h_R; 0: uniform in R
  double scale_height_kpc = 0.05;   // h_z of the exponential in |z|
  // Spiral streaming: δU_s = A cos χ, δV_s = A sin χ with χ = m (φ − ln(R/R0) / tan p), about
  // the amplitude a spiral arm's gas response makes (common practice: 5–15 km/s).
  double stream_kms = 0;
  int arms = 4;
  double pitch_deg = 12;
  ArmPlacement placement;
  observe::ErrorModel errors;
  double parallax_snr_min = 0;
  std::uint64_t seed = 1;
};

// The Sun of a truth (Θ0 from its rotation curve).
sky::SolarFrame truth_sun(const KinematicTruth& t);
residuals::Catalog simulate_catalog(const KinematicTruth& t);

} // namespace undertow::fit

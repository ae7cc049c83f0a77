#pragma once
// A documented truth for the arm tests: one segment of a logarithmic spiral arm (arm0 of a
// four-armed pattern through 9.5 kpc at the Sun's azimuth), seen between 0.5 and 12 kpc from the
// Sun at azimuths from −25° to 35°, uniform in R along the arm, scale height 50 pc (tests only).
#include "support/kinematic_truth.hpp"
#include "undertow/arms/segment_fit.hpp"

namespace undertow::test {

inline fit::KinematicTruth arm_truth(double pitch_deg, double width_kpc, std::size_t sources,
                                     std::uint64_t seed) {
  auto t = standard_truth(sources, seed);
  t.distance_min_kpc = 0.5, t.distance_max_kpc = 12;
  t.longitude_min_deg = 15;
  t.disk_scale_length_kpc = 0; // uniform: the arm fit's sight-line density has no radial trend
  t.placement.arms = 4;
  t.placement.pitch_deg = pitch_deg;
  t.placement.radius_kpc = 9.5;
  t.placement.width_kpc = width_kpc;
  t.placement.psi_min_deg = -25, t.placement.psi_max_deg = 35;
  t.placement.only = {0};
  return t;
}

// The fit's sight lines for that truth: its distance range and scale height.
inline arms::SightLines arm_sight_lines(const fit::KinematicTruth& t) {
  arms::SightLines s;
  s.distance_min_kpc = t.distance_min_kpc, s.distance_max_kpc = t.distance_max_kpc;
  s.scale_height_kpc = t.scale_height_kpc;
  return s;
}

inline fit::Geometry arm_geometry(const fit::KinematicTruth& t) {
  return {t.params[std::size_t(fit::Param::r0)], t.params[std::size_t(fit::Param::z_sun)]};
}

} // namespace undertow::test

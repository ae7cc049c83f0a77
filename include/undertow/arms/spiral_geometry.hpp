#pragma once
// The geometry of logarithmic spiral arms in the conventions of docs/conventions.md: Galactocentric
// radius R and azimuth ψ (from the Sun's direction, in the sense of rotation), pitch angle p > 0
// for trailing arms, so that along one arm
//   ln R = ln R_ref − (ψ − ψ_ref) tan p.
// An m-armed pattern of one pitch repeats every 2π/m in ψ, so at a fixed azimuth its arms are
// spaced by Δ = (2π/m) tan p in ln R. Two patterns with m tan p equal therefore have the same
// radial spacing (m arms of pitch p and m/2 arms of pitch arctan(tan p / 2)): spacing alone does
// not fix the number of arms, which needs the pitch as well.
#include <cmath>

#include "undertow/units.hpp"

namespace undertow::arms {

// ln R of the arm through R_ref at ψ_ref, at azimuth ψ (radians).
inline double arm_ln_radius(double psi, double psi_ref, double ln_r_ref, double tan_p) {
  return ln_r_ref - (psi - psi_ref) * tan_p;
}

// Spacing in ln R between neighbouring arms of an m-armed pattern of pitch p (degrees).
inline double arm_spacing(int m, double pitch_deg) {
  return 2 * units::pi / m * std::tan(pitch_deg * units::deg);
}

// The pitch (degrees) of an m2-armed pattern with the spacing of m arms of pitch p.
inline double equivalent_pitch_deg(int m, double pitch_deg, int m2) {
  return std::atan(double(m2) / double(m) * std::tan(pitch_deg * units::deg)) / units::deg;
}

// Signed distance (kpc) across the arm of the point at radius R and azimuth ψ_ref + dpsi, to
// first order in the offset: a radial step δR crosses a log spiral at the angle 90° − p, so the
// distance is δR cos p with δR = R (ln R − ln R_arm(ψ)). Positive outside the arm.
inline double distance_across_arm(double R, double dpsi, double ln_r_ref, double tan_p,
                                  double cos_p) {
  return R * (std::log(R) - arm_ln_radius(dpsi, 0, ln_r_ref, tan_p)) * cos_p;
}

// ψ − ψ_ref wrapped into (−π, π]: a segment is one winding of its arm about ψ_ref.
inline double azimuth_from(double psi, double psi_ref) {
  double d = std::remainder(psi - psi_ref, 2 * units::pi);
  if (d <= -units::pi) d += 2 * units::pi;
  return d;
}

} // namespace undertow::arms

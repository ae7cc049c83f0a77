// The logarithmic spiral's geometry against its closed forms (Binney & Tremaine 2008, "Galactic
// Dynamics", 2nd ed., §6.1.1: an arm R(ψ) = R_ref exp(−(ψ − ψ_ref) tan p), m arms a 2π/m turn
// apart).
#include <catch2/catch.hpp>

#include <cmath>

#include "undertow/arms/spiral_geometry.hpp"

using namespace undertow;

TEST_CASE("arms: one arm follows R = R_ref exp(-(psi - psi_ref) tan p)", "[arms]") {
  const double p = 14 * units::deg, t = std::tan(p);
  for (double psi : {-1.0, -0.2, 0.0, 0.4, 1.3})
    CHECK(std::exp(arms::arm_ln_radius(psi, 0.3, std::log(9.0), t)) ==
          Approx(9.0 * std::exp(-(psi - 0.3) * t)).epsilon(1e-14));
  // trailing: farther out at smaller ψ (docs/conventions.md)
  CHECK(arms::arm_ln_radius(-0.5, 0, 2, t) > arms::arm_ln_radius(0.5, 0, 2, t));
}

TEST_CASE("arms: m arms are spaced by (2 pi / m) tan p in ln R", "[arms]") {
  // the next arm of an m-armed pattern is the same arm turned by 2π/m: at fixed ψ its ln R
  // differs by the arm's change over 2π/m of azimuth
  for (int m : {1, 2, 4, 8})
    for (double pd : {5.0, 12.0, 30.0}) {
      const double t = std::tan(pd * units::deg);
      const double turned =
          arms::arm_ln_radius(0.0, 0, 0, t) - arms::arm_ln_radius(2 * units::pi / m, 0, 0, t);
      CHECK(arms::arm_spacing(m, pd) == Approx(turned).epsilon(1e-14));
    }
}

TEST_CASE("arms: m arms of pitch p space like m/2 arms of pitch arctan(tan p / 2)", "[arms]") {
  // the rule of thumb that spacing alone cannot fix the number of arms: 16 deg with four arms
  // gives the spacing of about 8.2 deg with two (tan 16° / 2 = 0.1434, arctan = 8.16°)
  CHECK(arms::equivalent_pitch_deg(4, 16, 2) == Approx(8.16).margin(0.01));
  for (int m : {2, 4, 6, 8})
    for (double pd : {4.0, 11.0, 16.0, 25.0}) {
      const double half = arms::equivalent_pitch_deg(m, pd, m / 2);
      CHECK(std::tan(half * units::deg) == Approx(std::tan(pd * units::deg) / 2).epsilon(1e-13));
      CHECK(arms::arm_spacing(m / 2, half) == Approx(arms::arm_spacing(m, pd)).epsilon(1e-13));
    }
}

TEST_CASE("arms: the distance across an arm is the radial offset times cos p", "[arms]") {
  // a point a small step s along the arm's normal: distance s (to first order)
  const double p = 20 * units::deg, t = std::tan(p), c = std::cos(p), L = std::log(8.0);
  const double R = 8.0, s = 1e-4;
  // the normal of the spiral at (R, ψ = 0) in (R, Rψ): the tangent is (−R tan p, R) per dψ
  const double nR = 1 / std::sqrt(1 + t * t), nphi = t / std::sqrt(1 + t * t);
  const double R1 = R + s * nR, psi1 = s * nphi / R;
  CHECK(arms::distance_across_arm(R1, psi1, L, t, c) == Approx(s).epsilon(1e-3));
  CHECK(arms::azimuth_from(3.0, -3.0) == Approx(6.0 - 2 * units::pi).epsilon(1e-14));
  CHECK(arms::azimuth_from(-units::pi, 0) == Approx(units::pi).epsilon(1e-14));
}

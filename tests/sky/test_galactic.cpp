// ICRS <-> Galactic against ERFA (Debian liberfa-dev, eraIcrs2g / eraG2icrs) and the defining
// points of the Hipparcos definition (ESA 1997, vol. 1, §1.5.3).
#include <catch2/catch.hpp>
#include <cmath>
#include <erfa.h>
#include <random>

#include "undertow/sky/galactic.hpp"
#include "undertow/units.hpp"

using namespace undertow;

namespace {
double sep(double a1, double d1, double a2, double d2) {
  const auto u = sky::unit_vector(a1, d1), v = sky::unit_vector(a2, d2);
  const double c = u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
  const double s =
      std::hypot(u[1] * v[2] - u[2] * v[1], u[2] * v[0] - u[0] * v[2], u[0] * v[1] - u[1] * v[0]);
  return std::atan2(s, c);
}
} // namespace

TEST_CASE("ICRS to Galactic agrees with ERFA eraIcrs2g for 10^4 random directions to 1e-9 rad",
          "[sky]") {
  std::mt19937_64 rng(1);
  std::uniform_real_distribution<double> u(-1, 1), a(0, 2 * units::pi);
  double worst = 0;
  for (int i = 0; i < 10000; ++i) {
    const double ra = a(rng), dec = std::asin(u(rng));
    double l, b, le, be;
    sky::icrs_to_galactic(ra, dec, l, b);
    eraIcrs2g(ra, dec, &le, &be);
    worst = std::max(worst, sep(l, b, le, be));
    double ra2, dec2;
    sky::galactic_to_icrs(l, b, ra2, dec2);
    worst = std::max(worst, sep(ra, dec, ra2, dec2));
  }
  CHECK(worst < 1e-9);
}

TEST_CASE("The defining points of the Hipparcos Galactic frame: the NGP at RA 192.85948, "
          "Dec 27.12825 has b = 90 deg, the NCP has l = 122.93192 deg, the Galactic centre "
          "direction is RA 266.40499, Dec -28.93617 (ESA 1997 vol. 1 §1.5.3, from memory)",
          "[sky]") {
  double l, b;
  sky::icrs_to_galactic(192.85948 * units::deg, 27.12825 * units::deg, l, b);
  CHECK(b / units::deg == Approx(90).margin(1e-9));
  sky::icrs_to_galactic(0, units::pi / 2, l, b);
  CHECK(l / units::deg == Approx(122.93192).margin(1e-9));
  CHECK(b / units::deg == Approx(27.12825).margin(1e-9));
  double ra, dec;
  sky::galactic_to_icrs(0, 0, ra, dec);
  CHECK(ra / units::deg == Approx(266.40499).margin(1e-5));
  CHECK(dec / units::deg == Approx(-28.93617).margin(1e-5));
}

TEST_CASE("Proper motions rotate with the frame: a finite-difference of the transformed "
          "position along the motion gives the same (mu_l*, mu_b), the inverse returns the input",
          "[sky]") {
  std::mt19937_64 rng(2);
  std::uniform_real_distribution<double> u(-1, 1), a(0, 2 * units::pi), pm(-10, 10);
  for (int i = 0; i < 200; ++i) {
    const double ra = a(rng), dec = std::asin(0.98 * u(rng)), pa = pm(rng), pd = pm(rng);
    double pl, pb;
    sky::icrs_to_galactic_pm(ra, dec, pa, pd, pl, pb);
    CHECK(std::hypot(pl, pb) == Approx(std::hypot(pa, pd)).epsilon(1e-12)); // a rotation
    // reference: move the source by a tiny time step and difference the Galactic angles
    const double h = 1e-7;
    double l0, b0, l1, b1;
    sky::icrs_to_galactic(ra, dec, l0, b0);
    sky::icrs_to_galactic(ra + h * pa / std::cos(dec), dec + h * pd, l1, b1);
    double dl = l1 - l0;
    if (dl > units::pi) dl -= 2 * units::pi;
    if (dl < -units::pi) dl += 2 * units::pi;
    CHECK(dl * std::cos(b0) / h == Approx(pl).margin(1e-5 * 10));
    CHECK((b1 - b0) / h == Approx(pb).margin(1e-5 * 10));
    double pa2, pd2;
    sky::galactic_to_icrs_pm(l0, b0, pl, pb, pa2, pd2);
    CHECK(pa2 == Approx(pa).margin(1e-12));
    CHECK(pd2 == Approx(pd).margin(1e-12));
  }
}

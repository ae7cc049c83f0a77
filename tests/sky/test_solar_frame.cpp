// Heliocentric <-> Galactocentric, the LSR, and distances from parallaxes.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>

#include "undertow/sky/distance.hpp"
#include "undertow/sky/lsr.hpp"
#include "undertow/sky/solar_frame.hpp"
#include "undertow/units.hpp"

using namespace undertow;
using namespace undertow::sky;

namespace {
SolarFrame frames(int i) {
  SolarFrame f;
  const double r0[] = {8.0, 8.15, 8.5}, zs[] = {0.0, 0.0208, -0.01}, th[] = {220, 236, 254};
  f.r0_kpc = r0[i % 3];
  f.z_sun_kpc = zs[i % 3];
  f.theta0_kms = th[(i + 1) % 3];
  f.u_sun_kms = 10.0 + i;
  f.v_sun_kms = 5.0 + 2 * i;
  f.w_sun_kms = 7.0 - i;
  return f;
}
} // namespace

TEST_CASE("Observables -> Galactocentric -> observables round-trips to 1e-9", "[sky]") {
  std::mt19937_64 rng(4);
  std::uniform_real_distribution<double> u(-1, 1), a(0, 360), d(0.1, 15), pm(-8, 8), v(-80, 80);
  for (int i = 0; i < 3000; ++i) {
    const SolarFrame f = frames(i);
    Observed o{a(rng), std::asin(0.99 * u(rng)) / units::deg, pm(rng), pm(rng), v(rng)};
    const double dist = d(rng);
    Observed back;
    const double d2 = from_galactocentric(to_galactocentric(o, dist, f), f, back);
    CHECK(d2 == Approx(dist).epsilon(1e-12));
    CHECK(std::fabs(back.ra_deg - o.ra_deg) * std::cos(o.dec_deg * units::deg) < 1e-9);
    CHECK(std::fabs(back.dec_deg - o.dec_deg) < 1e-9);
    CHECK(std::fabs(back.pmra_masyr - o.pmra_masyr) < 1e-9);
    CHECK(std::fabs(back.pmdec_masyr - o.pmdec_masyr) < 1e-9);
    CHECK(std::fabs(back.vhelio_kms - o.vhelio_kms) < 1e-9);
  }
}

TEST_CASE("The Sun sits at (-sqrt(R0^2 - z^2), 0, z_sun) and moves with (U, Theta0 + V, W) "
          "(conventions, astropy Galactocentric definition)",
          "[sky]") {
  const SolarFrame f = frames(1);
  const auto s = sun(f);
  CHECK(s.r[0] ==
        Approx(-std::sqrt(f.r0_kpc * f.r0_kpc - f.z_sun_kpc * f.z_sun_kpc)).epsilon(1e-15));
  CHECK(s.r[2] == Approx(f.z_sun_kpc).epsilon(1e-15));
  // a source 1 pc toward the Galactic centre has the Sun's heliocentric geometry: it lies
  // between the Sun and the centre
  double ra, dec;
  galactic_to_icrs(0, 0, ra, dec);
  const auto g = to_galactocentric({ra / units::deg, dec / units::deg, 0, 0, 0}, 0.001, f);
  CHECK(std::hypot(g.r[0], g.r[1], g.r[2]) == Approx(f.r0_kpc - 0.001).epsilon(1e-12));
  CHECK(g.v[1] == Approx(f.theta0_kms + f.v_sun_kms).epsilon(1e-12)); // at rest w.r.t. the Sun
}

TEST_CASE("A source on the local circular orbit has heliocentric velocity minus the solar "
          "motion, and one at l = 90 deg moving with +Y has a positive proper motion in l "
          "(direction of rotation: +y at the Sun)",
          "[sky]") {
  SolarFrame f;
  f.z_sun_kpc = 0;
  const Galactocentric circ{{-f.r0_kpc + 1e-3, 0, 0}, {0, f.theta0_kms, 0}};
  Observed o;
  from_galactocentric(circ, f, o);
  CHECK(o.vhelio_kms == Approx(-f.u_sun_kms).margin(1e-6)); // along the line of sight to the GC
  double l0ra, l0dec;
  galactic_to_icrs(units::pi / 2, 0, l0ra, l0dec);
  const auto g = to_galactocentric({l0ra / units::deg, l0dec / units::deg, 0, 0, 0}, 1.0, f);
  CHECK(g.r[1] == Approx(1.0).epsilon(1e-12)); // l = 90 deg is +y
}

TEST_CASE("LSR: 20 km/s toward the apex and -20 km/s away from it, the component form "
          "(10.3, 15.3, 7.7) km/s agrees with the apex form to 0.06 km/s everywhere "
          "(Standard Solar Motion, common practice)",
          "[sky]") {
  const double ra_a = (18 + 3 / 60.0 + 50.29 / 3600.0) * 15, dec_a = 30 + 16.8 / 3600.0;
  CHECK(lsr_correction_kms(ra_a, dec_a) == Approx(20).epsilon(1e-12));
  CHECK(lsr_correction_kms(ra_a - 180, -dec_a) == Approx(-20).epsilon(1e-12));
  std::mt19937_64 rng(8);
  std::uniform_real_distribution<double> u(-1, 1), a(0, 360);
  for (int i = 0; i < 2000; ++i) {
    const double ra = a(rng), dec = std::asin(u(rng)) / units::deg;
    CHECK(std::fabs(lsr_correction_kms(ra, dec) -
                    lsr_correction_kms(ra, dec, LsrForm::components)) < 0.06);
    const double v = 37.5;
    CHECK(lsr_to_helio(helio_to_lsr(v, ra, dec), ra, dec) == Approx(v).epsilon(1e-15));
  }
}

TEST_CASE("Exponentially-decreasing-space-density distance: the mode maximises the posterior "
          "(checked by brute force), tends to 1/parallax for small errors and lies beyond 2L "
          "for negative parallaxes (Bailer-Jones 2015, PASP 127, 994, §4: with varpi <= 0 "
          "every term of the cubic but r^3/L - 2 r^2 is negative, so r > 2L)",
          "[sky]") {
  const double L = 1.35;
  for (double w : {-0.2, 0.05, 0.2, 0.5, 1.0, 3.0}) {
    for (double frac : {0.02, 0.1, 0.3, 1.0}) {
      const double s = std::fabs(w) * frac + 0.01;
      const double m = edsd_mode_kpc(w, s, L);
      const auto logp = [&](double r) {
        return 2 * std::log(r) - r / L - (w - 1 / r) * (w - 1 / r) / (2 * s * s);
      };
      double best = 0, bp = -INFINITY;
      for (int i = 1; i < 200000; ++i) {
        const double r = 1e-3 * std::pow(1e5, i / 200000.0);
        if (logp(r) > bp) bp = logp(r), best = r;
      }
      INFO("parallax " << w << " mas, sigma " << s << " mas");
      CHECK(m == Approx(best).epsilon(1e-4));
      if (w < 0) CHECK(m > 2 * L);
    }
  }
  CHECK(edsd_mode_kpc(2.0, 0.002, L) == Approx(0.5).epsilon(1e-5));
}

TEST_CASE("Exponentially-decreasing-space-density posterior median: half the posterior mass on "
          "each side (checked by direct integration on a fine linear grid)",
          "[sky]") {
  const double L = 2.0;
  for (double w : {0.1, 0.3, 1.0}) {
    for (double frac : {0.05, 0.2, 0.5}) {
      const double s = w * frac, med = edsd_median_kpc(w, s, L);
      const auto p = [&](double r) {
        return r * r * std::exp(-r / L - (w - 1 / r) * (w - 1 / r) / (2 * s * s));
      };
      double below = 0, total = 0;
      const double h = 1e-4;
      for (double r = h / 2; r < 60; r += h) {
        total += p(r);
        if (r < med) below += p(r);
      }
      INFO("parallax " << w << " mas, sigma " << s << " mas, median " << med << " kpc");
      CHECK(below / total == Approx(0.5).margin(2e-3));
    }
  }
}

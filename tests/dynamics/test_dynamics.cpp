// Frequencies, Oort constants, resonances, enclosed mass, escape speed and calibration against
// closed forms of Binney & Tremaine (2008, "Galactic Dynamics", 2nd ed.).
#include <catch2/catch.hpp>
#include <cmath>

#include "undertow/dynamics/calibration.hpp"
#include "undertow/dynamics/frequencies.hpp"
#include "undertow/dynamics/mass.hpp"
#include "undertow/dynamics/resonances.hpp"
#include "undertow/error.hpp"
#include "undertow/potential/model.hpp"

using namespace undertow;
using namespace undertow::potential;
using namespace undertow::dynamics;

namespace {
Model single(ComponentShape s, std::string label = "c") {
  Model m;
  m.name = "single";
  m.components.push_back({std::move(label), std::move(s)});
  return m;
}
const Resonance& named(const std::vector<Resonance>& r, const std::string& n) {
  for (const auto& x : r)
    if (x.name == n) return x;
  FAIL("no resonance " << n);
  return r.front();
}
} // namespace

TEST_CASE("Flat rotation curve: A = -B = v0/(2R) and kappa = sqrt(2) Omega (B&T 2008 eq. 3.83 "
          "and §3.2.3)",
          "[dynamics]") {
  const Model m = single(Logarithmic::make(220, 0, 1));
  for (double R : {2.0, 5.0, 8.0, 15.0}) {
    CHECK(circular_speed(m, R) == Approx(220).epsilon(1e-13));
    CHECK(oort_a(m, R) == Approx(110 / R).epsilon(1e-9));
    CHECK(oort_b(m, R) == Approx(-110 / R).epsilon(1e-9));
    CHECK(kappa(m, R) == Approx(std::sqrt(2.0) * omega(m, R)).epsilon(1e-9));
  }
}

TEST_CASE("Flat rotation curve resonances: corotation at v0/Omega_p, m = 2 Lindblad resonances "
          "at (1 -/+ 1/sqrt 2) v0/Omega_p, 4:1 at (1 -/+ sqrt2/4) v0/Omega_p (B&T 2008 §3.3.3)",
          "[dynamics]") {
  const Model m = single(Logarithmic::make(220, 0, 1));
  const double op = 25, rc = 220 / op;
  const auto res = resonances(m, op, 2, 0.05, 50);
  REQUIRE(named(res, "corotation").radii.size() == 1);
  CHECK(named(res, "corotation").radii[0] == Approx(rc).epsilon(1e-9));
  REQUIRE(named(res, "inner Lindblad").radii.size() == 1);
  CHECK(named(res, "inner Lindblad").radii[0] ==
        Approx((1 - 1 / std::sqrt(2.0)) * rc).epsilon(1e-8));
  CHECK(named(res, "outer Lindblad").radii[0] ==
        Approx((1 + 1 / std::sqrt(2.0)) * rc).epsilon(1e-8));
  CHECK(named(res, "inner 4:1").radii[0] == Approx((1 - std::sqrt(2.0) / 4) * rc).epsilon(1e-8));
  CHECK(named(res, "outer 4:1").radii[0] == Approx((1 + std::sqrt(2.0) / 4) * rc).epsilon(1e-8));
}

TEST_CASE("A resonance outside the search range is reported as absent, with the reason",
          "[dynamics]") {
  const Model m = single(Logarithmic::make(220, 0, 1));
  const auto res = resonances(m, 2.0, 2, 0.05, 50); // corotation at 110 kpc
  const auto& cr = named(res, "corotation");
  CHECK(cr.radii.empty());
  CHECK_THAT(cr.note, Catch::Contains("none in [0.05, 50] kpc"));
}

TEST_CASE("Keplerian potential: kappa = nu = Omega = sqrt(GM/R^3) and v_esc = sqrt(2) v_c "
          "(B&T 2008 §3.2.3)",
          "[dynamics]") {
  const Model m = single(PointMass::make(1e11));
  for (double R : {1.0, 4.0, 10.0}) {
    const double om = std::sqrt(units::G * 1e11 / (R * R * R));
    CHECK(omega(m, R) == Approx(om).epsilon(1e-13));
    CHECK(kappa(m, R) == Approx(om).epsilon(1e-9));
    CHECK(nu(m, R) == Approx(om).epsilon(1e-9));
    CHECK(escape_speed(m, R) == Approx(std::sqrt(2.0) * circular_speed(m, R)).epsilon(1e-13));
    CHECK(enclosed_mass(m, R) == Approx(1e11).epsilon(1e-10));
  }
}

TEST_CASE("Isochrone: the epicyclic frequency of a circular orbit is its radial frequency "
          "(-2E)^{3/2}/(GM) (B&T 2008 eq. 3.225)",
          "[dynamics]") {
  const double M = 2e11, b = 3;
  const Model m = single(Isochrone::make(M, b));
  for (double R : {0.5, 2.0, 6.0, 20.0}) {
    const double vc = circular_speed(m, R);
    const double E = 0.5 * vc * vc + m.axisymmetric_potential({R, 0, 0});
    CHECK(kappa(m, R) == Approx(std::pow(-2 * E, 1.5) / (units::G * M)).epsilon(1e-8));
  }
}

TEST_CASE("Spherical models have nu = Omega, a harmonic core has kappa = 2 Omega (B&T 2008 "
          "§3.2.3)",
          "[dynamics]") {
  const Model h = single(Hernquist::make(5e10, 1.5));
  for (double R : {0.5, 3.0, 12.0})
    CHECK(nu(h, R) == Approx(omega(h, R)).epsilon(1e-8));
  const Model p = single(Plummer::make(1e10, 2.0));
  CHECK(kappa(p, 1e-3) == Approx(2 * omega(p, 1e-3)).epsilon(1e-6));
}

TEST_CASE("Enclosed mass by Gauss's theorem equals the closed-form M(r) of spherical models "
          "(Hernquist 1990 eq. 3, NFW 1996)",
          "[dynamics]") {
  const Model h = single(Hernquist::make(5e10, 1.5));
  const Model n = single(Nfw::make(1e7, 15));
  for (double r : {0.3, 2.0, 9.0, 40.0}) {
    CHECK(enclosed_mass(h, r) ==
          Approx(std::get<Hernquist>(h.components[0].shape).enclosed_mass(r)).epsilon(1e-10));
    CHECK(enclosed_mass(n, r) ==
          Approx(std::get<Nfw>(n.components[0].shape).enclosed_mass(r)).epsilon(1e-10));
  }
}

TEST_CASE("Enclosed mass of a Miyamoto-Nagai disk tends to its total mass (Gauss's theorem)",
          "[dynamics]") {
  const Model d = single(MiyamotoNagai::make(6e10, 3, 0.3));
  CHECK(enclosed_mass(d, 3e4) == Approx(6e10).epsilon(2e-4));
  CHECK(enclosed_mass(d, 8) < enclosed_mass(d, 16));
}

TEST_CASE("Escape speed needs a radius for a logarithmic halo", "[dynamics]") {
  const Model m = single(Logarithmic::make(200, 1, 1));
  CHECK_THROWS_AS(escape_speed(m, 8), InputError);
  // Phi(r_far) - Phi(R) = v0^2 ln(r_far/R) for R_c << R (B&T 2008 eq. 2.71a)
  const double v = escape_speed(m, 8, 200.0);
  const double expect = std::sqrt(200.0 * 200.0 * std::log((1 + 200.0 * 200.0) / (1 + 64.0)));
  CHECK(v == Approx(expect).epsilon(1e-12));
}

TEST_CASE("Calibration rescales the chosen masses so that v_c(R0) = Theta0 exactly, the others "
          "stay as they were",
          "[dynamics]") {
  Model m;
  m.components.push_back({"bulge", Hernquist::make(1e10, 0.6)});
  m.components.push_back({"disk", MiyamotoNagai::make(5e10, 3, 0.3)});
  m.components.push_back({"halo", Nfw::make(8e6, 18)});
  const double vb = circular_speed_component(m, 0, 8.2);
  const double factor = calibrate(m, 8.2, 236.0, {"disk", "halo"});
  CHECK(factor > 0);
  CHECK(circular_speed(m, 8.2) == Approx(236.0).epsilon(1e-13));
  CHECK(circular_speed_component(m, 0, 8.2) == vb);
  CHECK_THROWS_AS(calibrate(m, 8.2, 10.0, {"disk"}), InputError); // bulge alone exceeds 10 km/s
  CHECK_THROWS_WITH(calibrate(m, 8.2, 230.0, {"dsik"}),
                    Catch::Contains("no component labelled 'dsik'"));
}

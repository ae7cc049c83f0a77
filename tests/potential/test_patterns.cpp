// Rotating perturbations: forces, densities, growth, amplitude conventions, Jacobi integral.
#include <boost/numeric/odeint.hpp>
#include <catch2/catch.hpp>
#include <cmath>
#include <random>

#include "support/numdiff.hpp"
#include "undertow/dynamics/frequencies.hpp"
#include "undertow/potential/model.hpp"
#include "undertow/potential/model_file.hpp"

using namespace undertow;
using namespace undertow::potential;
using test::V3;

namespace {

Model axisymmetric_demo() {
  return parse_model_text(R"(
name = "test-galaxy"
[[component]]
label = "bulge"
kind = "hernquist"
mass_msun = 1e10
scale_kpc = 0.6
[[component]]
label = "disk"
kind = "miyamoto-nagai"
mass_msun = 6.5e10
radial_scale_kpc = 3.0
vertical_scale_kpc = 0.3
[[component]]
label = "halo"
kind = "nfw"
density_msun_kpc3 = 8e6
scale_kpc = 18
)",
                          "test-galaxy.toml");
}

Pattern make_pattern(PatternShape s, double omega_p, double phase_deg, Growth g = {}) {
  Pattern p;
  p.label = "p";
  p.shape = std::move(s);
  p.pattern_speed = omega_p;
  p.phase = phase_deg * units::deg;
  p.growth = g;
  return p;
}

std::vector<Pattern> all_patterns() {
  return {
      make_pattern(LogSpiral::make(2, 12, 8, 7, 1.5, 0.4, 900), 25, 20),
      make_pattern(LogSpiral::make(4, 25, 8, INFINITY, 2.0, INFINITY, 500), 20, -40),
      make_pattern(CoxGomezSpiral::make(2, 15, 8, 7, 0.18, 0.35e9), 20, 10),
      make_pattern(CoxGomezSpiral::make(4, 12, 8.3, 7, 0.18, 0.35e9), 22, 60),
      make_pattern(DehnenBar::make(3.5, 3000), 52, 25),
  };
}

Model with_pattern(const Pattern& p) {
  Model m = axisymmetric_demo();
  m.patterns = {p};
  return m;
}

V3 random_disk_point(std::mt19937_64& rng, double rmin, double rmax, double zmax) {
  std::uniform_real_distribution<double> R(rmin, rmax), ph(0, 2 * units::pi), Z(-zmax, zmax);
  const double r = R(rng), a = ph(rng);
  return {r * std::cos(a), r * std::sin(a), Z(rng)};
}

} // namespace

TEST_CASE("Pattern forces are minus the numerical gradient of their potentials (definition "
          "of the force)",
          "[patterns]") {
  std::mt19937_64 rng(7);
  const double t = 1234.5; // Myr, any time: the growth is a step here
  for (const Pattern& p : all_patterns()) {
    const Model m = with_pattern(p);
    INFO("pattern kind " << p.kind());
    for (int i = 0; i < 60; ++i) {
      const V3 r = random_disk_point(rng, 0.8, 16, 1.5);
      const auto phi = [&](const V3& q) { return m.pattern_potential(0, q, t); };
      const V3 g = test::gradient(phi, r, 1e-3);
      const V3 a = m.pattern_acceleration(0, r, t);
      const double scale = std::hypot(g[0], g[1], g[2]) + 1e-30;
      INFO("at " << r[0] << ", " << r[1] << ", " << r[2]);
      for (int k = 0; k < 3; ++k)
        CHECK(std::fabs(a[k] + g[k]) / scale < 1e-7);
    }
  }
}

TEST_CASE("Pattern densities satisfy Poisson's equation: Laplacian of Phi = 4 pi G rho "
          "(Cox & Gomez 2002 spiral, Dehnen 2000 bar, log spiral)",
          "[patterns]") {
  std::mt19937_64 rng(11);
  for (const Pattern& p : all_patterns()) {
    const Model m = with_pattern(p);
    INFO("pattern kind " << p.kind());
    double worst = 0;
    for (int i = 0; i < 60; ++i) {
      V3 r = random_disk_point(rng, 1.0, 14, 0.8);
      if (p.kind() == std::string("dehnen-bar")) r = random_disk_point(rng, 0.8, 3.2, 0.5);
      const auto phi = [&](const V3& q) { return m.pattern_potential(0, q, 0); };
      const double lap = test::laplacian(phi, r, 4e-3);
      const double rho4pg = 4 * units::pi * units::G * m.pattern_density(0, r, 0);
      // Scale: the size of the Laplacian's largest term, so a near-zero crossing of rho is fair.
      const double scale = std::fabs(lap) + std::fabs(rho4pg) + 1e-3 * std::fabs(phi(r));
      worst = std::max(worst, std::fabs(lap - rho4pg) / scale);
    }
    CHECK(worst < 1e-5);
  }
}

TEST_CASE("A log-spiral's arms are overdense at every height inside its outer radius: the "
          "density at the potential trough is non-negative for 0 <= z <= 6 kpc and equals "
          "A F (k_e^2 + K/h) / (4 pi G) in the midplane (the Laplacian of A F cos(chi) "
          "sech^beta(K z / beta), derived), and the column density is finite",
          "[patterns]") {
  // Arms like the demo galaxy's and thin, tight arms like those of the original sech^2 example.
  for (const auto& s : {LogSpiral::make(4, 13, 8.1, 9, 2.5, 0.6, 800, 20),
                        LogSpiral::make(2, 12, 8, 7, 1.5, 0.1, 900, 16)}) {
    const Model m = with_pattern(make_pattern(s, 25, 20));
    const double t = 0, h = 1 / s.inv_h;
    const auto w = s.at(1, m.patterns[0].angle_at(t));
    REQUIRE(s.kz > 0);
    for (double R = 1; R <= s.rout; R += 0.5) {
      // chi = m psi + offset + m cot p ln(R / R_ref) = 0 at the trough
      const double psi = -(w.offset + s.md * s.cotp * std::log(R / s.rref)) / s.md;
      const double x = -R * std::cos(psi), y = R * std::sin(psi);
      const double F = std::exp((s.rref - R) * s.inv_rs) * s.norm * R * R / (R * R + s.rin2);
      const double mid = m.pattern_density(0, {x, y, 0}, t);
      INFO("R = " << R);
      CHECK(mid ==
            Approx(s.amp * F * (s.effective_wavenumber2(R) + s.kz / h) / (4 * units::pi * units::G))
                .epsilon(1e-6));
      double column = 0;
      for (double z = 0.01; z <= 6; z += 0.01) {
        const double rho = m.pattern_density(0, {x, y, z}, t);
        INFO("z = " << z << ": " << rho << " Msun/kpc^3, midplane " << mid);
        REQUIRE(rho >= -1e-9 * mid);
        column += 0.01 * rho;
      }
      CHECK(column > 0);
      // Far from the plane the density falls as exp(-K |z|), so the column converges (where
      // k_e > K; at the radius of the minimum it falls faster still).
      if (s.effective_wavenumber2(R) > 1.01 * s.kz * s.kz)
        CHECK(m.pattern_density(0, {x, y, 6}, t) / m.pattern_density(0, {x, y, 5.5}, t) ==
              Approx(std::exp(-0.5 * s.kz)).epsilon(1e-4));
    }
  }
  // An envelope that falls faster than the arms wind is refused.
  CHECK_THROWS(LogSpiral::make(2, 60, 8, 1.0, 1, 0.3, 100, 30));
}

TEST_CASE("The Dehnen bar is harmonic outside its radius: zero density (Dehnen 2000, eq. 1)",
          "[patterns]") {
  const Model m = with_pattern(all_patterns().back());
  std::mt19937_64 rng(3);
  for (int i = 0; i < 40; ++i) {
    const V3 r = random_disk_point(rng, 3.8, 15, 1.0);
    const auto phi = [&](const V3& q) { return m.pattern_potential(0, q, 0); };
    const double lap = test::laplacian(phi, r, 2e-3);
    // the terms of the Laplacian are of order 10 A (r_b/r)^3 / r^2; their sum must vanish
    const double rr = std::hypot(r[0], r[1], r[2]);
    CHECK(std::fabs(lap) < 1e-6 * 3000 * std::pow(3.5 / rr, 3) / (rr * rr));
    CHECK(m.pattern_density(0, r, 0) == 0.0);
  }
}

TEST_CASE("Growth polynomial of Dehnen (2000, eq. 4): 0 before, 1 after, 1/2 halfway, smooth "
          "and monotonic",
          "[patterns]") {
  const Growth g{100, 400};
  CHECK(g.factor(-1e6) == 0.0);
  CHECK(g.factor(100) == Approx(0.0).margin(1e-15));
  CHECK(g.factor(300) == Approx(0.5).margin(1e-15));
  CHECK(g.factor(500) == Approx(1.0).margin(1e-15));
  CHECK(g.factor(1e6) == 1.0);
  // zero slope at both ends, by central differences
  const double h = 1e-3;
  CHECK(std::fabs(g.factor(100 + h) - g.factor(100)) < 1e-12);
  CHECK(std::fabs(g.factor(500) - g.factor(500 - h)) < 1e-12);
  double prev = 0;
  for (double t = 100; t <= 500; t += 1) {
    CHECK(g.factor(t) >= prev);
    prev = g.factor(t);
  }
  CHECK(Growth{50, 0}.factor(49.9) == 0.0);
  CHECK(Growth{50, 0}.factor(50) == 1.0);
}

TEST_CASE("A spiral given by force ratio has that peak radial force relative to the "
          "axisymmetric radial force at the reference radius (common practice definition)",
          "[patterns]") {
  for (double ratio : {0.01, 0.02, 0.05}) {
    const std::string text = std::string(R"(
[[component]]
kind = "hernquist"
mass_msun = 1e10
scale_kpc = 0.6
[[component]]
kind = "logarithmic"
speed_kms = 200
core_kpc = 1
[[pattern]]
kind = "log-spiral"
arms = 2
pitch_deg = 14
pattern_speed_kms_kpc = 25
reference_radius_kpc = 8.3
envelope_scale_kpc = 6
inner_taper_kpc = 2
force_ratio = )") + std::to_string(ratio) +
                             "\n";
    const Model m = parse_model_text(text, "ratio.toml");
    const double R = 8.3;
    const double axi = -m.axisymmetric_acceleration({R, 0, 0})[0];
    double peak = 0;
    for (int i = 0; i < 20000; ++i) {
      const double a = 2 * units::pi * i / 20000.0;
      const V3 r{R * std::cos(a), R * std::sin(a), 0};
      const V3 f = m.pattern_acceleration(0, r, 0);
      peak = std::max(peak, std::fabs(f[0] * std::cos(a) + f[1] * std::sin(a)));
    }
    CHECK(peak / axi == Approx(ratio).epsilon(1e-6));
  }
}

TEST_CASE("Dehnen bar strength alpha is its peak radial force over the axisymmetric force at "
          "R0 (Dehnen 2000, eq. 3)",
          "[patterns]") {
  const Model m = parse_model_text(R"(
[[component]]
kind = "logarithmic"
speed_kms = 220
[[pattern]]
kind = "dehnen-bar"
pattern_speed_kms_kpc = 50
bar_radius_kpc = 3.5
strength = 0.01
reference_radius_kpc = 8.0
)",
                                   "bar.toml");
  const double R0 = 8.0;
  double peak = 0;
  for (int i = 0; i < 3600; ++i) {
    const double a = 2 * units::pi * i / 3600.0;
    const V3 f = m.pattern_acceleration(0, {R0 * std::cos(a), R0 * std::sin(a), 0}, 0);
    peak = std::max(peak, std::fabs(f[0] * std::cos(a) + f[1] * std::sin(a)));
  }
  CHECK(peak / (220.0 * 220.0 / R0) == Approx(0.01).epsilon(1e-9));
}

TEST_CASE("Patterns rotate rigidly at their pattern speed, in the sense of Galactic rotation "
          "(conventions: psi grows toward +y at the Sun)",
          "[patterns]") {
  std::mt19937_64 rng(5);
  for (const Pattern& p : all_patterns()) {
    const Model m = with_pattern(p);
    const double t = 250; // Myr
    const double dpsi = p.pattern_speed * t / units::time_unit_myr;
    for (int i = 0; i < 20; ++i) {
      const V3 r = random_disk_point(rng, 2, 14, 0.5);
      // Advance the point by dpsi in the sense of rotation: psi = atan2(y, -x), so the point
      // (-R cos psi, R sin psi) moves to psi + dpsi.
      const double R = std::hypot(r[0], r[1]), psi = std::atan2(r[1], -r[0]) + dpsi;
      const V3 q{-R * std::cos(psi), R * std::sin(psi), r[2]};
      CHECK(m.pattern_potential(0, q, t) ==
            Approx(m.pattern_potential(0, r, 0)).margin(1e-9 * 900).epsilon(1e-9));
    }
  }
}

TEST_CASE("Logarithmic spiral arms trail and sit at the stated phase: at R_ref the potential "
          "trough is at psi = phase, farther out it lies at smaller psi (B&T 2008 §6.1.1)",
          "[patterns]") {
  const Model m =
      with_pattern(make_pattern(LogSpiral::make(2, 12, 8, INFINITY, 1, INFINITY, 1000), 25, 30));
  const auto trough = [&](double R) {
    double best = 1e300, at = 0;
    for (int i = 0; i < 36000; ++i) {
      const double psi = units::deg * (i / 100.0 - 60);
      const double v = m.pattern_potential(0, {-R * std::cos(psi), R * std::sin(psi), 0}, 0);
      if (v < best) best = v, at = psi;
    }
    return at / units::deg;
  };
  CHECK(trough(8.0) == Approx(30).margin(0.02));
  const double t9 = trough(9.0);
  // crest follows psi = phase - cot(p) ln(R/R_ref)
  CHECK(t9 ==
        Approx(30 - std::log(9.0 / 8.0) / std::tan(12 * units::deg) / units::deg).margin(0.02));
  CHECK(t9 < 30);
}

TEST_CASE("Jacobi integral E - Omega_p L is conserved along an orbit in a rotating pattern "
          "after growth (B&T 2008 §3.3.2), adaptive Dormand-Prince 5(4)",
          "[patterns]") {
  namespace ode = boost::numeric::odeint;
  using State = std::array<double, 6>;
  for (const Pattern& p0 : all_patterns()) {
    Pattern p = p0;
    p.growth = Growth{0, 300};
    const Model m = with_pattern(p);
    INFO("pattern kind " << p.kind());
    // time in Myr; velocities in km/s; positions in kpc: dx/dt = v / time_unit
    const double u = 1.0 / units::time_unit_myr;
    const auto rhs = [&](const State& s, State& d, double t) {
      const auto a = m.acceleration_pointwise({s[0], s[1], s[2]}, t);
      d = {s[3] * u, s[4] * u, s[5] * u, a[0] * u, a[1] * u, a[2] * u};
    };
    const auto jacobi = [&](const State& s, double t) {
      const double e = 0.5 * (s[3] * s[3] + s[4] * s[4] + s[5] * s[5]) +
                       m.potential_pointwise({s[0], s[1], s[2]}, t);
      const double L = s[1] * s[3] - s[0] * s[4]; // about the rotation axis, sense of rotation
      return e - p.pattern_speed * L;
    };
    const double R = 8.0, vc = dynamics::circular_speed(m, R);
    State s{-R, 0, 0.1, 12, vc * 0.97, 6};
    auto stepper = ode::make_controlled(1e-13, 1e-13, ode::runge_kutta_dopri5<State>());
    ode::integrate_adaptive(stepper, rhs, s, 0.0, 300.0, 0.1); // through the growth
    const double j0 = jacobi(s, 300.0);
    ode::integrate_adaptive(stepper, rhs, s, 300.0, 1300.0, 0.1);
    const double j1 = jacobi(s, 1300.0);
    CHECK(std::fabs(j1 - j0) / std::fabs(j0) < 1e-8);
  }
}

TEST_CASE("Several patterns with different speeds coexist and add", "[patterns]") {
  Model m = axisymmetric_demo();
  const auto ps = all_patterns();
  m.patterns = {ps[0], ps[4]};
  std::mt19937_64 rng(9);
  for (int i = 0; i < 20; ++i) {
    const V3 r = random_disk_point(rng, 1, 12, 0.5);
    const double t = 700;
    const V3 a = m.acceleration_pointwise(r, t);
    const V3 b = m.axisymmetric_acceleration(r);
    const V3 s1 = m.pattern_acceleration(0, r, t), s2 = m.pattern_acceleration(1, r, t);
    for (int k = 0; k < 3; ++k)
      CHECK(a[k] == Approx(b[k] + s1[k] + s2[k]).epsilon(1e-14));
  }
}

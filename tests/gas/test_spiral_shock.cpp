// The steady flow across spiral arms (Roberts 1969): the weak-arm limit against the linear gas
// response, the isothermal jump at the shock, the steady equations between the jumps,
// convergence with the step, a flow outside corotation, and the problem built from a model.
#include <catch2/catch.hpp>
#include <cmath>

#include "undertow/error.hpp"
#include "undertow/gas/spiral_shock.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/units.hpp"

using namespace undertow;
using namespace undertow::gas;

namespace {
// A flat rotation curve of 220 km/s at 8 kpc (kappa = sqrt(2) Omega), two arms of pitch 12 deg.
ShockProblem flat(double pattern_speed, double amplitude, double sound_speed = 8) {
  ShockProblem p;
  p.radius = 8;
  p.pitch_deg = 12;
  p.arms = 2;
  p.omega = 27.5;
  p.kappa = 27.5 * std::sqrt(2.0);
  const double sp = std::sin(12 * units::deg);
  p.u0 = 8 * (p.omega - pattern_speed) * sp;
  p.sound_speed = sound_speed;
  p.spacing = 2 * units::pi * 8 * sp / 2;
  p.forcing = cosine_arm(amplitude);
  return p;
}

// The cos(k x) amplitude of the density and the sin(k x) amplitude of v over the profile.
std::pair<double, double> first_harmonics(const ShockProblem& p, const ShockProfile& f) {
  const double k = 2 * units::pi / p.spacing;
  double s1 = 0, v1 = 0;
  const double n = static_cast<double>(f.x.size());
  for (std::size_t i = 0; i < f.x.size(); ++i) {
    s1 += 2 / n * (f.density[i] - 1) * std::cos(k * f.x[i]);
    v1 += 2 / n * f.v[i] * std::sin(k * f.x[i]);
  }
  return {s1, v1};
}
} // namespace

TEST_CASE("Arm flow: a weak arm gives the linear gas response, density contrast k^2 A / (kappa^2 + "
          "k^2 c^2 - k^2 u0^2) (the linearised equations, the WKB response of a fluid disk "
          "without self-gravity, Binney & Tremaine 2008 ch. 6)",
          "[gas][arm-flow]") {
  for (double speed : {12.5, 20.0}) {
    const auto p = flat(speed, 1.0);
    const auto f = solve_spiral_shock(p);
    REQUIRE(f.converged);
    CHECK_FALSE(f.shocked);
    const auto [s1, v1] = first_harmonics(p, f);
    const auto lin = linear_arm_response(p, 1.0);
    INFO("pattern speed " << speed << ": s1 " << s1 << " vs " << lin.density << ", v1 " << v1
                          << " vs " << lin.along);
    // Second-order terms are (s1)^2 ~ 1e-6 relative to s1 ~ 1e-3.
    CHECK(s1 == Approx(lin.density).epsilon(2e-3));
    CHECK(v1 == Approx(lin.along).epsilon(2e-3));
  }
  // Stronger arms depart from the linear response, in the sense of a saturating contrast.
  const auto p = flat(12.5, 100.0);
  const auto f = solve_spiral_shock(p);
  REQUIRE(f.converged);
  CHECK(first_harmonics(p, f).first < 0.98 * linear_arm_response(p, 100.0).density);
}

TEST_CASE("Arm flow: a strong arm shocks, with the isothermal jump u1 u2 = c^2 and mass and "
          "momentum fluxes S u and S (u^2 + c^2) the same on both sides (Rankine-Hugoniot for "
          "an isothermal gas, Shu 1992, The Physics of Astrophysics II, ch. 15)",
          "[gas][arm-flow]") {
  for (double amplitude : {400.0, 800.0}) {
    const auto p = flat(12.5, amplitude);
    const auto f = solve_spiral_shock(p);
    REQUIRE(f.converged);
    REQUIRE(f.shocked);
    const double c = p.sound_speed;
    INFO("amplitude " << amplitude << ": u " << f.u_before << " -> " << f.u_after);
    CHECK(f.u_before > c);
    CHECK(f.u_after < c);
    // The jump is located between integration nodes by interpolation: O(h^2).
    CHECK(f.u_before * f.u_after == Approx(c * c).epsilon(1e-4));
    // Fluxes from the profile's own density (S = const / u) either side of the jump.
    const double flux = f.density[0] * f.u[0];
    for (std::size_t i = 0; i < f.x.size(); ++i)
      REQUIRE(f.density[i] * f.u[i] == Approx(flux).epsilon(1e-12));
    const double s1 = flux / f.u_before, s2 = flux / f.u_after;
    CHECK(s1 * (f.u_before * f.u_before + c * c) ==
          Approx(s2 * (f.u_after * f.u_after + c * c)).epsilon(1e-4));
    // The mass flux is the circular flow's: periodic v needs mean(1/u) = 1/u0 (the
    // along-arm equation integrated over one spacing). The output's mean of 1/u is a
    // rectangle rule across a jump: good to about one cell in the spacing.
    CHECK(flux == Approx(p.u0).epsilon(4.0 / static_cast<double>(f.x.size())));
    // The density peaks just after the shock, and the profile crosses c on the way in and out.
    std::size_t densest = 0;
    for (std::size_t i = 0; i < f.x.size(); ++i)
      if (f.density[i] > f.density[densest]) densest = i;
    const double after = std::remainder(f.x[densest] - f.shock_x, p.spacing);
    CHECK(after > 0);
    CHECK(after < 0.05 * p.spacing);
  }
}

TEST_CASE("Arm flow: between the jumps the profile satisfies the steady equations (u - c^2/u) "
          "u' = 2 Omega v - Phi1' and u v' = -(kappa^2 / 2 Omega)(u - u0), checked by central "
          "differences of the output",
          "[gas][arm-flow]") {
  for (double amplitude : {100.0, 400.0}) {
    const auto p = flat(12.5, amplitude);
    const auto f = solve_spiral_shock(p);
    REQUIRE(f.converged);
    const double h = p.spacing / static_cast<double>(f.x.size()), k = 2 * units::pi / p.spacing;
    const double c2 = p.sound_speed * p.sound_speed;
    const double shear = p.kappa * p.kappa / (2 * p.omega);
    double worst_u = 0, worst_v = 0;
    const std::size_t n = f.x.size();
    for (std::size_t i = 4; i + 4 < n; i += 7) {
      // Skip the jump and the sonic point's neighbourhood (linear interpolation there).
      if (f.shocked &&
          (std::fabs(f.x[i] - f.shock_x) < 8 * h || std::fabs(f.x[i] - f.sonic_x) < 8 * h))
        continue;
      const double du = (f.u[i + 1] - f.u[i - 1]) / (2 * h),
                   dv = (f.v[i + 1] - f.v[i - 1]) / (2 * h);
      const double lhs_u = (f.u[i] - c2 / f.u[i]) * du;
      const double rhs_u = 2 * p.omega * f.v[i] - p.forcing.slope(f.x[i], k);
      const double rhs_v = -shear * (f.u[i] - p.u0);
      worst_u = std::max(worst_u, std::fabs(lhs_u - rhs_u) / (std::fabs(rhs_u) + 100));
      worst_v = std::max(worst_v, std::fabs(f.u[i] * dv - rhs_v) / (std::fabs(rhs_v) + 100));
    }
    INFO("amplitude " << amplitude << ": residuals " << worst_u << ", " << worst_v);
    CHECK(worst_u < 1e-3);
    CHECK(worst_v < 1e-3);
  }
}

TEST_CASE("Arm flow: the shock's place and the compression converge as the step shrinks",
          "[gas][arm-flow]") {
  const auto p = flat(12.5, 400.0);
  double last_x = 0, last_c = 0;
  for (int cells : {512, 1024, 2048, 4096}) {
    ShockSettings s;
    s.cells = cells;
    const auto f = solve_spiral_shock(p, s);
    REQUIRE(f.converged);
    REQUIRE(f.shocked);
    if (cells > 512) {
      const double dx = std::fabs(f.shock_x - last_x), dc = std::fabs(f.compression - last_c);
      INFO(cells << " cells: shock at " << f.shock_x << " (change " << dx << "), compression "
                 << f.compression << " (change " << dc << ")");
      CHECK(dx < (cells >= 2048 ? 1e-4 : 5e-4) * p.spacing);
      CHECK(dc < (cells >= 2048 ? 1e-3 : 5e-3) * f.compression);
    }
    last_x = f.shock_x;
    last_c = f.compression;
  }
}

TEST_CASE("Arm flow: outside corotation the gas crosses the arms backwards, and the solution is "
          "the half-turned one (the equations are unchanged by x, y -> -x, -y)",
          "[gas][arm-flow]") {
  auto inside = flat(12.5, 400.0);
  auto outside = inside;
  outside.u0 = -inside.u0;
  outside.forcing.sin_terms[0] = 0; // a cosine arm is symmetric, so the turned forcing is itself
  const auto a = solve_spiral_shock(inside);
  const auto b = solve_spiral_shock(outside);
  REQUIRE(a.converged);
  REQUIRE(b.converged);
  REQUIRE(b.shocked);
  CHECK(b.shock_x == Approx(-a.shock_x).margin(1e-12));
  CHECK(b.u_before == Approx(-a.u_before).epsilon(1e-12));
  const std::size_t n = a.x.size();
  for (std::size_t i = 1; i < n; i += 97) {
    CHECK(b.density[i] == Approx(a.density[n - i]).epsilon(1e-12));
    CHECK(b.v[i] == Approx(-a.v[n - i]).epsilon(1e-12));
  }
}

TEST_CASE("Arm flow: the problem from a model file, the arm potential sampled around the circle "
          "(a log-spiral is one cosine harmonic), and what cannot be solved is one error",
          "[gas][arm-flow]") {
  const auto model = potential::load_model_file(UNDERTOW_SOURCE_DIR "/potentials/kestrel.toml");
  const auto p = shock_problem(model, 0, 8.0, 7.0);
  CHECK(p.arms == 4);
  CHECK(p.pitch_deg == Approx(13.0).epsilon(1e-12));
  CHECK(p.spacing == Approx(2 * units::pi * 8 * std::sin(13 * units::deg) / 4).epsilon(1e-12));
  CHECK(p.u0 == Approx(8 * (p.omega - 21.0) * std::sin(13 * units::deg)).epsilon(1e-12));
  // A log-spiral: Phi1 = -A F(R) cos(k x) with x = 0 at the trough; the other terms vanish.
  const double a1 = p.forcing.cos_terms[0];
  CHECK(a1 < 0);
  CHECK(std::fabs(p.forcing.sin_terms[0]) < 1e-6 * std::fabs(a1));
  for (std::size_t j = 1; j < p.forcing.cos_terms.size(); ++j) {
    CHECK(std::fabs(p.forcing.cos_terms[j]) < 1e-9 * std::fabs(a1));
    CHECK(std::fabs(p.forcing.sin_terms[j]) < 1e-9 * std::fabs(a1));
  }
  // Its amplitude is the model's potential at the trough, relative to the mean around the circle.
  const double k = 2 * units::pi / p.spacing;
  CHECK(p.forcing.potential(0, k) == Approx(a1).epsilon(1e-12));
  auto at_corotation = p;
  at_corotation.u0 = 0;
  CHECK_THROWS_AS(solve_spiral_shock(at_corotation), InputError);
  CHECK_THROWS_AS(shock_problem(model, 1, 8.0, 7.0), InputError);
}

// The clouds-across-the-arms bins (arm-flow --clouds): the decomposition of a cloud's velocity
// into the speed across the arms and V_s, and the arm phase of each cloud on the steady flow's
// x axis (0 at the potential trough, positive ahead in rotation).
#include <catch2/catch.hpp>
#include <cmath>
#include <random>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/run/arm_crossing.hpp"
#include "undertow/units.hpp"

using namespace undertow;

namespace {
// Clouds spread evenly over the ring 5.8-6.2 kpc in the midplane, each moving on the circular
// orbit plus (v_R, dv_psi) = extra(x, y).
template <class F> io::Snapshot ring(const potential::Model& m, double t_myr, F extra) {
  io::Snapshot s;
  s.time_myr = t_myr;
  const std::size_t n = 40000;
  s.tracers.resize(n);
  s.flags.assign(n, 0);
  std::mt19937_64 rng(3);
  std::uniform_real_distribution<double> r(5.8, 6.2), a(0, 2 * units::pi);
  for (std::size_t i = 0; i < n; ++i) {
    const double R = r(rng), psi = a(rng);
    const double x = -R * std::cos(psi), y = R * std::sin(psi); // psi from the Sun's direction
    const auto [vr, dv] = extra(x, y);
    const double vpsi = dynamics::circular_speed(m, R) + dv;
    // e_R = (x, y)/R; the sense of rotation is clockwise seen from the north pole: (y, -x)/R.
    s.tracers.id[i] = i;
    s.tracers.x[i] = x;
    s.tracers.y[i] = y;
    s.tracers.z[i] = 0;
    s.tracers.vx[i] = (vr * x + vpsi * y) / R;
    s.tracers.vy[i] = (vr * y - vpsi * x) / R;
    s.tracers.vz[i] = 0;
  }
  return s;
}
} // namespace

TEST_CASE("Arm crossing: a uniform (v_R, dv_phi) gives u = u0 + v_R cos p + dv_phi sin p and "
          "V_s = dv_phi in every bin, and an even ring an even density (the across-arm unit "
          "vector (cos p, sin p) in (e_R, e_phi), from the gradient of the log-spiral phase)",
          "[run][arm-flow]") {
  const auto m = potential::load_model_file(UNDERTOW_SOURCE_DIR "/demo/truth/galaxy.toml");
  const auto p = gas::shock_problem(m, 0, 6.0, 10.0);
  const double vr = 3.0, dv = -2.0;
  const auto s = ring(m, 600, [&](double, double) { return std::pair{vr, dv}; });
  double dispersion = 0;
  std::size_t used = 0;
  const auto b = run::cloud_bins(s, m, p, 0.2, 10, dispersion, used);
  CHECK(used == 40000);
  const double cp = std::cos(p.pitch_deg * units::deg), sp = std::sin(p.pitch_deg * units::deg);
  for (std::size_t k = 0; k < 10; ++k) {
    // The circular speed varies across the ring; the decomposition uses each cloud's own.
    CHECK(b.across[k] == Approx(p.u0 + vr * cp + dv * sp).margin(1e-9));
    CHECK(b.vs[k] == Approx(dv).margin(1e-9));
    CHECK(b.density[k] == Approx(1).margin(0.06)); // 4000 per bin: Poisson 1.6 %
  }
  CHECK(dispersion < 1e-9);
  CHECK(b.drop < 1e-9);
}

TEST_CASE("Arm crossing: clouds whose V_s follows the arm potential at their place give bin means "
          "that follow the steady flow's arm potential on its own x axis (the trough at 0, "
          "positive ahead in rotation), to the bin-averaging factor sinc(pi / bins)",
          "[run][arm-flow]") {
  const auto m = potential::load_model_file(UNDERTOW_SOURCE_DIR "/demo/truth/galaxy.toml");
  const auto p = gas::shock_problem(m, 0, 6.0, 10.0);
  const double t = 600, k = 2 * units::pi / p.spacing;
  const double amp = -p.forcing.cos_terms[0]; // Phi1 = -amp cos(k x)
  REQUIRE(amp > 0);
  // V_s = 10 km/s times Phi1 / amp at the cloud's own place.
  const auto s = ring(m, t, [&](double x, double y) {
    return std::pair{0.0, 10 * m.pattern_potential(0, {x, y, 0}, t) / amp};
  });
  const int bins = 20;
  double dispersion = 0;
  std::size_t used = 0;
  const auto b = run::cloud_bins(s, m, p, 0.2, bins, dispersion, used);
  const double sinc = std::sin(units::pi / bins) / (units::pi / bins);
  for (int j = 0; j < bins; ++j) {
    const double centre = 0.5 * (b.edges[j] + b.edges[j + 1]);
    const double expect = 10 * sinc * p.forcing.potential(centre, k) / amp;
    INFO("bin " << j << " at x = " << centre << " kpc");
    // The envelope varies by a few per cent over the ring's width: 4 % of the amplitude.
    CHECK(b.vs[j] == Approx(expect).margin(0.4));
  }
}

TEST_CASE("Arm crossing: the steady flow averaged over bins keeps its mean density and its mass "
          "flux (the density-weighted mean of u over all bins is u0, as the along-arm equation "
          "integrated over a spacing demands)",
          "[run][arm-flow]") {
  const auto m = potential::load_model_file(UNDERTOW_SOURCE_DIR "/demo/truth/galaxy.toml");
  const auto p = gas::shock_problem(m, 0, 6.0, 12.0);
  const auto f = gas::solve_spiral_shock(p);
  REQUIRE(f.converged);
  std::vector<double> edges;
  for (int j = 0; j <= 16; ++j)
    edges.push_back(p.spacing * (j / 16.0 - 0.5));
  const auto b = run::steady_bins(p, f, edges);
  double mass = 0, flux = 0;
  for (std::size_t j = 0; j < 16; ++j)
    mass += b.density[j], flux += b.density[j] * b.across[j];
  // Nodes on a bin edge fall to one side or the other by rounding: 1 node in 128.
  CHECK(mass / 16 == Approx(1).epsilon(2e-3));
  CHECK(flux / mass == Approx(p.u0).epsilon(5e-3));
  CHECK(b.drop > 0);
}

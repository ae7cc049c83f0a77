// Epicycles and the linear response of cold orbits to a weak rotating perturbation
// (Binney & Tremaine 2008, §3.2.3 and §3.3.3).
#include <catch2/catch.hpp>
#include <cmath>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/orbit/integrator.hpp"
#include "undertow/potential/model_file.hpp"

using namespace undertow;
using namespace undertow::orbit;

namespace {
potential::Model demo_axisymmetric() {
  auto m =
      potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/kestrel.toml");
  m.patterns.clear();
  return m;
}

// Mean period of an oscillating signal from its upward zero crossings (linear interpolation).
double mean_period(const std::vector<double>& t, const std::vector<double>& s) {
  std::vector<double> up;
  for (std::size_t i = 1; i < s.size(); ++i)
    if (s[i - 1] < 0 && s[i] >= 0)
      up.push_back(t[i - 1] + (t[i] - t[i - 1]) * (-s[i - 1]) / (s[i] - s[i - 1]));
  REQUIRE(up.size() >= 3);
  return (up.back() - up.front()) / double(up.size() - 1);
}
} // namespace

TEST_CASE("Epicycles: a nearly circular orbit oscillates radially at kappa and vertically at nu "
          "(B&T 2008 eqs. 3.80, 3.81)",
          "[orbit][response]") {
  const auto m = demo_axisymmetric();
  const double R0 = 8.1, vc = dynamics::circular_speed(m, R0);
  PhaseSpace p;
  p.resize(1);
  p.x[0] = -R0, p.y[0] = 0, p.z[0] = 0, p.vx[0] = 0.5, p.vy[0] = vc, p.vz[0] = 0.3;
  IntegrationSettings s;
  s.method = Method::symplectic4;
  s.step_myr = 0.25;
  std::vector<double> t, vR, z;
  for (int k = 0; k < 8000; ++k) { // 2 Gyr in steps of 0.25 Myr
    REQUIRE(advance(m, p, k * 0.25, (k + 1) * 0.25, s));
    const double R = std::hypot(p.x[0], p.y[0]);
    t.push_back((k + 1) * 0.25);
    vR.push_back((p.x[0] * p.vx[0] + p.y[0] * p.vy[0]) / R);
    z.push_back(p.z[0]);
  }
  const double kappa_meas = 2 * units::pi / mean_period(t, vR) * units::time_unit_myr;
  const double nu_meas = 2 * units::pi / mean_period(t, z) * units::time_unit_myr;
  // the guiding centre of this orbit lies slightly inside R0; compare at R0 to 1e-3
  CHECK(kappa_meas == Approx(dynamics::kappa(m, R0)).epsilon(1e-3));
  CHECK(nu_meas == Approx(dynamics::nu(m, R0)).epsilon(1e-3));
}

TEST_CASE("Linear response: a cold ring in a weak rotating m = 2 potential develops v_R and "
          "v_phi perturbations of the amplitude of the epicyclic response with denominator "
          "kappa^2 - m^2 (Omega - Omega_p)^2 (B&T 2008 eqs. 3.144-3.148)",
          "[orbit][response]") {
  auto m = demo_axisymmetric();
  const double R0 = 8.0, Op = 60.0;
  // an unwound m = 2 potential (pitch 89.999 deg leaves a negligible radial phase) with an
  // exponential envelope, |Phi_b| = 0.5% of v_c^2 at R0: weak
  potential::Pattern pat;
  pat.label = "oval";
  pat.pattern_speed = Op;
  pat.phase = 0.3;
  pat.growth = {0, 3000}; // slow growth: no free epicycles are excited
  const double vc = dynamics::circular_speed(m, R0);
  const auto spiral =
      potential::LogSpiral::make(2, 89.999, R0, 5.0, 1.0, INFINITY, 0.005 * vc * vc);
  pat.shape = spiral;
  m.patterns = {pat};

  const double Om = dynamics::omega(m, R0), ka = dynamics::kappa(m, R0);
  const double t_end = 3500;
  // Phi_b(R): the pattern potential along its crest (theta = 0) at t_end, and its slope
  const double psi_p = pat.angle_at(t_end);
  const auto phib = [&](double R) {
    return m.pattern_potential(0, {-R * std::cos(psi_p), R * std::sin(psi_p), 0}, t_end);
  };
  const double h = 1e-3, pb = phib(R0), pbp = (phib(R0 + h) - phib(R0 - h)) / (2 * h);
  const double w = 2 * (Om - Op);
  const double C = -(pbp + 2 * Om * pb / (R0 * (Om - Op))) / (ka * ka - w * w);
  const double amp_vR = -C * w;                              // v_R1 = -C w sin(theta)
  const double amp_vphi = -(Om * C + pb / (R0 * (Om - Op))); // v_phi1 = amp cos(theta)

  const int N = 72;
  PhaseSpace p;
  p.resize(N);
  for (int i = 0; i < N; ++i) {
    const double psi = 2 * units::pi * i / N;
    p.id[i] = std::uint64_t(i);
    p.x[i] = -R0 * std::cos(psi), p.y[i] = R0 * std::sin(psi), p.z[i] = 0;
    p.vx[i] = vc * std::sin(psi), p.vy[i] = vc * std::cos(psi), p.vz[i] = 0;
  }
  IntegrationSettings s;
  s.method = Method::symplectic4;
  s.step_myr = 0.5;
  REQUIRE(advance(m, p, 0, t_end, s));
  // least-squares fit of v_R = a sin(theta) + b cos(theta) over the ring
  double ss = 0, sc = 0, sR = 0, cR = 0, cP = 0, sP = 0;
  for (int i = 0; i < N; ++i) {
    const double psi = std::atan2(p.y[i], -p.x[i]);
    const double th = 2 * (psi - psi_p);
    const double vR = -p.vx[i] * std::cos(psi) + p.vy[i] * std::sin(psi);
    const double vphi = p.vx[i] * std::sin(psi) + p.vy[i] * std::cos(psi) - vc;
    ss += std::sin(th) * std::sin(th), sc += std::cos(th) * std::cos(th);
    sR += vR * std::sin(th), cR += vR * std::cos(th);
    cP += vphi * std::cos(th), sP += vphi * std::sin(th);
  }
  INFO("predicted v_R amplitude " << amp_vR << ", v_phi amplitude " << amp_vphi);
  CHECK(sR / ss == Approx(amp_vR).epsilon(0.05));
  CHECK(cP / sc == Approx(amp_vphi).epsilon(0.05));
  CHECK(std::fabs(cR / sc) < 0.05 * std::fabs(amp_vR)); // in phase as predicted
  CHECK(std::fabs(amp_vR) > 0.5);                       // a response worth measuring
}

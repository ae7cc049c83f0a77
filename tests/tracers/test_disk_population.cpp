// Disk tracer populations: the sampled distributions against their analytic forms.
#include <catch2/catch.hpp>
#include <cmath>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/tracers/disk_population.hpp"
#include "undertow/tracers/random.hpp"

using namespace undertow;

namespace {
potential::Model demo() {
  auto m =
      potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/kestrel.toml");
  m.patterns.clear();
  return m;
}
double mean(const std::vector<double>& v) {
  double s = 0;
  for (double x : v)
    s += x;
  return s / double(v.size());
}
double variance(const std::vector<double>& v) {
  const double m = mean(v);
  double s = 0;
  for (double x : v)
    s += (x - m) * (x - m);
  return s / double(v.size() - 1);
}
} // namespace

TEST_CASE("Disk radii follow Sigma ~ exp(-R/R_d) between R_min and R_max: sample mean against "
          "the integral of R^2 exp(-R/R_d) over the integral of R exp(-R/R_d)",
          "[tracers]") {
  const auto m = demo();
  tracers::DiskPopulation d;
  d.count = 40000;
  d.scale_length_kpc = 3;
  d.r_min_kpc = 2;
  d.r_max_kpc = 14;
  const auto p = tracers::sample(m, d, 99, 0, d.count);
  std::vector<double> R;
  for (std::size_t i = 0; i < p.size(); ++i)
    R.push_back(std::hypot(p.x[i], p.y[i]));
  // closed-form moments of x^k e^-x: integral = -e^-x (x^2 + 2x + 2) for k = 2, -e^-x (x + 1) for k
  // = 1
  const auto m1 = [](double x) { return -std::exp(-x) * (x + 1); };
  const auto m2 = [](double x) { return -std::exp(-x) * (x * x + 2 * x + 2); };
  const double a = 2.0 / 3, b = 14.0 / 3;
  const double expect = 3 * (m2(b) - m2(a)) / (m1(b) - m1(a));
  const double err = std::sqrt(variance(R) / double(R.size()));
  CHECK(std::fabs(mean(R) - expect) < 4 * err);
  CHECK(*std::min_element(R.begin(), R.end()) >= 2.0);
  CHECK(*std::max_element(R.begin(), R.end()) <= 14.0);
}

TEST_CASE("sech^2 vertical profile: var(z) = pi^2 h^2 / 12 (the logistic distribution of scale "
          "h/2), exponential profile: var(z) = 2 h^2",
          "[tracers]") {
  const auto m = demo();
  tracers::DiskPopulation d;
  d.count = 40000;
  d.scale_height_kpc = 0.1;
  auto p = tracers::sample(m, d, 5, 0, d.count);
  const double v1 = variance(p.z);
  CHECK(v1 == Approx(units::pi * units::pi * 0.01 / 12).epsilon(0.04)); // 4 sigma for N = 4e4
  d.vertical = tracers::DiskPopulation::Vertical::exponential;
  p = tracers::sample(m, d, 5, 0, d.count);
  CHECK(variance(p.z) == Approx(2 * 0.01).epsilon(0.05));
}

TEST_CASE("Velocity dispersions: sigma_R as given, sigma_phi / sigma_R = kappa / (2 Omega) "
          "(B&T 2008 eq. 3.100), mean rotation lagging v_c by the asymmetric drift (eq. 4.228)",
          "[tracers]") {
  const auto m = demo();
  tracers::DiskPopulation d;
  d.count = 40000;
  d.r_min_kpc = 7.99;
  d.r_max_kpc = 8.01; // a narrow annulus at 8 kpc
  d.sigma_r_kms = 20;
  d.sigma_z_kms = 10;
  const auto p = tracers::sample(m, d, 3, 0, d.count);
  std::vector<double> vR, vphi, vz;
  for (std::size_t i = 0; i < p.size(); ++i) {
    const double psi = std::atan2(p.y[i], -p.x[i]);
    vR.push_back(-p.vx[i] * std::cos(psi) + p.vy[i] * std::sin(psi));
    vphi.push_back(p.vx[i] * std::sin(psi) + p.vy[i] * std::cos(psi));
    vz.push_back(p.vz[i]);
  }
  const double ratio = dynamics::kappa(m, 8) / (2 * dynamics::omega(m, 8));
  CHECK(std::sqrt(variance(vR)) == Approx(20).epsilon(0.015));
  CHECK(std::sqrt(variance(vz)) == Approx(10).epsilon(0.015));
  CHECK(std::sqrt(variance(vphi)) == Approx(20 * ratio).epsilon(0.015));
  const double vc = dynamics::circular_speed(m, 8);
  const double drift2 = 400 * (ratio * ratio - 1 + 8 / d.scale_length_kpc);
  CHECK(mean(vphi) == Approx(std::sqrt(vc * vc - drift2)).margin(4 * 20 * ratio / 200));
  CHECK(mean(vphi) < vc - 1); // a lag of about 1.9 km/s here
  CHECK(std::fabs(mean(vR)) < 4 * 20 / 200.0);
}

TEST_CASE("Cold tracers without asymmetric drift move on circular orbits", "[tracers]") {
  const auto m = demo();
  tracers::DiskPopulation d;
  d.count = 100;
  d.sigma_r_kms = 0;
  d.sigma_z_kms = 0;
  d.asymmetric_drift = false;
  const auto p = tracers::sample(m, d, 1, 0, d.count);
  for (std::size_t i = 0; i < p.size(); ++i) {
    const double R = std::hypot(p.x[i], p.y[i]);
    CHECK(std::hypot(p.vx[i], p.vy[i]) == Approx(dynamics::circular_speed(m, R)).epsilon(1e-14));
    CHECK(p.x[i] * p.vx[i] + p.y[i] * p.vy[i] == Approx(0).margin(1e-9));
    // rotation is clockwise seen from the north pole: L_z = x vy - y vx < 0
    CHECK(p.x[i] * p.vy[i] - p.y[i] * p.vx[i] < 0);
  }
}

TEST_CASE("A tracer's initial conditions depend only on (seed, id): the same whatever range "
          "it is made in",
          "[tracers]") {
  const auto m = demo();
  tracers::DiskPopulation d;
  d.count = 50;
  const auto all = tracers::sample(m, d, 42, 0, 50);
  const auto part = tracers::sample(m, d, 42, 17, 9);
  for (std::size_t k = 0; k < 9; ++k) {
    CHECK(part.id[k] == 17 + k);
    CHECK(part.x[k] == all.x[17 + k]);
    CHECK(part.vy[k] == all.vy[17 + k]);
  }
  const auto other = tracers::sample(m, d, 43, 0, 50);
  CHECK(other.x[0] != all.x[0]);
}

TEST_CASE("Tracer streams: uniform draws have mean 1/2 and variance 1/12 (common practice)",
          "[tracers]") {
  tracers::TracerStream s(1, 2);
  std::vector<double> u;
  for (int i = 0; i < 100000; ++i)
    u.push_back(s.uniform());
  CHECK(mean(u) == Approx(0.5).margin(4 * std::sqrt(1.0 / 12 / 1e5)));
  CHECK(variance(u) == Approx(1.0 / 12).epsilon(0.01));
  CHECK(*std::min_element(u.begin(), u.end()) > 0);
  CHECK(*std::max_element(u.begin(), u.end()) < 1);
}

TEST_CASE("Bad disk parameters are refused, naming the key", "[tracers]") {
  tracers::DiskPopulation d;
  d.count = 10;
  d.r_max_kpc = 2; // below r_min
  CHECK_THROWS_WITH(d.validate(), Catch::Contains("must exceed r_min_kpc"));
  d = {};
  d.count = 10;
  d.scale_height_kpc = -1;
  try {
    d.validate();
    FAIL("no error");
  } catch (const detail::ParameterError& e) {
    CHECK(e.key == "scale_height_kpc");
  }
}

// Mock observations: selection, errors, young-source weights, and the round trip through the
// same residual code as measured catalogs.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>

#include "undertow/observe/observation.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/residuals/peculiar.hpp"
#include "undertow/residuals/summary.hpp"
#include "undertow/units.hpp"

using namespace undertow;

namespace {

// Tracers near the Sun on circular orbits of a flat curve plus a peculiar motion drawn around
// (U, V, W) = (0, vlag, 0) with dispersion sig.
io::Snapshot tracers_with_lag(std::size_t n, double vlag, double sig, double theta, unsigned seed,
                              double dmax = 6) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(-1, 1);
  std::normal_distribution<double> g(0, sig);
  io::Snapshot s;
  s.time_myr = 1000;
  s.tracers.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    double x, y;
    do {
      x = dmax * u(rng), y = dmax * u(rng);
    } while (x * x + y * y > dmax * dmax);
    x -= 8.1;
    const double z = 0.05 * u(rng), R = std::hypot(x, y), psi = std::atan2(y, -x);
    const double vR = g(rng), vphi = theta + vlag + g(rng), vz = g(rng);
    s.tracers.id[i] = i;
    s.tracers.x[i] = x, s.tracers.y[i] = y, s.tracers.z[i] = z;
    // e_R = (-cos psi, sin psi) points outward; U (toward the centre) = -v_R
    s.tracers.vx[i] = -vR * std::cos(psi) + vphi * std::sin(psi);
    s.tracers.vy[i] = vR * std::sin(psi) + vphi * std::cos(psi);
    s.tracers.vz[i] = vz;
    (void)R;
  }
  s.birth_time_myr.assign(n, 0);
  s.flags.assign(n, 0);
  return s;
}

double true_distance(const residuals::Source& s, double frac) {
  return frac / s.parallax_err_mas;
}

observe::ObservationSettings base_settings() {
  observe::ObservationSettings s;
  s.sun.r0_kpc = 8.1;
  s.sun.theta0_kms = 230;
  s.errors.kind = observe::ErrorModel::Kind::fractional;
  s.errors.parallax_fraction = 0.01;
  s.errors.pm_masyr = 0.01;
  s.errors.vlsr_kms = 1;
  return s;
}

residuals::ResidualSettings residual_settings(const observe::ObservationSettings& o) {
  residuals::ResidualSettings r;
  r.sun = o.sun;
  r.rotation.kind = residuals::RotationCurve::Kind::flat;
  r.rotation.theta0_kms = 230;
  r.draws = 20;
  return r;
}

} // namespace

TEST_CASE("The selection is applied: distance range, |b|, declination limits, the parallax "
          "signal-to-noise limit and the maximum number",
          "[observe]") {
  const auto snap = tracers_with_lag(20000, -5, 10, 230, 1);
  auto s = base_settings();
  s.selection.distance_min_kpc = 0.5;
  s.selection.distance_max_kpc = 4;
  s.selection.latitude_max_deg = 0.5;
  s.selection.dec_min_deg = -30;
  s.selection.parallax_snr_min = 60;
  s.errors.parallax_fraction = 0.02; // SNR ~ 50 +- 1: most fail the cut
  s.selection.max_sources = 300;
  const auto m = observe::observe(snap, {}, s);
  CHECK(m.catalog.sources.size() <= 300);
  CHECK(m.rejected_snr > 0);
  for (const auto& src : m.catalog.sources) {
    CHECK(src.dec_deg >= -30);
    double l, b;
    sky::icrs_to_galactic(src.ra_deg * units::deg, src.dec_deg * units::deg, l, b);
    CHECK(std::fabs(b) / units::deg <= 0.5 + 1e-12);
    CHECK(src.parallax_mas / src.parallax_err_mas >= 60);
    CHECK(1 / (src.parallax_err_mas / 0.02) <= 4 + 1e-9); // true distance from the error model
  }
}

TEST_CASE("A mock catalog passes the measured-catalog validation and its residuals recover the "
          "injected mean lag V_s = -7 km/s within the bootstrap error (small errors)",
          "[observe]") {
  const auto snap = tracers_with_lag(30000, -7, 8, 230, 2);
  auto s = base_settings();
  s.selection.max_sources = 400;
  const auto m = observe::observe(snap, {}, s);
  REQUIRE(m.catalog.sources.size() == 400);
  const std::string path = "/tmp/undertow-mock-test.csv";
  residuals::write_catalog(path, m.catalog);
  const auto back = residuals::read_catalog(path); // the same strict reader
  REQUIRE(back.sources.size() == 400);
  const auto res = residuals::compute_residuals(back, residual_settings(s));
  const auto sum = residuals::summarise(res, 400, 3);
  INFO("mean V_s " << sum[0].mean[1] << " +- " << sum[0].mean_err[1]);
  CHECK(std::fabs(sum[0].mean[1] + 7) < 3 * sum[0].mean_err[1]);
  CHECK(std::fabs(sum[0].mean[0]) < 3 * sum[0].mean_err[0]);
}

TEST_CASE("With 10-20% parallax errors 1/parallax biases the mean V_s, the posterior median "
          "with the exponentially decreasing space density prior, its length scale matched to "
          "the sample (mean distance = 3L, Bailer-Jones 2015), removes most of the bias, and "
          "its mode less",
          "[observe]") {
  // A maser-like survey: the first Galactic quadrant, 2-9 kpc from the Sun.
  const auto snap = tracers_with_lag(200000, -7, 8, 230, 4, 9);
  auto s = base_settings();
  s.errors.parallax_fraction = 0.2;
  s.errors.pm_masyr = 0.005;
  s.selection.max_sources = 3000;
  s.selection.distance_min_kpc = 2;
  s.selection.distance_max_kpc = 9;
  s.selection.dec_min_deg = -20; // l from about 10 to 90 deg in the plane
  s.selection.latitude_max_deg = 1;
  const auto m = observe::observe(snap, {}, s);
  REQUIRE(m.catalog.sources.size() == 3000);
  double dmean = 0;
  for (const auto& src : m.catalog.sources)
    dmean += true_distance(src, 0.2);
  dmean /= 3000;
  auto rs = residual_settings(s);
  rs.draws = 2;
  const auto inv = residuals::summarise(residuals::compute_residuals(m.catalog, rs), 200, 1)[0];
  rs.distance = residuals::ResidualSettings::Distance::edsd;
  rs.edsd_length_kpc = dmean / 3;
  const auto eds = residuals::summarise(residuals::compute_residuals(m.catalog, rs), 200, 1)[0];
  rs.distance = residuals::ResidualSettings::Distance::edsd_median;
  const auto med = residuals::summarise(residuals::compute_residuals(m.catalog, rs), 200, 1)[0];
  INFO("edsd median: " << med.mean[1] << " +- " << med.mean_err[1]);
  INFO("mean distance " << dmean << " kpc; 1/parallax: " << inv.mean[1] << " +- " << inv.mean_err[1]
                        << "; edsd: " << eds.mean[1] << " +- " << eds.mean_err[1]);
  CHECK(std::fabs(inv.mean[1] + 7) > 4 * inv.mean_err[1]); // a bias, many sigma
  CHECK(std::fabs(med.mean[1] + 7) < 0.5 * std::fabs(inv.mean[1] + 7));
  CHECK(std::fabs(eds.mean[1] + 7) < std::fabs(inv.mean[1] + 7));
}

TEST_CASE("Young-source weights in model-density mode: the mean over the age window of the "
          "patterns' density contrast (1 + rho_patterns / rho_axisymmetric) to the power n - 1",
          "[observe]") {
  const auto model =
      potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/kestrel.toml");
  REQUIRE(!model.patterns.empty());
  auto a = tracers_with_lag(50, 0, 5, 230, 5);
  auto b = a;
  a.time_myr = 960;
  b.time_myr = 1000;
  for (auto& x : b.tracers.x)
    x += 0.01;
  const auto contrast = [&](const io::Snapshot& s, std::size_t i) {
    const potential::Vec3 r{s.tracers.x[i], s.tracers.y[i], s.tracers.z[i]};
    double arms = 0;
    for (std::size_t q = 0; q < model.patterns.size(); ++q)
      arms += model.pattern_density(q, r, s.time_myr);
    return 1 + arms / model.axisymmetric_density(r);
  };
  observe::YoungWeights y;
  y.exponent = 1.4, y.age_window_myr = 50;
  const auto w = observe::young_weights(model, {a, b}, y);
  double spread = 0;
  for (std::size_t i = 0; i < 50; ++i) {
    CHECK(w[i] == Approx(0.5 * (std::pow(contrast(a, i), 0.4) + std::pow(contrast(b, i), 0.4)))
                      .epsilon(1e-12));
    spread = std::max(spread, std::fabs(w[i] - 1));
  }
  CHECK(spread > 1e-3);  // the arms matter
  CHECK(spread < 1);     // and no radial gradient of the whole galaxy's density
  y.age_window_myr = 10; // only the last snapshot
  const auto w1 = observe::young_weights(model, {a, b}, y);
  CHECK(w1[0] == Approx(std::pow(contrast(b, 0), 0.4)));
}

TEST_CASE("Young sources from a gas run's stars: weight 1 for stars in the age window, 0 for "
          "clouds and other stars, and a window that selects nothing or a snapshot without stars is "
          "an error",
          "[observe]") {
  const auto model =
      potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/kestrel.toml");
  auto s = tracers_with_lag(6, 0, 5, 230, 5);
  s.time_myr = 500;
  s.flags = {0, 0, io::kFlagStar, io::kFlagStar, io::kFlagStar, io::kFlagStar};
  s.birth_time_myr = {0, 0, 499, 495, 480, 430};
  observe::YoungWeights y;
  y.star_age_myr = std::array<double, 2>{0, 20};
  CHECK(observe::young_weights(model, {s}, y) == std::vector<double>{0, 0, 1, 1, 1, 0});
  y.star_age_myr = std::array<double, 2>{30, 40};
  CHECK_THROWS_WITH(observe::young_weights(model, {s}, y),
                    Catch::Contains("no star") && Catch::Contains("from 1 to 70 Myr"));
  s.flags.assign(6, 0);
  CHECK_THROWS_WITH(observe::young_weights(model, {s}, y), Catch::Contains("holds no stars"));
}

TEST_CASE("Weighted selection picks tracers in proportion to their weights (Efraimidis & "
          "Spirakis 2006)",
          "[observe]") {
  const auto snap = tracers_with_lag(40000, 0, 5, 230, 6);
  auto s = base_settings();
  s.selection.max_sources = 1000;
  std::vector<double> w(40000);
  for (std::size_t i = 0; i < w.size(); ++i)
    w[i] = i % 2 ? 3.0 : 1.0;
  const auto m = observe::observe(snap, w, s);
  std::size_t heavy = 0;
  for (auto id : m.tracer_ids)
    heavy += id % 2;
  // sampling 2.5% without replacement: the share of the heavy half is 3/4 up to O(2.5%)
  CHECK(double(heavy) / 1000 == Approx(0.75).margin(0.04));
}

TEST_CASE("Young-source weights from the tracers' own surface density: the count in a tracer's "
          "cell per kpc^2 to the power n - 1, so young sources crowd as Sigma^n (a Schmidt law, "
          "Kennicutt 1998, ApJ 498, 541)",
          "[observe]") {
  const auto model =
      potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/kestrel.toml");
  io::Snapshot s;
  s.time_myr = 100;
  s.tracers.resize(5);
  const double xs[] = {-8.01, -8.02, -8.03, -8.04, -6.01}, ys[] = {0.01, 0.02, 0.03, 0.04, 0.01};
  for (std::size_t i = 0; i < 5; ++i)
    s.tracers.id[i] = i, s.tracers.x[i] = xs[i], s.tracers.y[i] = ys[i];
  observe::YoungWeights y;
  y.density = observe::YoungWeights::Density::tracers;
  y.cell_kpc = 0.25;
  y.exponent = 1.5;
  y.age_window_myr = 0;
  const auto w = observe::young_weights(model, {s}, y);
  CHECK(w[0] == Approx(std::pow(4 / 0.0625, 0.5)));
  CHECK(w[4] == Approx(std::pow(1 / 0.0625, 0.5)));
  // four tracers of weight w[0] against one of weight w[4]: young sources in proportion 4^1.5
  CHECK(4 * w[0] / w[4] == Approx(std::pow(4.0, 1.5)));
}

TEST_CASE("Selection on the observed parallax: every mock source's measured parallax lies in the "
          "range, and sources whose true parallax lies outside it get in through their errors, as "
          "in a real survey (definition of a selection on a measured quantity)",
          "[observe]") {
  const auto snap = tracers_with_lag(20000, -5, 10, 230, 3);
  auto s = base_settings();
  s.errors.kind = observe::ErrorModel::Kind::fixed;
  s.errors.parallax_mas = 0.05;
  s.selection.parallax_min_mas = 0.25; // 1/parallax at most 4 kpc
  s.selection.parallax_max_mas = 1.0;  // at least 1 kpc
  const auto m = observe::observe(snap, {}, s);
  REQUIRE(m.catalog.sources.size() > 1000);
  CHECK(m.rejected_parallax > 0);
  int outside_truly = 0;
  for (std::size_t i = 0; i < m.catalog.sources.size(); ++i) {
    const auto& src = m.catalog.sources[i];
    CHECK(src.parallax_mas >= 0.25);
    CHECK(src.parallax_mas <= 1.0);
    const std::size_t k = std::size_t(m.tracer_ids[i]);
    sky::Observed o;
    const double d =
        sky::from_galactocentric({{snap.tracers.x[k], snap.tracers.y[k], snap.tracers.z[k]},
                                  {snap.tracers.vx[k], snap.tracers.vy[k], snap.tracers.vz[k]}},
                                 s.sun, o);
    outside_truly += 1 / d < 0.25 || 1 / d > 1.0;
  }
  INFO(outside_truly << " of " << m.catalog.sources.size() << " have a true parallax outside");
  CHECK(outside_truly > 20);
}

// The verdict in the space of the measurements: calibration by injection over many random
// catalogs, the cold-model artefact, and the Laplace marginalisation of the Sun's velocity.
#include <catch2/catch.hpp>
#include <cmath>

#include "support/velocity_field.hpp"
#include "undertow/compare/realisations.hpp"
#include "undertow/compare/verdict.hpp"
#include "undertow/detail/log_sum_exp.hpp"
#include "undertow/fit/quadrature.hpp"

using namespace undertow;
using namespace undertow::compare;

namespace {
RealisationSummary judge_realisations(const residuals::Catalog& c, const test::VelocityField& m,
                                      std::size_t count, std::uint64_t seed0, int k,
                                      const VerdictSettings& s) {
  std::vector<double> totals;
  std::vector<std::vector<double>> per;
  std::vector<std::string> names;
  for (int r = 0; r < k; ++r) {
    const auto v = judge(c, test::realise(m, count, seed0 + std::uint64_t(r)), s);
    totals.push_back(v.log_likelihood), per.push_back(v.source_log_likelihood), names = v.names;
  }
  return summarise_realisations(totals, per, names);
}
} // namespace

TEST_CASE("Verdict calibration by injection: the true lagging model beats a circular one "
          "significantly, and against its own other realisations |Delta ln L| stays within "
          "twice its quoted uncertainty in at least 90 % of 20 catalogs",
          "[compare][verdict]") {
  const test::VelocityField lagging{230, -8, 10, 8, 5}, circular{230, 0, 10, 8, 5};
  const auto s = test::field_settings();
  int within = 0, significant = 0;
  const int trials = 20;
  for (int t = 0; t < trials; ++t) {
    const auto truth = test::realise(lagging, 20000, 1000 + std::uint64_t(t));
    const auto cat = test::measure(truth, 150, 2000 + std::uint64_t(t));
    const auto a1 = judge_realisations(cat, lagging, 20000, 3000 + 10 * std::uint64_t(t), 3, s);
    const auto a2 = judge_realisations(cat, lagging, 20000, 5000 + 10 * std::uint64_t(t), 3, s);
    const auto d = difference(a1, a2);
    within += std::fabs(d.delta) <= 2 * d.sigma;
    if (t < 5) {
      const auto b = judge_realisations(cat, circular, 20000, 7000 + 10 * std::uint64_t(t), 3, s);
      const auto db = difference(a1, b);
      INFO("trial " << t << ": Delta ln L(circular - lagging) = " << db.delta << " +- "
                    << db.sigma);
      significant += db.delta < 0 && db.distinguished;
    }
  }
  INFO(within << " of " << trials << " within 2 sigma");
  CHECK(within >= 18);
  CHECK(significant == 5);
}

TEST_CASE("The cold-model artefact is gone: with the intrinsic floor marginalised, two cold "
          "models differing only in their dispersion (1 and 3 km/s) give the same verdict "
          "within its uncertainty, and a cold lagging model does not beat the warm truth",
          "[compare][verdict]") {
  const test::VelocityField warm{230, 0, 12, 9, 6}, cold1{230, 0, 1, 1, 1}, cold3{230, 0, 3, 3, 3},
      cold_lag{230, -10, 1, 1, 1};
  auto s = test::field_settings();
  s.floor_max_kms = 20;
  const auto cat = test::measure(test::realise(warm, 20000, 11), 200, 12);
  const auto w = judge_realisations(cat, warm, 20000, 100, 3, s);
  const auto c1 = judge_realisations(cat, cold1, 20000, 200, 3, s);
  const auto c3 = judge_realisations(cat, cold3, 20000, 300, 3, s);
  const auto cl = judge_realisations(cat, cold_lag, 20000, 400, 3, s);
  const auto d13 = difference(c1, c3);
  INFO("cold 3 - cold 1: " << d13.delta << " +- " << d13.sigma);
  CHECK(std::fabs(d13.delta) < 2 * d13.sigma + 2); // both rest on the floor
  const auto dl = difference(w, cl);
  INFO("cold lagging - warm truth: " << dl.delta << " +- " << dl.sigma);
  CHECK(dl.delta < 0);
  CHECK(dl.distinguished);
  // with the floor fixed at 0 the old artefact returns: the cold models are crushed
  s.floor_max_kms = 0;
  CHECK(judge(cat, test::realise(cold1, 20000, 200), s).log_likelihood < w.mean - 1000);
}

TEST_CASE("The Sun's velocity marginalised by Laplace's method agrees with a 7^3-point "
          "Gauss-Hermite integral over its Gaussian prior (Abramowitz & Stegun 1964, 25.4.46) "
          "to 0.05 in ln Z",
          "[compare][verdict]") {
  const test::VelocityField m{230, -5, 10, 8, 5};
  const auto sim = test::realise(m, 5000, 21);
  const auto cat = test::measure(test::realise(m, 5000, 22), 30, 23);
  auto s = test::field_settings();
  s.floor_min_kms = s.floor_max_kms = 3; // one value: the integral is over the Sun alone
  s.marginalise_sun = true;
  s.sun_velocity_cov = Eigen::Matrix3d::Identity() * 1.5 * 1.5;
  const auto lap = judge(cat, sim, s);
  // Gauss-Hermite nodes for weight exp(-x^2), 7 points (A&S Table 25.10, from memory; checked
  // below: the rule integrates x^2 and x^4 exactly)
  const double x[7] = {-2.651961356835233, -1.673551628767471, -0.816287882858965, 0,
                       0.816287882858965,  1.673551628767471,  2.651961356835233};
  const double w[7] = {0.000971781245099519, 0.05451558281912703, 0.4256072526101278,
                       0.8102646175568073,   0.4256072526101278,  0.05451558281912703,
                       0.000971781245099519};
  double s0 = 0, s2 = 0, s4 = 0;
  for (int i = 0; i < 7; ++i)
    s0 += w[i], s2 += w[i] * x[i] * x[i], s4 += w[i] * std::pow(x[i], 4);
  REQUIRE(s0 == Approx(std::sqrt(M_PI)).epsilon(1e-12));
  REQUIRE(s2 == Approx(std::sqrt(M_PI) / 2).epsilon(1e-12));
  REQUIRE(s4 == Approx(3 * std::sqrt(M_PI) / 4).epsilon(1e-12));
  auto fixed = s;
  fixed.marginalise_sun = false;
  std::vector<double> terms;
  const Eigen::Vector3d m0 = s.sun_velocity_kms;
  for (int a = 0; a < 7; ++a)
    for (int b = 0; b < 7; ++b)
      for (int c = 0; c < 7; ++c) {
        fixed.sun_velocity_kms = m0 + std::sqrt(2.0) * 1.5 * Eigen::Vector3d(x[a], x[b], x[c]);
        terms.push_back(judge(cat, sim, fixed).log_likelihood +
                        std::log(w[a] * w[b] * w[c] / std::pow(M_PI, 1.5)));
      }
  const double ln_z = detail::log_sum_exp(terms);
  INFO("Laplace " << lap.log_likelihood << ", Gauss-Hermite " << ln_z);
  CHECK(lap.log_likelihood == Approx(ln_z).margin(0.05));
}

TEST_CASE("Robust tails: sources the model cannot hold (v_LSR off by 120 km/s) cost far less under "
          "a t with 4 degrees of freedom than under the predictive t, and the true model still "
          "wins",
          "[compare][verdict]") {
  const test::VelocityField lagging{230, -8, 10, 8, 5}, circular{230, 0, 10, 8, 5};
  auto cat = test::measure(test::realise(lagging, 20000, 31), 200, 32);
  std::vector<std::size_t> bad;
  for (std::size_t i = 0; i < cat.sources.size(); i += 10)
    cat.sources[i].vlsr_kms += 120, bad.push_back(i);
  auto s = test::field_settings();
  const auto sim = test::realise(lagging, 20000, 33);
  const auto student = judge(cat, sim, s);
  s.tails = VerdictSettings::Tails::robust;
  const auto robust = judge(cat, sim, s);
  double gain = 0;
  for (auto i : bad)
    gain += robust.source_log_likelihood[i] - student.source_log_likelihood[i];
  gain /= double(bad.size());
  INFO("mean ln p gain of the outliers under robust tails: " << gain);
  CHECK(gain > 10);
  const auto a = judge_realisations(cat, lagging, 20000, 40, 3, s);
  const auto b = judge_realisations(cat, circular, 20000, 50, 3, s);
  const auto d = difference(a, b);
  INFO("robust: circular - lagging = " << d.delta << " +- " << d.sigma);
  CHECK(d.delta < 0);
  CHECK(d.distinguished);
}

TEST_CASE("R0 marginalised by 5-point Gauss-Hermite quadrature agrees with a 61-point trapezoid "
          "over its Gaussian prior (+-5 sigma) to 0.2 in ln L, and a vanishing R0 error gives "
          "the fixed-R0 verdict",
          "[compare][verdict]") {
  const test::VelocityField m{230, -5, 10, 8, 5};
  const auto sim = test::realise(m, 5000, 61);
  const auto cat = test::measure(test::realise(m, 5000, 62), 30, 63);
  auto s = test::field_settings();
  s.floor_min_kms = s.floor_max_kms = 3;
  const double fixed = judge(cat, sim, s).log_likelihood;
  auto r = s;
  r.marginalise_r0 = true;
  r.r0_err_kpc = 1e-6;
  CHECK(judge(cat, sim, r).log_likelihood == Approx(fixed).margin(1e-4));
  r.r0_err_kpc = 0.3;
  const auto gh = judge(cat, sim, r);
  std::vector<double> terms;
  const int n = 61;
  for (int i = 0; i < n; ++i) {
    const double x = -5 + 10.0 * i / (n - 1); // in units of sigma
    auto f = s;
    f.r0_kpc = s.r0_kpc + 0.3 * x;
    const double w = (i == 0 || i == n - 1 ? 0.5 : 1.0) * (10.0 / (n - 1));
    terms.push_back(judge(cat, sim, f).log_likelihood - 0.5 * x * x - 0.5 * std::log(2 * M_PI) +
                    std::log(w));
  }
  const double ln_z = detail::log_sum_exp(terms);
  INFO("Gauss-Hermite " << gh.log_likelihood << ", trapezoid " << ln_z);
  CHECK(gh.log_likelihood == Approx(ln_z).margin(0.2));
}

// Two-sample statistics against identities of their distributions and their null hypotheses.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>

#include "undertow/compare/statistics.hpp"

using namespace undertow::compare;

namespace {
std::vector<double> normal_sample(std::mt19937_64& rng, std::size_t n, double mu = 0,
                                  double s = 1) {
  std::normal_distribution<double> g(mu, s);
  std::vector<double> v(n);
  for (auto& x : v)
    x = g(rng);
  return v;
}
} // namespace

TEST_CASE("Median and robust dispersion: 1.4826 MAD estimates sigma of a Gaussian (common "
          "practice)",
          "[compare]") {
  CHECK(median({4, 1, 3, 2}) == 2.5);
  CHECK(median({5, 1, 3}) == 3);
  std::mt19937_64 rng(1);
  CHECK(robust_dispersion(normal_sample(rng, 200000, 3, 2.5)) == Approx(2.5).epsilon(0.01));
}

TEST_CASE("Kolmogorov's Q agrees with its theta-function form "
          "1 - sqrt(2 pi)/lambda sum exp(-(2k-1)^2 pi^2 / (8 lambda^2)) and gives the usual "
          "critical values 1.224, 1.358, 1.628 at 10%, 5%, 1% (common practice)",
          "[compare]") {
  for (double lam = 0.3; lam <= 3.0; lam += 0.05) {
    double s = 0;
    for (int k = 1; k <= 50; ++k)
      s += std::exp(-(2.0 * k - 1) * (2.0 * k - 1) * M_PI * M_PI / (8 * lam * lam));
    CHECK(kolmogorov_q(lam) == Approx(1 - std::sqrt(2 * M_PI) / lam * s).margin(1e-12));
  }
  CHECK(kolmogorov_q(1.224) == Approx(0.10).margin(0.001));
  CHECK(kolmogorov_q(1.358) == Approx(0.05).margin(0.001));
  CHECK(kolmogorov_q(1.628) == Approx(0.01).margin(0.0005));
}

TEST_CASE("KS two-sample: D for disjoint samples is 1, a sample against itself gives D = 0 "
          "and p = 1, and under the null hypothesis p < 0.05 one time in twenty (definition of "
          "the p-value)",
          "[compare]") {
  CHECK(ks_two_sample({1, 2, 3}, {4, 5, 6}).statistic == 1.0);
  std::mt19937_64 rng(2);
  const auto a = normal_sample(rng, 150);
  const auto self = ks_two_sample(a, a);
  CHECK(self.statistic == 0.0);
  CHECK(self.p_value == 1.0);
  int low = 0;
  const int trials = 3000;
  for (int t = 0; t < trials; ++t)
    low += ks_two_sample(normal_sample(rng, 100), normal_sample(rng, 130)).p_value < 0.05;
  // binomial error sqrt(0.05 * 0.95 / 3000) = 0.004; the asymptotic p is slightly conservative
  CHECK(double(low) / trials == Approx(0.05).margin(0.015));
  CHECK(ks_two_sample(normal_sample(rng, 200), normal_sample(rng, 200, 0.5)).p_value < 1e-3);
}

TEST_CASE("Anderson-Darling k-sample (Scholz & Stephens 1987): under the null hypothesis A^2 "
          "has mean k - 1 and the variance of their eq. 4, and p < 0.05 one time in twenty",
          "[compare]") {
  std::mt19937_64 rng(3);
  const int trials = 3000;
  double sum = 0, sum2 = 0;
  int low5 = 0;
  double var = 0;
  for (int t = 0; t < trials; ++t) {
    const std::vector<std::vector<double>> s{normal_sample(rng, 30), normal_sample(rng, 45)};
    const double a2 = anderson_darling_a2(s);
    sum += a2, sum2 += a2 * a2;
    var = anderson_darling_variance(s);
    low5 += anderson_darling(s).p_value < 0.05;
  }
  const double mean = sum / trials, v = sum2 / trials - mean * mean;
  CHECK(mean == Approx(1.0).margin(4 * std::sqrt(var / trials)));
  CHECK(v == Approx(var).epsilon(0.1));
  CHECK(double(low5) / trials == Approx(0.05).margin(0.015));
  // three samples: mean 2
  double s3 = 0;
  for (int t = 0; t < 1000; ++t)
    s3 += anderson_darling_a2(
        {normal_sample(rng, 25), normal_sample(rng, 30), normal_sample(rng, 35)});
  CHECK(s3 / 1000 == Approx(2.0).margin(0.12));
}

TEST_CASE("Anderson-Darling: a sample against itself has A^2 = 0 and p = 1 (ties handled by "
          "midranks), shifted samples give a small p, the interpolation passes through the "
          "critical values",
          "[compare]") {
  std::mt19937_64 rng(4);
  const auto a = normal_sample(rng, 80);
  CHECK(anderson_darling_a2({a, a}) == Approx(0).margin(1e-12));
  CHECK(anderson_darling({a, a}).p_value == 1.0);
  CHECK(anderson_darling({normal_sample(rng, 100), normal_sample(rng, 100, 0.8)}).p_value <= 0.001);
  const auto r = anderson_darling({normal_sample(rng, 100), normal_sample(rng, 100, 0.3)});
  CHECK(r.p_value > 0.0);
  CHECK(r.p_value <= 0.25);
  CHECK_THROWS(anderson_darling({a}));
}

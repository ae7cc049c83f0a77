// The posterior from a sweep: interval coverage by injection over many random "catalogs", edge
// refusal, and the Latin-hypercube form against the closed form of a Gaussian likelihood.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>

#include "undertow/error.hpp"
#include "undertow/sweep/posterior.hpp"

using namespace undertow;
using namespace undertow::sweep;

namespace {
// A grid over [0, 10] x [0, 10] with a Gaussian ln L around an estimate (sigmas s1, s2) plus
// realisation noise of sd e per point (known).
std::vector<PosteriorPoint> gaussian_grid(double m1, double m2, double s1, double s2, double e,
                                          std::mt19937_64& rng) {
  std::normal_distribution<double> g(0, 1);
  std::vector<PosteriorPoint> pts;
  for (int a = 0; a <= 20; ++a)
    for (int b = 0; b <= 10; ++b) {
      const double x = 0.5 * a, y = 1.0 * b;
      PosteriorPoint p;
      p.values = {x, y};
      p.log_likelihood = -0.5 * (std::pow((x - m1) / s1, 2) + std::pow((y - m2) / s2, 2)) +
                         e * g(rng);
      p.error = e;
      pts.push_back(p);
    }
  return pts;
}
} // namespace

TEST_CASE("Sweep posterior: over 60 injections on a grid the 68 % and 95 % intervals cover the "
          "truth at their nominal rates within binomial errors (definition of a credible "
          "interval under a uniform prior)",
          "[sweep][posterior]") {
  std::mt19937_64 rng(42);
  std::uniform_real_distribution<double> u(3, 7);
  std::normal_distribution<double> g(0, 1);
  const int trials = 60;
  int c68[2] = {0, 0}, c95[2] = {0, 0};
  for (int t = 0; t < trials; ++t) {
    const double t1 = u(rng), t2 = u(rng);
    const double s1 = 1.0, s2 = 1.5;
    // the catalog's estimate scatters about the truth by the likelihood's width
    const auto pts = gaussian_grid(t1 + s1 * g(rng), t2 + s2 * g(rng), s1, s2, 0.3, rng);
    PosteriorOptions o;
    o.seed = std::uint64_t(t + 1);
    o.edge_mass = 0.5; // coverage is about the intervals; edges are tested below
    const auto post = sweep_posterior({"a", "b"}, {"", ""}, pts, o);
    const double truth[2] = {t1, t2};
    for (int j = 0; j < 2; ++j) {
      const auto& p = post.parameters[std::size_t(j)];
      c68[j] += truth[j] >= p.lo68 && truth[j] <= p.hi68;
      c95[j] += truth[j] >= p.lo95 && truth[j] <= p.hi95;
    }
  }
  const double sd68 = std::sqrt(0.68 * 0.32 / trials), sd95 = std::sqrt(0.95 * 0.05 / trials);
  for (int j = 0; j < 2; ++j) {
    INFO("parameter " << j << ": 68 % covers " << c68[j] << ", 95 % covers " << c95[j] << " of "
                      << trials);
    CHECK(std::fabs(double(c68[j]) / trials - 0.68) < 2.5 * sd68);
    CHECK(std::fabs(double(c95[j]) / trials - 0.95) < 2.5 * sd95 + 0.02);
  }
}

TEST_CASE("Sweep posterior: mass at a grid edge is refused with the direction to extend, and a "
          "one-value parameter and a single point are refused",
          "[sweep][posterior]") {
  std::mt19937_64 rng(7);
  const auto high = gaussian_grid(9.8, 5, 1, 1.5, 0, rng);
  CHECK_THROWS_WITH(sweep_posterior({"pattern_speed_kms_kpc", "b"}, {}, high, {}),
                    Catch::Contains("upper edge of 'pattern_speed_kms_kpc'") &&
                        Catch::Contains("extend the grid above 10"));
  const auto low = gaussian_grid(5, 0.2, 1, 1.5, 0, rng);
  CHECK_THROWS_WITH(sweep_posterior({"a", "force_ratio"}, {}, low, {}),
                    Catch::Contains("extend the grid below 0"));
  auto one = gaussian_grid(5, 5, 1, 1.5, 0, rng);
  for (auto& p : one)
    p.values[1] = 3;
  CHECK_THROWS_WITH(sweep_posterior({"a", "b"}, {}, one, {}), Catch::Contains("'b' takes one value"));
  CHECK_THROWS_AS(sweep_posterior({"a"}, {}, {PosteriorPoint{{1.0}, -3, 0}}, {}), InputError);
  // an interior peak passes, and its best point is the nearest grid point
  const auto mid = gaussian_grid(5.1, 4.9, 1, 1.5, 0, rng);
  const auto post = sweep_posterior({"a", "b"}, {}, mid, {});
  CHECK(post.parameters[0].best == 5.0);
  CHECK(post.parameters[1].best == 5.0);
  CHECK_FALSE(post.noise_known);
}

TEST_CASE("Sweep posterior on a Latin hypercube: 8000 uniform points reproduce the median and "
          "the 68 % interval of a Gaussian likelihood (mu +- sigma, closed form) to 0.2 sigma",
          "[sweep][posterior]") {
  std::mt19937_64 rng(3);
  std::uniform_real_distribution<double> u(0, 10);
  std::vector<PosteriorPoint> pts;
  for (int i = 0; i < 8000; ++i) {
    PosteriorPoint p;
    p.values = {u(rng), u(rng)};
    p.log_likelihood =
        -0.5 * (std::pow((p.values[0] - 4.2) / 0.8, 2) + std::pow((p.values[1] - 6) / 1.2, 2));
    pts.push_back(p);
  }
  PosteriorOptions o;
  o.grid = false;
  const auto post = sweep_posterior({"a", "b"}, {}, pts, o);
  const auto& a = post.parameters[0];
  CHECK(a.median == Approx(4.2).margin(0.15));
  CHECK(a.lo68 == Approx(3.4).margin(0.15));
  CHECK(a.hi68 == Approx(5.0).margin(0.15));
  CHECK(post.parameters[1].median == Approx(6).margin(0.2));
}

TEST_CASE("Sweep posterior: an uneven (geometric) grid still means a uniform prior over the swept "
          "box, so a flat likelihood puts the median at the middle of the box (definition of the "
          "uniform prior), and a two-value grid is refused",
          "[sweep][posterior]") {
  std::vector<PosteriorPoint> pts;
  for (double a : {1.0, 2.0, 4.0, 8.0, 16.0})
    for (double b : {0.0, 1.0, 2.0})
      pts.push_back({{a, b}, 0.0, 0.0});
  PosteriorOptions o;
  o.edge_mass = 1; // a flat likelihood fills the edges: not what this test is about
  const auto post = sweep_posterior({"a", "b"}, {}, pts, o);
  // cells of a: [0.5, 1.5, 3, 6, 12, 20]: the box is 0.5 to 20 kpc, its middle 10.25
  CHECK(post.parameters[0].median == Approx(10.25).epsilon(1e-12));
  CHECK(post.parameters[1].median == Approx(1.0).epsilon(1e-12));
  std::vector<PosteriorPoint> two;
  for (double a : {1.0, 2.0, 3.0})
    for (double b : {0.0, 1.0})
      two.push_back({{a, b}, -a, 0.0});
  CHECK_THROWS_WITH(sweep_posterior({"a", "force_ratio"}, {}, two, o),
                    Catch::Contains("'force_ratio' takes 2 values"));
}

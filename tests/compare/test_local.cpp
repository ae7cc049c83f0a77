// Local comparison: pulls and likelihoods of measured sources under a simulated distribution.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>

#include "support/sample_moments.hpp"
#include "undertow/compare/local.hpp"
#include "undertow/compare/statistics.hpp"
#include "undertow/error.hpp"

using namespace undertow;
using namespace undertow::compare;

namespace {
// Points in a 4 x 4 kpc patch with velocities drawn around mean (0, lag, 0) with dispersions
// (sr, sp, sz); measurement errors sigma_m added to measured points (and put in their covariance).
std::vector<PlanePoint> draw(std::mt19937_64& rng, std::size_t n, double lag, double sigma_m,
                             double sr = 10, double sp = 7, double sz = 5) {
  std::uniform_real_distribution<double> u(-2, 2);
  std::normal_distribution<double> g(0, 1);
  std::vector<PlanePoint> v(n);
  for (std::size_t i = 0; i < n; ++i) {
    v[i].x = -8 + u(rng), v[i].y = u(rng);
    v[i].uvw = {sr * g(rng) + sigma_m * g(rng), lag + sp * g(rng) + sigma_m * g(rng),
                sz * g(rng) + sigma_m * g(rng)};
    for (int a = 0; a < 3; ++a)
      v[i].cov[4 * a] = sigma_m * sigma_m;
    v[i].name = "s" + std::to_string(i);
  }
  return v;
}
} // namespace

TEST_CASE("Under the true model the pulls have mean 0 and dispersion 1 and chi^2 averages 3 "
          "(a Gaussian in 3 dimensions, definition of the pull)",
          "[compare]") {
  std::mt19937_64 rng(5);
  const auto sim = draw(rng, 20000, -7, 0);
  const auto meas = draw(rng, 2000, -7, 4);
  Neighbourhood nb;
  nb.k = 200;
  const auto r = compare_locally(meas, sim, nb);
  std::vector<double> pulls;
  double chi2 = 0;
  for (const auto& s : r.sources) {
    pulls.insert(pulls.end(), s.pull.begin(), s.pull.end());
    chi2 += s.chi2;
  }
  const auto [m, sd] = test::mean_sd(pulls);
  CHECK(std::fabs(m) < 4 / std::sqrt(double(pulls.size())));
  CHECK(sd == Approx(1.0).margin(0.06));
  INFO("mean chi2 " << chi2 / 2000);
  CHECK(chi2 / 2000 == Approx(3.0).margin(0.2)); // sampling error 0.055; estimated S adds ~2%
}

TEST_CASE("A lag of 10 km/s in about 200 sources with 5 km/s errors is told from no lag: the "
          "lagging model wins by a large likelihood ratio, and KS and AD reject no lag",
          "[compare]") {
  std::mt19937_64 rng(6);
  const auto lagging = draw(rng, 20000, -10, 0), circular = draw(rng, 20000, 0, 0);
  const auto meas = draw(rng, 200, -10, 5);
  Neighbourhood nb;
  nb.kind = Neighbourhood::Kind::radius;
  nb.radius_kpc = 1.0;
  const double dlogL = compare_locally(meas, lagging, nb).log_likelihood -
                       compare_locally(meas, circular, nb).log_likelihood;
  CHECK(dlogL > 50); // about 200 x 0.5 x 100/(49 + 25)
  std::vector<double> vm, vc;
  for (const auto& p : meas)
    vm.push_back(p.uvw[1]);
  for (std::size_t i = 0; i < 2000; ++i)
    vc.push_back(circular[i].uvw[1]);
  CHECK(ks_two_sample(vm, vc).p_value < 1e-4);
  CHECK(anderson_darling({vm, vc}).p_value <= 0.001);
}

TEST_CASE("A source with no simulated neighbours stops the comparison with its name", "[compare]") {
  std::mt19937_64 rng(7);
  auto meas = draw(rng, 3, 0, 3);
  meas[1].x = 20;
  meas[1].name = "far-away";
  Neighbourhood nb;
  nb.kind = Neighbourhood::Kind::radius;
  nb.radius_kpc = 0.5;
  CHECK_THROWS_WITH(compare_locally(meas, draw(rng, 5000, 0, 0), nb),
                    Catch::Contains("source 'far-away' has 0 simulated young sources nearby"));
  CHECK_THROWS_AS(compare_locally(meas, {}, nb), InputError);
}

TEST_CASE("Predictive distribution from k neighbours: held-out simulated sources of the same "
          "population give standard normal pulls and uniform tail probabilities for k = 6, 10 "
          "and 30 (Student-t predictive, Gelman et al. 2013 BDA3 sec. 3.6, Hotelling's T^2)",
          "[compare]") {
  for (std::size_t k : {6, 10, 30}) {
    std::mt19937_64 rng(100 + k);
    const auto sim = draw(rng, 20000, -7, 0);
    const auto held_out = draw(rng, 4000, -7, 0); // no measurement errors: the exact case
    Neighbourhood nb;
    nb.k = k;
    const auto r = compare_locally(held_out, sim, nb);
    std::vector<double> pulls;
    std::size_t beyond = 0, below_tenth = 0;
    for (const auto& s : r.sources) {
      pulls.insert(pulls.end(), s.pull.begin(), s.pull.end());
      beyond += s.p_value < kThreeSigmaTail;
      below_tenth += s.p_value < 0.1;
    }
    const auto [m, sd] = test::mean_sd(pulls);
    INFO("k = " << k << ": pull mean " << m << ", dispersion " << sd << ", " << beyond
                << " of 4000 beyond 3 sigma, " << below_tenth << " with p < 0.1");
    CHECK(std::fabs(m) < 0.05);                  // 12 000 pulls, shared neighbours
    CHECK(sd == Approx(1.0).margin(0.04));
    CHECK(beyond <= 25);                          // expected 10.8 (binomial sd 3.3)
    CHECK(double(below_tenth) / 4000 == Approx(0.1).margin(0.02)); // binomial sd 0.005
  }
}

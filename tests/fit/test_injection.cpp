// Injection and recovery of the kinematic fit over many catalogs simulated by the mock observation
// from a known truth: the pulls of R0, Θ0, the solar motion and the mean peculiar motion have
// mean 0 and dispersion 1, and the 68 % intervals cover the truth 68 % of the time (definition of
// a calibrated interval; the binomial error of the coverage). Hidden from the default Catch2 run;
// ctest runs it as fit.injection.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdlib>
#include <iostream>

#include "support/kinematic_truth.hpp"
#include "support/sample_moments.hpp"
#include "undertow/fit/likelihood.hpp"
#include "undertow/tracers/random.hpp"

using namespace undertow;
using fit::Param;

namespace {

// `trials` catalogs of 80 sources from the standard truth, with parallaxes (maser-like errors) or
// with distances given instead (Gaussian errors of `distance_fraction` of the distance).
void inject_and_recover(int trials, double distance_fraction) {
  const std::vector<Param> checked{Param::r0,    Param::theta0, Param::u_sun, Param::v_sun,
                                   Param::w_sun, Param::mean_u, Param::mean_v};
  std::vector<std::vector<double>> pulls(checked.size());
  std::vector<int> covered(checked.size(), 0);
  int converged = 0;
  double seconds = 0, steps = 0, tau = 0;
  for (int k = 0; k < trials; ++k) {
    auto t = test::standard_truth(80, 1000 + std::uint64_t(k));
    if (distance_fraction > 0) {
      t.errors.kind = observe::ErrorModel::Kind::distance;
      t.errors.distance_fraction = distance_fraction;
    }
    // the prior on V☉ is itself a measurement: its mean scatters about the truth by its width
    tracers::TracerStream rng(77, std::uint64_t(k), 0x1a);
    const double v_prior = t.params[std::size_t(Param::v_sun)] + 2 * rng.normal();
    auto s = test::standard_spec(t, v_prior);
    s.sampler.seed = 500 + std::uint64_t(k);
    s.sampler.tau_multiple = 30;
    const auto cat = fit::simulate_catalog(t);
    const fit::Likelihood L(cat, s.model, {});
    const auto r = fit::run_fit(s, L);
    converged += r.converged;
    seconds += r.seconds;
    steps += double(r.steps);
    tau += r.diag.tau_max;
    for (std::size_t j = 0; j < checked.size(); ++j)
      for (const auto& m : r.summary)
        if (m.param == checked[j]) {
          const double truth = t.params[std::size_t(checked[j])];
          pulls[j].push_back((m.median - truth) / (0.5 * (m.hi - m.lo)));
          covered[j] += truth >= m.lo && truth <= m.hi;
        }
  }
  std::cout << "injection and recovery: " << trials << " catalogs of 80 sources "
            << (distance_fraction > 0 ? "with distances given" : "with parallaxes") << ", "
            << converged << " converged, mean fit time " << seconds / trials << " s, mean steps "
            << steps / trials << ", mean largest autocorrelation time " << tau / trials << "\n";
  CHECK(converged == trials);
  int all_covered = 0;
  for (std::size_t j = 0; j < checked.size(); ++j) {
    const auto& p = pulls[j];
    REQUIRE(p.size() == std::size_t(trials));
    const auto [mean, sd] = test::mean_sd(p);
    const double coverage = double(covered[j]) / trials;
    // binomial error of a 68.27 % coverage over this many trials
    const double cov_err = std::sqrt(0.6827 * 0.3173 / trials);
    std::cout << "  " << fit::param_info(checked[j]).key << ": pull mean " << mean
              << ", dispersion " << sd << ", 68 % coverage " << coverage << " ± " << cov_err
              << "\n";
    INFO(fit::param_info(checked[j]).key << ": pull mean " << mean << ", dispersion " << sd
                                         << ", coverage " << coverage);
    CHECK(std::fabs(mean) < 0.3);
    CHECK(std::fabs(sd - 1) < 0.3);
    CHECK(std::fabs(coverage - 0.6827) < 3 * cov_err);
    all_covered += covered[j];
  }
  const double pooled = double(all_covered) / (trials * double(checked.size()));
  std::cout << "  pooled 68 % coverage " << pooled << "\n";
  // pooled over correlated parameters: the binomial error is a lower bound, so allow 3 of them
  CHECK(std::fabs(pooled - 0.6827) < 3 * std::sqrt(0.6827 * 0.3173 / trials));
}

} // namespace

TEST_CASE("Injection and recovery over many simulated catalogs: calibrated pulls and 68 % "
          "coverage of the kinematic fit",
          "[.][injection]") {
  const int trials = std::getenv("UNDERTOW_INJECTION_TRIALS")
                         ? std::atoi(std::getenv("UNDERTOW_INJECTION_TRIALS"))
                         : 100;
  inject_and_recover(trials, 0);
}

TEST_CASE("Injection and recovery of the kinematic fit over catalogs that give distances (10 % "
          "Gaussian errors) instead of parallaxes: calibrated pulls and 68 % coverage",
          "[.][injection]") {
  const int trials = std::getenv("UNDERTOW_INJECTION_TRIALS")
                         ? std::atoi(std::getenv("UNDERTOW_INJECTION_TRIALS")) / 2
                         : 50;
  inject_and_recover(trials, 0.1);
}

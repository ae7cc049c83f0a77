#pragma once
// The kinematic fit of a catalog (docs/fit.md): the posterior of the free parameters of a
// kinematic model, found first at its maximum (NLopt's Nelder-Mead simplex, restarted until it
// stops improving) and then sampled with the affine-invariant ensemble sampler until the chain
// is long enough (kept steps >= tau_multiple × the largest autocorrelation time) and mixed
// (split-R̂ <= r_hat_max), or steps_max is reached.
#include <atomic>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "undertow/fit/diagnostics.hpp"
#include "undertow/fit/likelihood.hpp"

namespace undertow::fit {

struct SamplerSettings {
  int walkers = 0;        // 0: the larger of 32 and 2 × (free parameters) + 2
  long steps_max = 40000; // per walker
  int chunk = 500;        // steps between convergence checks
  double tau_multiple =
      50; // kept steps per autocorrelation time (Foreman-Mackey et al. 2013 suggest about 50)
  double r_hat_max = 1.03; // split-R̂ over walkers (each walker's chain split in halves)
  std::uint64_t seed = 1;
  double de_fraction = 0.8; // share of differential-evolution moves (0: pure stretch moves)
  bool accept_unconverged = false;
};

struct FitSpec {
  std::string file, catalog_path;
  std::map<std::string, std::string> catalog_columns; // ours -> the catalog's (catalog.hpp)
  KinematicModel model;
  std::vector<ParamSetting> params; // every parameter the model uses, fixed or free
  SamplerSettings sampler;
  bool accept_degenerate = false;
  std::string galactic_source; // "fit file" (for outputs naming their Galactic parameters)
};

// Exact degeneracies of the model left free without an informative (Gaussian) prior or a fixed
// value: with a flat or linear rotation curve only Θ0 + V☉ and Θ0 + V̄_s are constrained, and
// always only W̄_s − W☉. One message per degenerate set; empty when none.
std::vector<std::string> degeneracies(const FitSpec& s);

// The free parameters in a fixed order, and the full vector from a free one.
std::vector<Param> free_params(const FitSpec& s);
FullParams full_from_free(const FitSpec& s, const std::vector<Param>& free, const double* x);
// Every parameter at its fixed value or start value.
FullParams start_values(const FitSpec& s);
// The range of the global parallax zero point the fit may visit (the likelihood's nodes cover
// it); throws InputError at the key for a free zero point with an unbounded flat prior.
Likelihood::Offset offset_range(const FitSpec& s);

// ln prior + ln L; -inf outside a bound or the model's domain. Thread-safe.
double log_posterior(const FitSpec& s, const std::vector<Param>& free, const Likelihood& L,
                     const double* x, bool parallel);

// The q-quantile of v by linear interpolation between order statistics (v is sorted in place).
double quantile(std::vector<double>& v, double q);

struct ParamSummary {
  Param param{};
  double median = 0, lo = 0, hi = 0; // 16 and 84 % quantiles
  double mean = 0, sd = 0, map = 0;
  double prior_width = INFINITY; // sd of the prior (uniform: (max-min)/sqrt(12)); inf if flat
};

struct FitResult {
  std::vector<Param> free;
  std::vector<double> map_x; // free parameters at the maximum
  double map_ln_posterior = 0;
  int walkers = 0;
  std::vector<double> chain, ln_post; // steps × walkers (× free)
  long steps = 0;
  ChainDiagnostics diag;
  bool converged = false, interrupted = false;
  long more_steps_needed = 0; // estimate when not converged
  double acceptance = 0;
  std::vector<double> samples; // kept steps, flattened (n × free)
  std::vector<ParamSummary> summary;
  std::vector<double> correlation; // free × free
  // derived quantities per kept sample: Θ0, Ω☉ = (Θ0 + V☉)/R0, Θ0 + V̄_s ... (derived_names)
  std::vector<std::string> derived_names, derived_units;
  std::vector<ParamSummary> derived;
  std::vector<std::string> warnings; // what could mislead
  std::vector<std::string> notes;    // what a reader should know
  std::vector<Param> at_bound;       // posteriors piled against a prior's bound
  double seconds = 0;
};

using Progress = std::function<void(const std::string& stage, long done, long total)>;

FitResult run_fit(const FitSpec& s, const Likelihood& L, const std::atomic<bool>* stop = nullptr,
                  const Progress& progress = {});

// A few plain sentences on what the data constrain well, what is set by its prior, and which
// parameters are strongly correlated or degenerate.
std::string constraint_summary(const FitSpec& s, const FitResult& r);

// The full parameter vectors of n samples spread evenly over the kept chain (n <= kept).
std::vector<FullParams> posterior_draws(const FitSpec& s, const FitResult& r, std::size_t n);

} // namespace undertow::fit

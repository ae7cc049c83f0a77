#pragma once
// Convergence diagnostics of an ensemble chain (steps × walkers):
//  - the integrated autocorrelation time τ of each parameter, from the autocorrelation function
//    averaged over walkers (Goodman & Weare 2010, §3) with Sokal's automatic window: the
//    smallest lag M with M >= c τ(M), c = 5 (Sokal 1997, "Monte Carlo methods in statistical
//    mechanics", §3);
//  - the split-R̂ of Gelman et al. (2013, Bayesian Data Analysis, 3rd ed., §11.4), each walker's
//    chain split into halves and treated as a chain of its own.
#include <atomic>
#include <functional>
#include <vector>

namespace undertow::fit {

class EnsembleSampler;

struct ChainDiagnostics {
  std::vector<double> tau;   // per parameter, in steps
  std::vector<double> r_hat; // per parameter
  double tau_max = 0, r_hat_max = 0;
  long burn = 0, kept = 0; // steps discarded and used
};

// Diagnostics over steps [burn, end) of the sampler's chain.
ChainDiagnostics diagnose(const EnsembleSampler& s, long burn);

// When a chain has converged: the kept steps (the last three quarters) reach tau_multiple × the
// largest autocorrelation time and split-R̂ is at most r_hat_max; checked every `chunk` steps, up
// to steps_max.
struct ConvergenceRule {
  long chunk = 500, steps_max = 40000;
  double tau_multiple = 50, r_hat_max = 1.03;
};
struct ConvergenceRun {
  bool converged = false, interrupted = false;
  ChainDiagnostics diag; // over the last three quarters (as of the last check when interrupted)
};
// Runs the sampler in chunks until the rule holds, steps_max is reached or *stop turns true.
ConvergenceRun run_to_convergence(EnsembleSampler& s, const ConvergenceRule& rule,
                                  const std::atomic<bool>* stop = nullptr,
                                  const std::function<void(long)>& progress = {});

// τ of one series (or the mean autocorrelation over several series of equal length).
double autocorrelation_time(const std::vector<std::vector<double>>& series, double c = 5);
double split_r_hat(const std::vector<std::vector<double>>& chains);

} // namespace undertow::fit

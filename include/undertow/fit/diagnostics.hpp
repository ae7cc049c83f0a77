#pragma once
// Convergence diagnostics of an ensemble chain (steps × walkers):
//  - the integrated autocorrelation time τ of each parameter, from the autocorrelation function
//    averaged over walkers (Goodman & Weare 2010, §3) with Sokal's automatic window: the
//    smallest lag M with M >= c τ(M), c = 5 (Sokal 1997, "Monte Carlo methods in statistical
//    mechanics", §3);
//  - the split-R̂ of Gelman et al. (2013, Bayesian Data Analysis, 3rd ed., §11.4), each walker's
//    chain split into halves and treated as a chain of its own.
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

// τ of one series (or the mean autocorrelation over several series of equal length).
double autocorrelation_time(const std::vector<std::vector<double>>& series, double c = 5);
double split_r_hat(const std::vector<std::vector<double>>& chains);

} // namespace undertow::fit

#pragma once
// A model judged over K realisations (tracer seeds): the mean of the verdict's ln L and its
// scatter, and the difference between two models with an uncertainty that adds the catalog's
// sampling (a bootstrap over sources, in its closed form N var(d_i) for the per-source
// differences d_i) and the realisations' (s_A²/K_A + s_B²/K_B, the variance of two means).
// Models whose |Δ ln L| is within twice that uncertainty are reported as not distinguished.
#include <string>
#include <vector>

namespace undertow::compare {

struct RealisationSummary {
  std::size_t count = 0;
  double mean = 0, scatter = 0; // of the realisations' ln L (scatter: sample sd; 0 for K = 1)
  std::vector<std::string> names;
  std::vector<double> source_mean; // per source, mean over realisations
};

// totals[r]: realisation r's ln L; per_source[r][i]: its per-source values. Throws
// std::invalid_argument when there is no realisation or the sources differ in number.
RealisationSummary summarise_realisations(const std::vector<double>& totals,
                                          const std::vector<std::vector<double>>& per_source,
                                          std::vector<std::string> names);

struct ModelDifference {
  double delta = 0;              // mean ln L of b minus that of a
  double sigma_sources = 0;      // catalog sampling
  double sigma_realisations = 0; // realisation noise (0 and unknown when K = 1 for both)
  double sigma = 0;              // both in quadrature
  bool realisation_noise_known = false;
  bool distinguished = false; // |delta| > 2 sigma
};

// Throws InputError when the two were judged on different sources (by name and order).
ModelDifference difference(const RealisationSummary& a, const RealisationSummary& b);

} // namespace undertow::compare

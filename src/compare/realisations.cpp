#include "undertow/compare/realisations.hpp"

#include <cmath>
#include <stdexcept>

#include "undertow/error.hpp"

namespace undertow::compare {

RealisationSummary summarise_realisations(const std::vector<double>& totals,
                                          const std::vector<std::vector<double>>& per_source,
                                          std::vector<std::string> names) {
  if (totals.empty() || totals.size() != per_source.size())
    throw std::invalid_argument("summarise_realisations: one per-source list per realisation");
  RealisationSummary s;
  s.count = totals.size();
  s.names = std::move(names);
  s.source_mean.assign(s.names.size(), 0.0);
  for (std::size_t r = 0; r < s.count; ++r) {
    if (per_source[r].size() != s.names.size())
      throw std::invalid_argument("summarise_realisations: realisations of different sources");
    s.mean += totals[r];
    for (std::size_t i = 0; i < s.names.size(); ++i)
      s.source_mean[i] += per_source[r][i] / double(s.count);
  }
  s.mean /= double(s.count);
  if (s.count > 1) {
    double v = 0;
    for (double t : totals)
      v += (t - s.mean) * (t - s.mean);
    s.scatter = std::sqrt(v / double(s.count - 1));
  }
  return s;
}

ModelDifference difference(const RealisationSummary& a, const RealisationSummary& b) {
  if (a.names != b.names)
    throw InputError("the two models were judged on different measured sources; their ln L "
                     "cannot be compared");
  ModelDifference d;
  d.delta = b.mean - a.mean;
  const std::size_t n = a.names.size();
  if (n > 1) {
    double m = 0, v = 0;
    for (std::size_t i = 0; i < n; ++i)
      m += b.source_mean[i] - a.source_mean[i];
    m /= double(n);
    for (std::size_t i = 0; i < n; ++i) {
      const double e = b.source_mean[i] - a.source_mean[i] - m;
      v += e * e;
    }
    d.sigma_sources = std::sqrt(double(n) * v / double(n - 1));
  }
  d.realisation_noise_known = a.count > 1 || b.count > 1;
  // a model run once borrows the other's scatter per realisation when that one is known
  const double sa = a.count > 1 ? a.scatter : b.scatter, sb = b.count > 1 ? b.scatter : a.scatter;
  d.sigma_realisations = std::sqrt(sa * sa / double(a.count) + sb * sb / double(b.count));
  d.sigma = std::hypot(d.sigma_sources, d.sigma_realisations);
  d.distinguished = std::fabs(d.delta) > 2 * d.sigma;
  return d;
}

} // namespace undertow::compare

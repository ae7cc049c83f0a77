#include "undertow/plot/scales.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace undertow::plot {

double quantile(std::vector<double> v, double q) {
  std::erase_if(v, [](double x) { return !std::isfinite(x); });
  if (v.empty()) return std::numeric_limits<double>::quiet_NaN();
  std::sort(v.begin(), v.end());
  const double pos = std::clamp(q, 0.0, 1.0) * double(v.size() - 1);
  const std::size_t i = std::size_t(pos);
  if (i + 1 >= v.size()) return v.back();
  return v[i] + (pos - double(i)) * (v[i + 1] - v[i]);
}

std::pair<double, double> range_of(const std::vector<std::vector<double>>& lists, double pad) {
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (const auto& l : lists)
    for (double x : l)
      if (std::isfinite(x)) lo = std::min(lo, x), hi = std::max(hi, x);
  if (!(hi >= lo)) return {0, 1};
  if (hi == lo) return {lo - 1, hi + 1};
  const double w = hi - lo;
  return {lo - pad * w, hi + pad * w};
}

double round_step(double x) {
  if (!(x > 0) || !std::isfinite(x)) return 1;
  const double p = std::pow(10.0, std::floor(std::log10(x)));
  double best = p;
  for (double m : {1.0, 2.0, 2.5, 5.0})
    if (m * p <= x * (1 + 1e-12)) best = m * p;
  return best;
}

} // namespace undertow::plot

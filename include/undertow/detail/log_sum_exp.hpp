#pragma once
// ln Σ exp(v_j) without overflow: the largest term is taken out first (common practice).
// -inf for no terms or all -inf; +inf or NaN pass through.
#include <cmath>
#include <cstddef>
#include <vector>

namespace undertow::detail {

inline double log_sum_exp(const double* v, std::size_t n) {
  double m = -INFINITY;
  for (std::size_t j = 0; j < n; ++j)
    m = v[j] > m ? v[j] : m;
  if (!std::isfinite(m)) return m;
  double s = 0;
  for (std::size_t j = 0; j < n; ++j)
    s += std::exp(v[j] - m);
  return m + std::log(s);
}
inline double log_sum_exp(const std::vector<double>& v) {
  return log_sum_exp(v.data(), v.size());
}

} // namespace undertow::detail

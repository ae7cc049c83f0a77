#include "undertow/plot/density_estimate.hpp"

#include <cmath>
#include <numbers>
#include <stdexcept>

namespace undertow::plot {

Histogram histogram(const std::vector<double>& v, double lo, double hi, int bins) {
  if (!(hi > lo) || bins < 1) throw std::invalid_argument("histogram: empty range");
  Histogram h;
  h.n = v.size();
  const double w = (hi - lo) / bins;
  for (int i = 0; i <= bins; ++i)
    h.edges.push_back(lo + w * i);
  std::vector<double> counts(std::size_t(bins), 0.0);
  for (double x : v) {
    if (!(x >= lo && x <= hi)) continue;
    counts[std::size_t(std::min(bins - 1, int((x - lo) / w)))] += 1;
  }
  const double norm = v.empty() ? 0 : 1.0 / (double(v.size()) * w);
  for (double c : counts) {
    h.density.push_back(c * norm);
    h.error.push_back(std::sqrt(c) * norm);
  }
  return h;
}

double silverman_bandwidth(const std::vector<double>& v) {
  const double n = double(v.size());
  if (n < 2) return 0;
  double m = 0;
  for (double x : v)
    m += x;
  m /= n;
  double s = 0;
  for (double x : v)
    s += (x - m) * (x - m);
  const double sigma = std::sqrt(s / (n - 1));   // scipy's covariance uses n - 1
  return sigma * std::pow(4.0 / (3.0 * n), 0.2); // (4/3)^(1/5) = 1.059, Silverman's "1.06"
}

std::vector<double> kernel_density(const std::vector<double>& v, const std::vector<double>& x,
                                   double h) {
  std::vector<double> out(x.size(), 0.0);
  if (v.empty() || !(h > 0)) return out;
  const double norm = 1.0 / (double(v.size()) * h * std::sqrt(2 * std::numbers::pi));
  for (std::size_t i = 0; i < x.size(); ++i) {
    double s = 0;
    for (double xi : v) {
      const double u = (x[i] - xi) / h;
      s += std::exp(-0.5 * u * u);
    }
    out[i] = s * norm;
  }
  return out;
}

} // namespace undertow::plot

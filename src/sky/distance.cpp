#include "undertow/sky/distance.hpp"

#include <cmath>
#include <vector>

namespace undertow::sky {

namespace {

// Log posterior up to a constant: 2 ln r - r/L - (w - 1/r)^2 / (2 s^2).
double log_posterior(double r, double w, double s, double L) {
  return 2 * std::log(r) - r / L - (w - 1 / r) * (w - 1 / r) / (2 * s * s);
}

// The scan grid for the roots, 1e-6 to 1e6 kpc logarithmically: the same for every call.
const std::vector<double>& scan_grid() {
  static const std::vector<double> g = [] {
    std::vector<double> v(4001);
    for (int i = 1; i <= 4000; ++i)
      v[std::size_t(i)] = 1e-6 * std::pow(1e12, i / 4000.0);
    return v;
  }();
  return g;
}

} // namespace

double edsd_mode_kpc(double w, double s, double L) {
  const auto logp = [&](double r) { return log_posterior(r, w, s, L); };
  const auto f = [&](double r) {
    return r * r * r / L - 2 * r * r + w / (s * s) * r - 1 / (s * s);
  };
  // f(0) < 0 and f -> +inf: scan for sign changes on a logarithmic grid, refine by bisection
  std::vector<double> roots;
  const auto& grid = scan_grid();
  double a = 1e-6, fa = f(a);
  for (int i = 1; i <= 4000; ++i) {
    const double b = grid[std::size_t(i)], fb = f(b);
    if ((fa < 0) != (fb < 0)) {
      double lo = a, hi = b;
      const bool lo_negative = fa < 0; // lo only moves to points of its own sign
      for (int k = 0; k < 200 && hi - lo > 1e-15 * hi; ++k) {
        const double m = 0.5 * (lo + hi);
        ((f(m) < 0) == lo_negative ? lo : hi) = m;
      }
      roots.push_back(0.5 * (lo + hi));
    }
    a = b;
    fa = fb;
  }
  double best = NAN, bestp = -INFINITY;
  for (double r : roots)
    if (logp(r) > bestp) bestp = logp(r), best = r;
  return best;
}

double edsd_median_kpc(double w, double s, double L) {
  const double mode = edsd_mode_kpc(w, s, L);
  const auto logp = [&](double r) { return log_posterior(r, w, s, L); };
  const double lp0 = logp(mode);
  constexpr int n = 2000;
  const double lo = std::log(mode / 50), hi = std::log(mode * 50);
  std::vector<double> r(n), cdf(n);
  double prev = 0;
  for (int i = 0; i < n; ++i) {
    r[i] = std::exp(lo + (hi - lo) * i / (n - 1));
    const double p = std::exp(logp(r[i]) - lp0) * r[i]; // density in ln r
    cdf[i] = i == 0 ? 0 : cdf[i - 1] + 0.5 * (p + prev) * (hi - lo) / (n - 1);
    prev = p;
  }
  const double half = 0.5 * cdf[n - 1];
  for (int i = 1; i < n; ++i)
    if (cdf[i] >= half) {
      const double f = (half - cdf[i - 1]) / (cdf[i] - cdf[i - 1]);
      return std::exp(std::log(r[i - 1]) + f * (std::log(r[i]) - std::log(r[i - 1])));
    }
  return mode;
}

} // namespace undertow::sky

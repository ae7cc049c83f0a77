#include "undertow/sky/distance.hpp"

#include <cmath>
#include <vector>

namespace undertow::sky {

double edsd_mode_kpc(double w, double s, double L) {
  // log posterior up to a constant: 2 ln r - r/L - (w - 1/r)^2 / (2 s^2)
  const auto logp = [&](double r) {
    return 2 * std::log(r) - r / L - (w - 1 / r) * (w - 1 / r) / (2 * s * s);
  };
  const auto f = [&](double r) {
    return r * r * r / L - 2 * r * r + w / (s * s) * r - 1 / (s * s);
  };
  // f(0) < 0 and f -> +inf: scan for sign changes on a logarithmic grid, refine by bisection
  std::vector<double> roots;
  double a = 1e-6, fa = f(a);
  for (int i = 1; i <= 4000; ++i) {
    const double b = 1e-6 * std::pow(1e12, i / 4000.0), fb = f(b);
    if ((fa < 0) != (fb < 0)) {
      double lo = a, hi = b;
      for (int k = 0; k < 200 && hi - lo > 1e-15 * hi; ++k) {
        const double m = 0.5 * (lo + hi);
        ((f(m) < 0) == (f(lo) < 0) ? lo : hi) = m;
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
  const auto logp = [&](double r) {
    return 2 * std::log(r) - r / L - (w - 1 / r) * (w - 1 / r) / (2 * s * s);
  };
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

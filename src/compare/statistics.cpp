#include "undertow/compare/statistics.hpp"

#include <algorithm>
#include <array>
#include <cmath>

#include "undertow/error.hpp"

namespace undertow::compare {

double median(std::vector<double> v) {
  if (v.empty()) return NAN;
  const std::size_t h = v.size() / 2;
  std::nth_element(v.begin(), v.begin() + long(h), v.end());
  if (v.size() % 2) return v[h];
  const double hi = v[h];
  return 0.5 * (hi + *std::max_element(v.begin(), v.begin() + long(h)));
}

double robust_dispersion(const std::vector<double>& v) {
  const double m = median(v);
  std::vector<double> d;
  for (double x : v)
    d.push_back(std::fabs(x - m));
  return 1.4826 * median(d);
}

double kolmogorov_q(double lambda) {
  if (lambda < 0.2) return 1.0; // the series converges slowly here and Q = 1 to 1e-20
  double s = 0;
  for (int k = 1; k <= 100; ++k) {
    const double t = std::exp(-2.0 * k * k * lambda * lambda);
    s += (k % 2 ? 2 : -2) * t;
    if (t < 1e-18) break;
  }
  return std::clamp(s, 0.0, 1.0);
}

TestResult ks_two_sample(const std::vector<double>& a, const std::vector<double>& b) {
  if (a.empty() || b.empty()) throw InputError("Kolmogorov-Smirnov test: a sample is empty");
  std::vector<double> x = a, y = b;
  std::sort(x.begin(), x.end());
  std::sort(y.begin(), y.end());
  std::size_t i = 0, j = 0;
  double d = 0;
  const double n1 = double(x.size()), n2 = double(y.size());
  while (i < x.size() && j < y.size()) {
    const double v = std::min(x[i], y[j]); // step both EDFs past every copy of v (ties)
    while (i < x.size() && x[i] == v)
      ++i;
    while (j < y.size() && y[j] == v)
      ++j;
    d = std::max(d, std::fabs(double(i) / n1 - double(j) / n2));
  }
  const double ne = n1 * n2 / (n1 + n2), sq = std::sqrt(ne);
  return {d, d == 0 ? 1.0 : kolmogorov_q((sq + 0.12 + 0.11 / sq) * d)};
}

namespace {

struct Pooled {
  std::vector<double> z; // distinct values, ascending
  std::vector<double> l; // multiplicity of each in the pooled sample
  double N = 0;
};

Pooled pool(const std::vector<std::vector<double>>& s) {
  std::vector<double> all;
  for (const auto& v : s)
    all.insert(all.end(), v.begin(), v.end());
  std::sort(all.begin(), all.end());
  Pooled p;
  p.N = double(all.size());
  for (std::size_t i = 0; i < all.size();) {
    std::size_t j = i;
    while (j < all.size() && all[j] == all[i])
      ++j;
    p.z.push_back(all[i]);
    p.l.push_back(double(j - i));
    i = j;
  }
  return p;
}

void check(const std::vector<std::vector<double>>& s) {
  if (s.size() < 2) throw InputError("Anderson-Darling test: needs at least two samples");
  for (const auto& v : s)
    if (v.size() < 2)
      throw InputError("Anderson-Darling test: every sample needs two values or more");
}

} // namespace

double anderson_darling_a2(const std::vector<std::vector<double>>& s) {
  check(s);
  const Pooled p = pool(s);
  const double N = p.N;
  double a2 = 0;
  for (const auto& v : s) {
    std::vector<double> x = v;
    std::sort(x.begin(), x.end());
    const double ni = double(x.size());
    double B = 0, inner = 0;
    std::size_t k = 0; // observations of this sample <= current value
    for (std::size_t j = 0; j < p.z.size(); ++j) {
      const std::size_t k0 = k;
      while (k < x.size() && x[k] == p.z[j])
        ++k;
      const double f = double(k - k0);
      B += p.l[j];
      const double Ba = B - p.l[j] / 2, Ma = double(k) - f / 2;
      const double den = Ba * (N - Ba) - N * p.l[j] / 4;
      if (den > 0) inner += p.l[j] * (N * Ma - ni * Ba) * (N * Ma - ni * Ba) / den;
    }
    a2 += inner / ni;
  }
  return a2 * (N - 1) / (N * N);
}

double anderson_darling_variance(const std::vector<std::vector<double>>& s) {
  check(s);
  double N = 0, H = 0;
  for (const auto& v : s)
    N += double(v.size()), H += 1.0 / double(v.size());
  const double k = double(s.size());
  double h = 0;
  for (double i = 1; i <= N - 1; ++i)
    h += 1 / i;
  double g = 0;
  for (double i = 1; i <= N - 2; ++i) {
    double inner = 0;
    for (double j = i + 1; j <= N - 1; ++j)
      inner += 1 / j;
    g += inner / (N - i);
  }
  const double a = (4 * g - 6) * (k - 1) + (10 - 6 * g) * H;
  const double b = (2 * g - 4) * k * k + 8 * h * k + (2 * g - 14 * h - 4) * H - 8 * h + 4 * g - 6;
  const double c = (6 * h + 2 * g - 2) * k * k + (4 * h - 4 * g + 6) * k + (2 * h - 6) * H + 4 * h;
  const double d = (2 * h + 6) * k * k - 4 * h * k;
  return (a * N * N * N + b * N * N + c * N + d) / ((N - 1) * (N - 2) * (N - 3));
}

TestResult anderson_darling(const std::vector<std::vector<double>>& s) {
  const double a2 = anderson_darling_a2(s);
  const double m = double(s.size()) - 1;
  const double T = (a2 - m) / std::sqrt(anderson_darling_variance(s));
  if (a2 == 0) return {T, 1.0};
  static constexpr std::array<double, 7> sig = {0.25, 0.10, 0.05, 0.025, 0.01, 0.005, 0.001};
  static constexpr std::array<double, 7> b0 = {0.675, 1.281, 1.645, 1.96, 2.326, 2.573, 3.085};
  static constexpr std::array<double, 7> b1 = {-0.245, 0.25, 0.678, 1.149, 1.822, 2.364, 3.615};
  static constexpr std::array<double, 7> b2 = {-0.105, -0.305, -0.362, -0.391,
                                               -0.396, -0.345, -0.154};
  std::array<double, 7> t{}, lo{};
  for (int i = 0; i < 7; ++i) {
    t[i] = b0[i] + b1[i] / std::sqrt(m) + b2[i] / m;
    lo[i] = std::log(sig[i] / (1 - sig[i]));
  }
  if (T <= t[0]) return {T, 0.25};
  if (T >= t[6]) return {T, 0.001};
  // quadratic interpolation of ln(p/(1-p)) in T through the three nearest critical values
  int i = 1;
  while (i < 5 && T > t[i])
    ++i;
  const int j0 = i - 1, j1 = i, j2 = i + 1;
  const double L = lo[j0] * (T - t[j1]) * (T - t[j2]) / ((t[j0] - t[j1]) * (t[j0] - t[j2])) +
                   lo[j1] * (T - t[j0]) * (T - t[j2]) / ((t[j1] - t[j0]) * (t[j1] - t[j2])) +
                   lo[j2] * (T - t[j0]) * (T - t[j1]) / ((t[j2] - t[j0]) * (t[j2] - t[j1]));
  return {T, 1 / (1 + std::exp(-L))};
}

} // namespace undertow::compare

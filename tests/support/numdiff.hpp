#pragma once
// Finite-difference references for the analytic forces and densities (tests only).
#include <array>
#include <cmath>

namespace undertow::test {

using V3 = std::array<double, 3>;

// Richardson-extrapolated central difference of f along axis k: error O(h^4).
template <class F> double partial(const F& f, V3 r, int k, double h) {
  const auto at = [&](double d) {
    V3 q = r;
    q[k] += d;
    return f(q);
  };
  const double d1 = (at(h) - at(-h)) / (2 * h);
  const double d2 = (at(h / 2) - at(-h / 2)) / h;
  return (4 * d2 - d1) / 3;
}

template <class F> V3 gradient(const F& f, const V3& r, double h) {
  return {partial(f, r, 0, h), partial(f, r, 1, h), partial(f, r, 2, h)};
}

// Laplacian by Richardson extrapolation of the 3-point second difference: error O(h^4).
template <class F> double laplacian(const F& f, const V3& r, double h) {
  double sum = 0;
  for (int k = 0; k < 3; ++k) {
    const auto second = [&](double s) {
      V3 p = r, m = r;
      p[k] += s;
      m[k] -= s;
      return (f(p) - 2 * f(r) + f(m)) / (s * s);
    };
    sum += (4 * second(h / 2) - second(h)) / 3;
  }
  return sum;
}

inline double rel_err(double a, double b, double scale) {
  return std::fabs(a - b) / scale;
}

} // namespace undertow::test

#pragma once
// Hyper-dual numbers a + b e1 + c e2 + d e1e2 with e1^2 = e2^2 = 0 (Fike & Alonso 2011,
// AIAA 2011-886): evaluating f(x + e1 + e2) gives f, f' and f'' exactly, with no step size.
// Used to get the density that exactly generates a perturbation's potential (its Laplacian
// over 4 pi G) where no closed form is written out by hand.
#include <cmath>
#include <numbers>

namespace undertow::detail {

struct HyperDual {
  double a = 0, b = 0, c = 0, d = 0;
  HyperDual() = default;
  HyperDual(double v) : a(v) {} // NOLINT: constants promote implicitly
  HyperDual(double a_, double b_, double c_, double d_) : a(a_), b(b_), c(c_), d(d_) {}
  double value() const { return a; }
};

// f(x) with f0 = f(a), f1 = f'(a), f2 = f''(a)
inline HyperDual chain(const HyperDual& x, double f0, double f1, double f2) {
  return {f0, f1 * x.b, f1 * x.c, f1 * x.d + f2 * x.b * x.c};
}
inline HyperDual operator+(const HyperDual& x, const HyperDual& y) {
  return {x.a + y.a, x.b + y.b, x.c + y.c, x.d + y.d};
}
inline HyperDual operator-(const HyperDual& x, const HyperDual& y) {
  return {x.a - y.a, x.b - y.b, x.c - y.c, x.d - y.d};
}
inline HyperDual operator-(const HyperDual& x) {
  return {-x.a, -x.b, -x.c, -x.d};
}
inline HyperDual operator*(const HyperDual& x, const HyperDual& y) {
  return {x.a * y.a, x.a * y.b + x.b * y.a, x.a * y.c + x.c * y.a,
          x.a * y.d + x.b * y.c + x.c * y.b + x.d * y.a};
}
inline HyperDual inverse(const HyperDual& x) {
  const double i = 1 / x.a;
  return chain(x, i, -i * i, 2 * i * i * i);
}
inline HyperDual operator/(const HyperDual& x, const HyperDual& y) {
  return x * inverse(y);
}
inline bool operator<(const HyperDual& x, const HyperDual& y) {
  return x.a < y.a;
}

inline HyperDual sqrt(const HyperDual& x) {
  const double s = std::sqrt(x.a);
  return chain(x, s, 0.5 / s, -0.25 / (s * x.a));
}
inline HyperDual exp(const HyperDual& x) {
  const double e = std::exp(x.a);
  return chain(x, e, e, e);
}
inline HyperDual expm1(const HyperDual& x) {
  const double e = std::exp(x.a);
  return chain(x, std::expm1(x.a), e, e);
}
inline HyperDual log(const HyperDual& x) {
  return chain(x, std::log(x.a), 1 / x.a, -1 / (x.a * x.a));
}
inline HyperDual log1p(const HyperDual& x) {
  const double i = 1 / (1 + x.a);
  return chain(x, std::log1p(x.a), i, -i * i);
}
inline HyperDual sin(const HyperDual& x) {
  const double s = std::sin(x.a), c = std::cos(x.a);
  return chain(x, s, c, -s);
}
inline HyperDual cos(const HyperDual& x) {
  const double s = std::sin(x.a), c = std::cos(x.a);
  return chain(x, c, -s, -c);
}
inline HyperDual atan(const HyperDual& x) {
  const double i = 1 / (1 + x.a * x.a);
  return chain(x, std::atan(x.a), i, -2 * x.a * i * i);
}
inline HyperDual abs(const HyperDual& x) {
  return x.a < 0 ? -x : x;
}
inline HyperDual pow(const HyperDual& x, double p) {
  const double v = std::pow(x.a, p);
  return chain(x, v, p * v / x.a, p * (p - 1) * v / (x.a * x.a));
}
// atan2 agrees with atan(y/x) up to a constant on each branch, so its derivatives follow
// from atan on whichever ratio is bounded.
inline HyperDual atan2(const HyperDual& y, const HyperDual& x) {
  HyperDual r = std::abs(x.a) >= std::abs(y.a) ? atan(y / x) : -atan(x / y);
  r.a = std::atan2(y.a, x.a);
  return r;
}

// Laplacian of f at (x, y, z) by three hyper-dual evaluations, one per axis.
template <class F> double laplacian(const F& f, double x, double y, double z) {
  const HyperDual X{x}, Y{y}, Z{z};
  const HyperDual dx{x, 1, 1, 0}, dy{y, 1, 1, 0}, dz{z, 1, 1, 0};
  return f(dx, Y, Z).d + f(X, dy, Z).d + f(X, Y, dz).d;
}

} // namespace undertow::detail

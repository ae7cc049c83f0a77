#pragma once
// Gauss-Legendre quadrature on [-1, 1] (Abramowitz & Stegun 1964, §25.4.29): nodes are the roots
// of P_n, found by Newton's method from Tricomi's approximation, and weights
// 2 / ((1 - x^2) P_n'(x)^2). Exact for polynomials of degree 2n - 1.
#include <vector>

namespace undertow::fit {

struct GaussLegendre {
  std::vector<double> nodes, weights; // ascending nodes
};

// n >= 1; computed once per n and kept (thread-safe).
const GaussLegendre& gauss_legendre(int n);

} // namespace undertow::fit

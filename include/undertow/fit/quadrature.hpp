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

// Gauss-Hermite quadrature for ∫ f(x) exp(-x²) dx (Abramowitz & Stegun 1964, §25.4.46), by the
// eigenvalues of the symmetric tridiagonal Jacobi matrix of the Hermite polynomials (Golub &
// Welsch 1969, Math. Comp. 23, 221): exact for polynomials of degree 2n - 1. 1 <= n <= 64.
struct GaussHermite {
  std::vector<double> nodes, weights; // ascending nodes; the weights sum to √π
};
const GaussHermite& gauss_hermite(int n);

} // namespace undertow::fit

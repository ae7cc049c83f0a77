// Gauss-Legendre nodes and weights against Boost.Math's tables, and the rule's exactness and
// remainder (Abramowitz & Stegun 1964, 25.4.29).
#include <catch2/catch.hpp>

#include <boost/math/quadrature/gauss.hpp>

#include <cmath>
#include <random>
#include <stdexcept>

#include "undertow/fit/quadrature.hpp"

namespace fit = undertow::fit;

namespace {

// Boost.Math stores the (N + 1) / 2 non-negative abscissae in ascending order (a zero first when
// N is odd) with their weights; the rule is symmetric, x_i = -x_{N-1-i}, w_i = w_{N-1-i}.
template <unsigned N> void compare_with_boost() {
  using B = boost::math::quadrature::gauss<double, N>;
  const auto& g = fit::gauss_legendre(int(N));
  REQUIRE(g.nodes.size() == N);
  REQUIRE(g.weights.size() == N);
  const auto& xb = B::abscissa();
  const auto& wb = B::weights();
  REQUIRE(xb.size() == (N + 1) / 2);
  const std::size_t first = N - xb.size(); // index of the first non-negative node
  double worst_x = 0, worst_w = 0;
  for (std::size_t k = 0; k < xb.size(); ++k) {
    INFO("N = " << N << ", Boost node " << k);
    // Boost.Math 1.74 gauss<double, N> tables (boost/math/quadrature/gauss.hpp)
    CHECK(g.nodes[first + k] == Approx(xb[k]).margin(1e-15));
    CHECK(g.weights[first + k] == Approx(wb[k]).epsilon(1e-14));
    // the mirrored half
    CHECK(g.nodes[N - 1 - (first + k)] == Approx(-xb[k]).margin(1e-15));
    CHECK(g.weights[N - 1 - (first + k)] == Approx(wb[k]).epsilon(1e-14));
    worst_x = std::max(worst_x, std::fabs(g.nodes[first + k] - xb[k]));
    worst_w = std::max(worst_w, std::fabs(g.weights[first + k] / wb[k] - 1));
  }
  for (std::size_t i = 1; i < N; ++i)
    CHECK(g.nodes[i] > g.nodes[i - 1]); // ascending (quadrature.hpp)
  UNSCOPED_INFO("N = " << N << ": largest node difference " << worst_x
                       << ", largest relative weight difference " << worst_w);
}

// ∫_{-1}^{1} x^k dx
double monomial_integral(int k) {
  return k % 2 ? 0.0 : 2.0 / (k + 1);
}

double rule(const fit::GaussLegendre& g, int k) {
  double s = 0;
  for (std::size_t i = 0; i < g.nodes.size(); ++i)
    s += g.weights[i] * std::pow(g.nodes[i], k);
  return s;
}

} // namespace

TEST_CASE("gauss_legendre(n): nodes and weights equal Boost.Math's gauss<double, N> for N = 7, "
          "15, 20, 30",
          "[fit]") {
  compare_with_boost<7>();
  compare_with_boost<15>();
  compare_with_boost<20>();
  compare_with_boost<30>();
}

TEST_CASE("gauss_legendre(n): the n-point rule integrates every polynomial of degree <= 2n - 1 "
          "exactly and misses x^2n by the remainder 2^(2n+1) (n!)^4 / ((2n+1) ((2n)!)^3) "
          "f^(2n) (Abramowitz & Stegun 1964, 25.4.29)",
          "[fit]") {
  SECTION("one point: the midpoint rule, node 0 (the root of P_1 = x) and weight "
          "2 / ((1 - 0) P_1'(0)^2) = 2 (A&S 25.4.29)") {
    const auto& g = fit::gauss_legendre(1);
    REQUIRE(g.nodes.size() == 1);
    CHECK(g.nodes[0] == 0.0);
    CHECK(g.weights[0] == Approx(2.0).epsilon(1e-15));
  }
  SECTION("monomials up to degree 2n - 1 on [-1, 1]") {
    for (int n : {1, 2, 3, 4, 5, 7, 10, 15, 20, 30, 50}) {
      const auto& g = fit::gauss_legendre(n);
      for (int k = 0; k <= 2 * n - 1; ++k) {
        INFO("n = " << n << ", x^" << k);
        CHECK(rule(g, k) == Approx(monomial_integral(k)).margin(1e-14));
      }
    }
  }
  SECTION("the remainder for x^2n is the closed form of A&S 25.4.29 (f^(2n) = (2n)!), so "
          "degree 2n is not exact") {
    for (int n = 1; n <= 12; ++n) {
      const auto& g = fit::gauss_legendre(n);
      // 2^(2n+1) (n!)^4 / ((2n+1) ((2n)!)^2), in logs to stay finite
      const double ln_r = (2 * n + 1) * std::log(2.0) + 4 * std::lgamma(n + 1.0) -
                          std::log(2 * n + 1.0) - 2 * std::lgamma(2 * n + 1.0);
      const double remainder = std::exp(ln_r);
      const double err = monomial_integral(2 * n) - rule(g, 2 * n);
      INFO("n = " << n << ": error " << err << ", A&S 25.4.29 " << remainder);
      CHECK(err == Approx(remainder).epsilon(1e-8));
    }
  }
  SECTION("a polynomial of degree 2n - 1 with random coefficients on [0.3, 2.1] (affine map of "
          "the rule; exact antiderivative)") {
    std::mt19937_64 rng(5);
    std::uniform_real_distribution<double> u(-1.0, 1.0);
    for (int n : {4, 9, 16, 25}) {
      const int deg = 2 * n - 1;
      std::vector<double> c(std::size_t(deg + 1));
      for (double& v : c)
        v = u(rng);
      const double a = 0.3, b = 2.1;
      double exact = 0;
      for (int k = 0; k <= deg; ++k)
        exact += c[std::size_t(k)] * (std::pow(b, k + 1) - std::pow(a, k + 1)) / (k + 1);
      const auto& g = fit::gauss_legendre(n);
      double q = 0;
      for (std::size_t i = 0; i < g.nodes.size(); ++i) {
        const double x = 0.5 * (a + b) + 0.5 * (b - a) * g.nodes[i];
        double p = 0;
        for (int k = deg; k >= 0; --k)
          p = p * x + c[std::size_t(k)];
        q += g.weights[i] * p;
      }
      q *= 0.5 * (b - a);
      // scale of the terms: sum |c_k| b^(k+1)/(k+1)
      double scale = 0;
      for (int k = 0; k <= deg; ++k)
        scale += std::fabs(c[std::size_t(k)]) * std::pow(b, k + 1) / (k + 1);
      INFO("n = " << n << ": rule " << q << ", exact " << exact);
      CHECK(std::fabs(q - exact) < 1e-13 * scale);
    }
  }
  CHECK_THROWS_AS(fit::gauss_legendre(0), std::invalid_argument);
}

TEST_CASE("gauss_hermite(n): the n-point rule integrates x^k exp(-x^2) exactly for k <= 2n - 1, "
          "against the closed form Gamma((k + 1)/2) for even k and 0 for odd k "
          "(Abramowitz & Stegun 1964, 6.1.1 and 25.4.46)",
          "[fit][quadrature]") {
  // (for n = 20 the eigenvalues' round-off reaches 1e-10 of the largest terms at k = 39)
  for (int n : {1, 2, 5, 7, 12}) {
    const auto& g = fit::gauss_hermite(n);
    REQUIRE(g.nodes.size() == std::size_t(n));
    for (int k = 0; k <= 2 * n - 1; ++k) {
      double s = 0, scale = 0; // scale: the sum of |terms|, which sets the round-off
      for (int i = 0; i < n; ++i) {
        const double term = g.weights[std::size_t(i)] * std::pow(g.nodes[std::size_t(i)], k);
        s += term, scale += std::fabs(term);
      }
      const double exact = k % 2 ? 0.0 : std::tgamma((k + 1) / 2.0);
      INFO("n = " << n << ", k = " << k);
      CHECK(std::fabs(s - exact) <= 1e-10 * scale); // eigenvalue round-off grows with k
    }
  }
  // the 5-point rule's largest node, tabulated in A&S Table 25.10 (value from memory)
  CHECK(fit::gauss_hermite(5).nodes[4] == Approx(2.020182870456086).epsilon(1e-13));
  CHECK_THROWS_AS(fit::gauss_hermite(0), std::invalid_argument);
}

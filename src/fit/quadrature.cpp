#include "undertow/fit/quadrature.hpp"

#include <Eigen/Dense>
#include <cmath>
#include <map>
#include <mutex>
#include <stdexcept>

#include "undertow/units.hpp"

namespace undertow::fit {
namespace {

GaussLegendre compute(int n) {
  GaussLegendre g;
  g.nodes.resize(std::size_t(n));
  g.weights.resize(std::size_t(n));
  for (int i = 0; i < (n + 1) / 2; ++i) {
    // Tricomi's starting value for the i-th largest root
    double x = std::cos(units::pi * (i + 0.75) / (n + 0.5));
    double dp = 1;
    for (int it = 0; it < 100; ++it) {
      double p0 = 1, p1 = x; // P_0, P_1, then the three-term recurrence
      for (int k = 2; k <= n; ++k) {
        const double p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      const double p = n == 1 ? x : p1, pm = n == 1 ? 1 : p0;
      dp = n * (x * p - pm) / (x * x - 1);
      const double dx = p / dp;
      x -= dx;
      if (std::fabs(dx) < 1e-16) break;
    }
    const double w = 2 / ((1 - x * x) * dp * dp);
    g.nodes[std::size_t(n - 1 - i)] = x;
    g.nodes[std::size_t(i)] = -x;
    g.weights[std::size_t(i)] = g.weights[std::size_t(n - 1 - i)] = w;
  }
  if (n % 2 == 1) g.nodes[std::size_t(n / 2)] = 0;
  return g;
}

} // namespace

const GaussLegendre& gauss_legendre(int n) {
  if (n < 1) throw std::invalid_argument("gauss_legendre: n must be at least 1");
  static std::mutex m;
  static std::map<int, GaussLegendre> cache;
  std::lock_guard<std::mutex> lock(m);
  auto it = cache.find(n);
  if (it == cache.end()) it = cache.emplace(n, compute(n)).first;
  return it->second;
}

const GaussHermite& gauss_hermite(int n) {
  if (n < 1 || n > 64) throw std::invalid_argument("gauss_hermite: n must lie in [1, 64]");
  static std::mutex m;
  static std::map<int, GaussHermite> cache;
  std::lock_guard<std::mutex> lock(m);
  auto it = cache.find(n);
  if (it != cache.end()) return it->second;
  // the recurrence of the orthonormal Hermite polynomials: x p_k = b_k p_{k-1} + b_{k+1} p_{k+1},
  // b_k = sqrt(k / 2)
  Eigen::MatrixXd J = Eigen::MatrixXd::Zero(n, n);
  for (int k = 1; k < n; ++k)
    J(k, k - 1) = J(k - 1, k) = std::sqrt(k / 2.0);
  const Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(J);
  GaussHermite g;
  for (int k = 0; k < n; ++k) {
    g.nodes.push_back(es.eigenvalues()[k]);
    const double v = es.eigenvectors()(0, k);
    g.weights.push_back(std::sqrt(units::pi) * v * v);
  }
  return cache.emplace(n, std::move(g)).first->second;
}

} // namespace undertow::fit

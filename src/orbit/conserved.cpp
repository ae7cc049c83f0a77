#include "undertow/orbit/conserved.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>

namespace undertow::orbit {

Invariant conserved_quantity(const potential::Model& m, double t0, double t1) {
  const double lo = std::min(t0, t1), hi = std::max(t0, t1);
  Invariant inv;
  inv.kind = Invariant::Kind::energy;
  bool have_speed = false;
  for (const auto& p : m.patterns) {
    const double g_lo = p.growth.factor(lo), g_hi = p.growth.factor(hi);
    const bool constant = (hi <= p.growth.start_myr) || (lo >= p.growth.end_myr());
    if (!constant || g_lo != g_hi)
      return {Invariant::Kind::none, 0, "pattern '" + p.label + "' grows during the integration"};
    if (g_lo == 0) continue; // absent throughout
    if (have_speed && p.pattern_speed != inv.pattern_speed)
      return {Invariant::Kind::none, 0, "patterns rotate at different speeds"};
    inv.kind = Invariant::Kind::jacobi;
    inv.pattern_speed = p.pattern_speed;
    have_speed = true;
  }
  return inv;
}

std::vector<double> evaluate(const Invariant& inv, const potential::Model& m, const PhaseSpace& p,
                             double t_myr) {
  std::vector<double> e(p.size());
  m.potentials(p.x, p.y, p.z, t_myr, e);
  for (std::size_t i = 0; i < p.size(); ++i) {
    e[i] += 0.5 * (p.vx[i] * p.vx[i] + p.vy[i] * p.vy[i] + p.vz[i] * p.vz[i]);
    if (inv.kind == Invariant::Kind::jacobi)
      e[i] -= inv.pattern_speed * (p.y[i] * p.vx[i] - p.x[i] * p.vy[i]);
  }
  return e;
}

std::vector<double> relative_errors(const std::vector<double>& i0, const std::vector<double>& i1) {
  std::vector<double> r(i0.size());
  for (std::size_t i = 0; i < r.size(); ++i)
    r[i] = std::fabs(i1[i] - i0[i]) / std::fabs(i0[i]);
  return r;
}

ErrorSummary summarise(const std::vector<double>& rel, std::size_t n_worst) {
  ErrorSummary s;
  if (rel.empty()) return s;
  std::vector<std::size_t> idx(rel.size());
  std::iota(idx.begin(), idx.end(), 0);
  const std::size_t k = std::min(n_worst, idx.size());
  std::partial_sort(idx.begin(), idx.begin() + long(k), idx.end(),
                    [&](std::size_t a, std::size_t b) { return rel[a] > rel[b]; });
  s.worst.assign(idx.begin(), idx.begin() + long(k));
  for (auto i : s.worst)
    s.worst_error.push_back(rel[i]);
  s.max = rel[idx[0]];
  std::vector<double> v = rel;
  std::nth_element(v.begin(), v.begin() + long(v.size() / 2), v.end());
  s.median = v[v.size() / 2];
  return s;
}

} // namespace undertow::orbit

#include "undertow/compare/local.hpp"

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>

#include "undertow/compare/neighbour_field.hpp"
#include "undertow/compare/predictive.hpp"
#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"

namespace undertow::compare {

LocalResult compare_locally(const std::vector<PlanePoint>& meas, const std::vector<PlanePoint>& sim,
                            const Neighbourhood& nb) {
  if (sim.empty()) throw InputError("local comparison: the simulation has no young sources");
  std::vector<double> x, y;
  std::vector<std::array<double, 3>> v;
  for (const auto& s : sim)
    x.push_back(s.x), y.push_back(s.y), v.push_back(s.uvw);
  const NeighbourField field(std::move(x), std::move(y), std::move(v));
  LocalResult out;
  for (const auto& m : meas) {
    const auto chosen = nb.kind == Neighbourhood::Kind::nearest
                            ? field.nearest(m.x, m.y, nb.k)
                            : field.within(m.x, m.y, nb.radius_kpc);
    if (chosen.size() < std::max<std::size_t>(nb.min_count, 4))
      throw InputError("local comparison: source '" + m.name + "' has " +
                       std::to_string(chosen.size()) +
                       " simulated young sources nearby (at least " +
                       std::to_string(std::max<std::size_t>(nb.min_count, 4)) +
                       " needed); widen the neighbourhood or simulate more tracers");
    const Predictive pr = predictive(field.moments(chosen, m.x, m.y));
    LocalSource ls;
    ls.name = m.name;
    ls.neighbours = chosen.size();
    Eigen::Matrix3d C;
    for (int a = 0; a < 3; ++a)
      for (int b = 0; b < 3; ++b)
        C(a, b) = m.cov[std::size_t(3 * a + b)];
    const Eigen::Matrix3d total = pr.scale + C;
    ls.dof = effective_dof(pr.nu, pr.scale.trace(), C.trace());
    const Eigen::Vector3d delta = Eigen::Vector3d(m.uvw[0], m.uvw[1], m.uvw[2]) - pr.location;
    const Eigen::LDLT<Eigen::Matrix3d> ldlt(total);
    if (ldlt.info() != Eigen::Success || !(total.determinant() > 0))
      throw InputError("local comparison: the covariance near source '" + m.name + "' is singular");
    ls.chi2 = delta.dot(ldlt.solve(delta));
    ls.p_value = t3_tail(ls.chi2, ls.dof);
    ls.log_likelihood = ln_t3(ls.chi2, std::log(total.determinant()), ls.dof);
    for (int a = 0; a < 3; ++a) {
      ls.predicted[std::size_t(a)] = pr.location[a];
      // one component alone: the univariate predictive t_{k-1} with scale (1 + 1/k) SS_aa/(k - 1)
      // (the marginal of the 3-variate t is not the exact one for a single component)
      const double k = double(chosen.size()), s_aa = pr.scale(a, a) * (k - 3) / (k - 1);
      ls.pull[std::size_t(a)] = normal_equivalent(delta[a] / std::sqrt(s_aa + C(a, a)),
                                                  effective_dof(k - 1, s_aa, C(a, a)));
      for (int b = 0; b < 3; ++b)
        ls.predicted_cov[std::size_t(3 * a + b)] = pr.scale(a, b);
    }
    out.chi2 += ls.chi2;
    out.log_likelihood += ls.log_likelihood;
    if (ls.p_value < kThreeSigmaTail)
      out.outliers.push_back(m.name + " (Q = " + detail::num(ls.chi2) +
                             ", p = " + detail::num(ls.p_value) + ")");
    out.sources.push_back(ls);
  }
  return out;
}

} // namespace undertow::compare

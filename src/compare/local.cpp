#include "undertow/compare/local.hpp"

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"

namespace undertow::compare {

LocalResult compare_locally(const std::vector<PlanePoint>& meas, const std::vector<PlanePoint>& sim,
                            const Neighbourhood& nb) {
  if (sim.empty()) throw InputError("local comparison: the simulation has no young sources");
  LocalResult out;
  std::vector<std::pair<double, std::size_t>> d(sim.size());
  for (const auto& m : meas) {
    for (std::size_t j = 0; j < sim.size(); ++j)
      d[j] = {std::hypot(sim[j].x - m.x, sim[j].y - m.y), j};
    std::vector<std::size_t> chosen;
    if (nb.kind == Neighbourhood::Kind::nearest) {
      const std::size_t k = std::min(nb.k, d.size());
      std::partial_sort(d.begin(), d.begin() + long(k), d.end());
      for (std::size_t j = 0; j < k; ++j)
        chosen.push_back(d[j].second);
    } else {
      for (const auto& [dist, j] : d)
        if (dist <= nb.radius_kpc) chosen.push_back(j);
    }
    if (chosen.size() < std::max<std::size_t>(nb.min_count, 2))
      throw InputError("local comparison: source '" + m.name + "' has " +
                       std::to_string(chosen.size()) +
                       " simulated young sources nearby (at least " + std::to_string(nb.min_count) +
                       " needed); widen the neighbourhood or simulate more tracers");
    LocalSource ls;
    ls.name = m.name;
    ls.neighbours = chosen.size();
    Eigen::Vector3d mu = Eigen::Vector3d::Zero();
    for (auto j : chosen)
      mu += Eigen::Vector3d(sim[j].uvw[0], sim[j].uvw[1], sim[j].uvw[2]);
    mu /= double(chosen.size());
    Eigen::Matrix3d S = Eigen::Matrix3d::Zero();
    for (auto j : chosen) {
      const Eigen::Vector3d e = Eigen::Vector3d(sim[j].uvw[0], sim[j].uvw[1], sim[j].uvw[2]) - mu;
      S += e * e.transpose();
    }
    S /= double(chosen.size() - 1);
    Eigen::Matrix3d C;
    for (int a = 0; a < 3; ++a)
      for (int b = 0; b < 3; ++b)
        C(a, b) = m.cov[3 * a + b];
    const Eigen::Matrix3d total = S + C;
    const Eigen::Vector3d delta = Eigen::Vector3d(m.uvw[0], m.uvw[1], m.uvw[2]) - mu;
    const Eigen::LDLT<Eigen::Matrix3d> ldlt(total);
    if (ldlt.info() != Eigen::Success || !(total.determinant() > 0))
      throw InputError("local comparison: the covariance near source '" + m.name + "' is singular");
    ls.chi2 = delta.dot(ldlt.solve(delta));
    ls.log_likelihood = -0.5 * (ls.chi2 + std::log(std::pow(2 * M_PI, 3) * total.determinant()));
    for (int a = 0; a < 3; ++a) {
      ls.predicted[a] = mu[a];
      ls.pull[a] = delta[a] / std::sqrt(total(a, a));
      for (int b = 0; b < 3; ++b)
        ls.predicted_cov[3 * a + b] = S(a, b);
    }
    out.chi2 += ls.chi2;
    out.log_likelihood += ls.log_likelihood;
    if (ls.chi2 > kChi2ThreeSigma3Dof)
      out.outliers.push_back(m.name + " (chi^2 = " + detail::num(ls.chi2) + ")");
    out.sources.push_back(ls);
  }
  return out;
}

} // namespace undertow::compare

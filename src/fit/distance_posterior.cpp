#include "undertow/fit/distance_posterior.hpp"

#include <algorithm>
#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"

namespace undertow::fit {

template <class LnL>
void DistancePosterior::tabulate(double u_lo, double u_hi, LnL lnl, const double n[3],
                                 const DistancePrior& p, const Geometry& g, int grid,
                                 const std::string& what, bool uniform_in_d) {
  u_lo = std::max(u_lo, p.distance_max_kpc > 0 ? 1 / p.distance_max_kpc : 0.0);
  u_hi = std::min(u_hi, p.distance_min_kpc > 0 ? 1 / p.distance_min_kpc : INFINITY);
  if (!(u_hi > u_lo) || !(u_hi > 0))
    throw InputError(what + " leaves no probability between " + detail::num(p.distance_min_kpc) +
                     " and " + detail::num(p.distance_max_kpc) + " kpc");
  u_.resize(std::size_t(grid));
  std::vector<double> lnp(u_.size());
  double best = -INFINITY, best_d = -INFINITY;
  const double d_far = 1 / u_lo, d_near = 1 / u_hi; // in d: descending, so u ascends
  for (std::size_t i = 0; i < u_.size(); ++i) {
    const double f = double(i) / double(grid - 1);
    const double u = uniform_in_d ? 1 / (d_far - (d_far - d_near) * f) : u_lo + (u_hi - u_lo) * f;
    u_[i] = u;
    if (!(u > 0)) {
      lnp[i] = -INFINITY;
      continue;
    }
    const double d = 1 / u;
    double R = 0, z = 0;
    if (!p.heliocentric()) galactocentric_rz(d, n, g.r0_kpc, g.z_sun_kpc, R, z);
    // density in u: L(u) rho(d) d^2 |dd/du| = L rho u^-4
    lnp[i] = lnl(u) + p.ln_density(d, R, z) - 4 * std::log(u);
    if (lnp[i] > best) best = lnp[i];
    // the mode in distance: the density per unit distance is the density in u times u^2
    if (const double lnd = lnp[i] + 2 * std::log(u); lnd > best_d) best_d = lnd, mode_ = d;
  }
  cdf_.assign(u_.size(), 0.0);
  double prev = std::exp(lnp[0] - best);
  for (std::size_t i = 1; i < u_.size(); ++i) {
    const double q = std::exp(lnp[i] - best);
    cdf_[i] = cdf_[i - 1] + 0.5 * (q + prev) * (u_[i] - u_[i - 1]);
    prev = q;
  }
  const double total = cdf_.back();
  for (double& c : cdf_)
    c /= total;
}

DistancePosterior::DistancePosterior(double w, double s, double w0, const double n[3],
                                     const DistancePrior& p, const Geometry& g, int grid) {
  const double wt = w - w0; // parallax corrected for the zero point
  tabulate(
      wt - 10 * s, wt + 10 * s, [&](double u) { return -0.5 * (wt - u) * (wt - u) / (s * s); }, n,
      p, g, grid, "parallax " + detail::num(w) + " ± " + detail::num(s) + " mas", false);
}

DistancePosterior DistancePosterior::of_distance(double dm, double s, const double n[3],
                                                 const DistancePrior& p, const Geometry& g,
                                                 int grid) {
  DistancePosterior out;
  // u over d_m ± 10 σ_d (d > 0): the Gaussian in d, written in u
  const double d_lo = std::max(dm - 10 * s, 1e-3 * dm), d_hi = dm + 10 * s;
  out.tabulate(
      1 / d_hi, 1 / d_lo, [&](double u) { return -0.5 * (dm - 1 / u) * (dm - 1 / u) / (s * s); }, n,
      p, g, grid, "distance " + detail::num(dm) + " ± " + detail::num(s) + " kpc", true);
  return out;
}

DistancePosterior DistancePosterior::of_source(const residuals::Source& s, double offset_mas,
                                               const double n[3], const DistancePrior& p,
                                               const Geometry& g, int grid) {
  if (s.has_distance()) return of_distance(s.distance_kpc, s.distance_err_kpc, n, p, g, grid);
  return DistancePosterior(s.parallax_mas, s.parallax_err_mas, s.parallax_offset_mas + offset_mas,
                           n, p, g, grid);
}

double DistancePosterior::quantile(double q) const {
  // P(D < d) = P(U > 1/d) = 1 - cdf(u): find u with cdf(u) = 1 - q
  const double target = 1 - q;
  const auto it = std::lower_bound(cdf_.begin(), cdf_.end(), target);
  std::size_t i = std::size_t(it - cdf_.begin());
  i = std::clamp<std::size_t>(i, 1, cdf_.size() - 1);
  const double c0 = cdf_[i - 1], c1 = cdf_[i];
  const double f = c1 > c0 ? (target - c0) / (c1 - c0) : 0.5;
  return 1 / (u_[i - 1] + f * (u_[i] - u_[i - 1]));
}

} // namespace undertow::fit

#include "undertow/fit/distance_posterior.hpp"

#include <algorithm>
#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"

namespace undertow::fit {

DistancePosterior::DistancePosterior(double w, double s, double w0, const double n[3],
                                     const DistancePrior& p, const Geometry& g, int grid) {
  const double wt = w - w0; // parallax corrected for the zero point
  const double u_lo = std::max(p.distance_max_kpc > 0 ? 1 / p.distance_max_kpc : 0.0, wt - 10 * s);
  const double u_hi =
      std::min(p.distance_min_kpc > 0 ? 1 / p.distance_min_kpc : INFINITY, wt + 10 * s);
  if (!(u_hi > u_lo) || !(u_hi > 0))
    throw InputError("parallax " + detail::num(w) + " ± " + detail::num(s) +
                     " mas leaves no probability between " + detail::num(p.distance_min_kpc) +
                     " and " + detail::num(p.distance_max_kpc) + " kpc");
  u_.resize(std::size_t(grid));
  std::vector<double> lnp(u_.size());
  double best = -INFINITY, best_d = -INFINITY;
  for (std::size_t i = 0; i < u_.size(); ++i) {
    const double u = u_lo + (u_hi - u_lo) * double(i) / double(grid - 1);
    u_[i] = u;
    if (!(u > 0)) {
      lnp[i] = -INFINITY;
      continue;
    }
    const double d = 1 / u;
    double R = 0, z = 0;
    if (!p.heliocentric()) galactocentric_rz(d, n, g.r0_kpc, g.z_sun_kpc, R, z);
    // density in u: N(wt | u, s) rho(d) d^2 |dd/du| = N rho u^-4
    lnp[i] = -0.5 * (wt - u) * (wt - u) / (s * s) + p.ln_density(d, R, z) - 4 * std::log(u);
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

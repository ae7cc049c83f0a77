#pragma once
// The posterior of one source's distance given its measured parallax and a distance prior,
// p(d | ϖ) ∝ N(ϖ - ϖ_0 | 1/d, σ_ϖ) p(d), tabulated on a fine grid in true parallax u = 1/d
// (where the likelihood is Gaussian) with its cumulative distribution: quantiles, the median,
// and draws by inverse transform sampling. A selection on the observed parallax does not change
// one source's posterior (the selection probability cancels; docs/fit.md). For a catalog that
// gives distances, the likelihood is a Gaussian in distance instead, N(d_m | d, σ_d), on the
// same grid in u.
#include <vector>

#include <string>

#include "undertow/fit/distance_prior.hpp"
#include "undertow/residuals/catalog.hpp"

namespace undertow::fit {

struct Geometry {
  double r0_kpc = 8.1, z_sun_kpc = 0;
};

class DistancePosterior {
public:
  // n: unit vector toward the source in heliocentric Galactic axes (used by the disk prior).
  // Throws InputError when the parallax leaves no probability inside the prior's range.
  DistancePosterior(double parallax_mas, double sigma_mas, double offset_mas, const double n[3],
                    const DistancePrior& prior, const Geometry& g, int grid = 4097);
  // The posterior of a source whose catalog gives a distance d_m ± σ_d (kpc) instead.
  static DistancePosterior of_distance(double distance_kpc, double sigma_kpc, const double n[3],
                                       const DistancePrior& prior, const Geometry& g,
                                       int grid = 4097);
  // Either, as the catalog's source says (its global zero point offset_mas applies to parallaxes).
  static DistancePosterior of_source(const residuals::Source& s, double offset_mas,
                                     const double n[3], const DistancePrior& prior,
                                     const Geometry& g, int grid = 4097);
  double quantile(double q) const; // distance in kpc with P(D < d) = q
  double median() const { return quantile(0.5); }
  double mode() const { return mode_; }
  // A draw from the posterior given a uniform number in (0, 1).
  double draw(double uniform01) const { return quantile(uniform01); }

private:
  DistancePosterior() = default;
  // Tabulates over [u_lo, u_hi] with the likelihood term lnl(u) (throws as above when empty),
  // the grid uniform in u, or in d = 1/u where the likelihood is Gaussian in distance.
  template <class LnL>
  void tabulate(double u_lo, double u_hi, LnL lnl, const double n[3], const DistancePrior& p,
                const Geometry& g, int grid, const std::string& what, bool uniform_in_d);
  std::vector<double> u_, cdf_; // ascending u; cdf of u (so P(D < d) = 1 - cdf(1/d))
  double mode_ = 0;
};

} // namespace undertow::fit

#include "undertow/sweep/posterior.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <random>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"

namespace undertow::sweep {
namespace {

// Weights ∝ exp(ln L), normalised.
std::vector<double> weights_of(const std::vector<double>& lnl) {
  const double m = *std::max_element(lnl.begin(), lnl.end());
  std::vector<double> w(lnl.size());
  double s = 0;
  for (std::size_t i = 0; i < lnl.size(); ++i)
    s += w[i] = std::exp(lnl[i] - m);
  for (auto& x : w)
    x /= s;
  return w;
}

// The cells of sorted distinct grid values: edges at midpoints, the ends half a spacing out.
std::vector<double> cell_edges(const std::vector<double>& x) {
  std::vector<double> e(x.size() + 1);
  for (std::size_t k = 1; k < x.size(); ++k)
    e[k] = 0.5 * (x[k - 1] + x[k]);
  e[0] = x[0] - (e[1] - x[0]);
  e[x.size()] = x.back() + (x.back() - e[x.size() - 1]);
  return e;
}

// Quantile q of a density spread evenly over each cell with masses m.
double cell_quantile(const std::vector<double>& edges, const std::vector<double>& m, double q) {
  double c = 0;
  for (std::size_t k = 0; k < m.size(); ++k) {
    if (c + m[k] >= q && m[k] > 0) return edges[k] + (q - c) / m[k] * (edges[k + 1] - edges[k]);
    c += m[k];
  }
  return edges.back();
}

// Quantile q of weighted samples (the weighted empirical CDF, interpolated at mid-weights).
double sample_quantile(const std::vector<double>& x, const std::vector<double>& w, double q) {
  std::vector<std::size_t> idx(x.size());
  for (std::size_t i = 0; i < idx.size(); ++i)
    idx[i] = i;
  std::sort(idx.begin(), idx.end(), [&](auto a, auto b) { return x[a] < x[b]; });
  double c = 0, prev_c = 0, prev_x = x[idx[0]];
  for (std::size_t k = 0; k < idx.size(); ++k) {
    const double mid = c + 0.5 * w[idx[k]];
    if (mid >= q) {
      if (k == 0) return x[idx[0]];
      return prev_x + (q - prev_c) / (mid - prev_c) * (x[idx[k]] - prev_x);
    }
    prev_c = mid, prev_x = x[idx[k]];
    c += w[idx[k]];
  }
  return x[idx.back()];
}

} // namespace

SweepPosterior sweep_posterior(const std::vector<std::string>& keys,
                               const std::vector<std::string>& units,
                               const std::vector<PosteriorPoint>& pts, const PosteriorOptions& o) {
  const SourcePlace where{"", 0, 0, "posterior"};
  if (pts.size() < 2)
    throw InputError(where, "a posterior needs at least two points; this sweep has " +
                                std::to_string(pts.size()));
  const std::size_t np = keys.size(), n = pts.size();
  std::vector<std::vector<double>> distinct(np);
  for (std::size_t j = 0; j < np; ++j) {
    for (const auto& p : pts)
      distinct[j].push_back(p.values[j]);
    std::sort(distinct[j].begin(), distinct[j].end());
    distinct[j].erase(std::unique(distinct[j].begin(), distinct[j].end()), distinct[j].end());
    if (distinct[j].size() < 2)
      throw InputError(where, "'" + keys[j] +
                                  "' takes one value only: a posterior needs at "
                                  "least two (sweep it, or leave it out)");
  }
  for (const auto& p : pts)
    if (!std::isfinite(p.log_likelihood)) throw InputError(where, "a point has no finite ln L");
  if (o.grid)
    for (std::size_t j = 0; j < np; ++j)
      if (distinct[j].size() < 3)
        throw InputError(where, "'" + keys[j] + "' takes " + std::to_string(distinct[j].size()) +
                                    " values: a grid posterior needs at least 3 of each "
                                    "parameter, so that its mass can lie away from the edges");

  SweepPosterior out;
  out.noise_known = std::any_of(pts.begin(), pts.end(), [](auto& p) { return p.error > 0; });
  // the posterior weights, averaged over redraws of ln L within its error
  // ln L plus the log of each point's prior volume: on a grid the product of its cells' widths
  // (so that an uneven or geometric grid still means a uniform prior); a hypercube's points
  // carry equal shares of its own sampling density
  std::vector<std::vector<double>> edges(np);
  if (o.grid)
    for (std::size_t j = 0; j < np; ++j)
      edges[j] = cell_edges(distinct[j]);
  std::vector<double> lnl(n), w(n, 0.0);
  for (std::size_t i = 0; i < n; ++i) {
    lnl[i] = pts[i].log_likelihood;
    if (o.grid)
      for (std::size_t j = 0; j < np; ++j) {
        const auto& e = edges[j];
        const std::size_t k =
            std::size_t(std::lower_bound(distinct[j].begin(), distinct[j].end(), pts[i].values[j]) -
                        distinct[j].begin());
        lnl[i] += std::log(e[k + 1] - e[k]);
      }
  }
  std::vector<std::size_t> best_count(n, 0);
  const int draws = out.noise_known ? std::max(1, o.noise_draws) : 1;
  std::mt19937_64 rng(o.seed);
  std::normal_distribution<double> g(0, 1);
  for (int d = 0; d < draws; ++d) {
    std::vector<double> noise(n), x(n);
    for (std::size_t i = 0; i < n; ++i) {
      noise[i] = out.noise_known ? pts[i].error * g(rng) : 0.0;
      x[i] = lnl[i] + noise[i];
    }
    const auto wd = weights_of(x);
    for (std::size_t i = 0; i < n; ++i)
      w[i] += wd[i] / draws;
    std::size_t bi = 0; // the best by likelihood alone, within the redrawn noise
    for (std::size_t i = 1; i < n; ++i)
      if (pts[i].log_likelihood + noise[i] > pts[bi].log_likelihood + noise[bi]) bi = i;
    ++best_count[bi];
  }
  std::size_t best = 0;
  for (std::size_t i = 1; i < n; ++i)
    if (pts[i].log_likelihood > pts[best].log_likelihood) best = i;
  out.best_point = best;
  out.best_probability = double(best_count[best]) / draws;
  const double lmax = pts[best].log_likelihood;

  for (std::size_t j = 0; j < np; ++j) {
    ParameterPosterior pp;
    pp.key = keys[j];
    pp.unit = j < units.size() ? units[j] : "";
    pp.best = pts[out.best_point].values[j];
    const auto& xs = distinct[j];
    pp.values = xs;
    pp.marginal.assign(xs.size(), 0.0);
    pp.profile.assign(xs.size(), -INFINITY);
    for (std::size_t i = 0; i < n; ++i) {
      const std::size_t k =
          std::size_t(std::lower_bound(xs.begin(), xs.end(), pts[i].values[j]) - xs.begin());
      pp.marginal[k] += w[i];
      pp.profile[k] = std::max(pp.profile[k], pts[i].log_likelihood - lmax);
    }
    if (o.grid) {
      const auto& e = edges[j];
      pp.median = cell_quantile(e, pp.marginal, 0.5);
      pp.lo68 = cell_quantile(e, pp.marginal, 0.15865),
      pp.hi68 = cell_quantile(e, pp.marginal, 0.84135);
      pp.lo95 = cell_quantile(e, pp.marginal, 0.02275),
      pp.hi95 = cell_quantile(e, pp.marginal, 0.97725);
      pp.mass_low_edge = pp.marginal.front(), pp.mass_high_edge = pp.marginal.back();
    } else {
      std::vector<double> v(n);
      for (std::size_t i = 0; i < n; ++i)
        v[i] = pts[i].values[j];
      pp.median = sample_quantile(v, w, 0.5);
      pp.lo68 = sample_quantile(v, w, 0.15865), pp.hi68 = sample_quantile(v, w, 0.84135);
      pp.lo95 = sample_quantile(v, w, 0.02275), pp.hi95 = sample_quantile(v, w, 0.97725);
      // the outermost tenth of the range on each side
      const double lo = xs.front(), hi = xs.back(), span = hi - lo;
      for (std::size_t i = 0; i < n; ++i) {
        if (v[i] < lo + 0.1 * span) pp.mass_low_edge += w[i];
        if (v[i] > hi - 0.1 * span) pp.mass_high_edge += w[i];
      }
    }
    out.parameters.push_back(pp);
  }
  for (const auto& pp : out.parameters) {
    const auto refuse = [&](const char* side, double mass, double at) {
      throw InputError(where, "the posterior puts " + detail::num(std::round(1000 * mass) / 10) +
                                  " % of its mass at the " + side + " edge of '" + pp.key + "' (" +
                                  detail::num(at) + "): extend the grid " +
                                  (std::string(side) == "lower" ? "below " : "above ") +
                                  detail::num(at) + "; its intervals would be set by the grid");
    };
    if (pp.mass_low_edge > o.edge_mass) refuse("lower", pp.mass_low_edge, pp.values.front());
    if (pp.mass_high_edge > o.edge_mass) refuse("upper", pp.mass_high_edge, pp.values.back());
  }
  if (!out.noise_known)
    out.notes.push_back("the points' realisation noise is unknown (one realisation each, no "
                        "replicates): the intervals hold the catalog's information only");
  else
    out.notes.push_back("realisation noise propagated: the posterior is the average over " +
                        std::to_string(draws) + " redraws of every point's ln L within its error");
  if (o.grid)
    out.notes.push_back("prior uniform over the swept box; grid: each value's mass is spread over "
                        "its cell (midpoints to the neighbours); intervals are no finer than the "
                        "grid's spacing");
  else
    out.notes.push_back("prior: the hypercube's own sampling density (uniform, or uniform in the "
                        "logarithm of log-scaled parameters)");
  return out;
}

} // namespace undertow::sweep

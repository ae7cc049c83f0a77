#pragma once
// A posterior over the swept parameters from a sweep's verdicts. Each point of a grid or Latin
// hypercube stands for an equal share of a uniform prior over the swept box (a grid value for
// the cell from the midpoints to its neighbours, the end cells extending half a spacing
// beyond), so p(θ | catalog) ∝ exp(ln L(θ)) on the points. Per parameter: the marginal
// (summed over the others) and the profile (maximised over them), the best point, the
// posterior median and 68 % and 95 % credible intervals (a grid's mass spread evenly over each
// cell; a hypercube's points as weighted samples). The realisations' noise in ln L (the scatter
// over realisations / √K, and replicates) is propagated by redrawing every point's ln L within
// its error: the reported posterior is the average over those draws, and the best point comes
// with the share of draws in which it is best. A posterior whose outermost cells hold a
// significant share of the mass is refused, with the direction in which to extend the grid: its
// intervals would be set by the grid, not by the catalog.
#include <cstdint>
#include <string>
#include <vector>

namespace undertow::sweep {

struct PosteriorPoint {
  std::vector<double> values; // one per parameter
  double log_likelihood = 0;  // the verdict's, mean over realisations (and replicates)
  double error = 0;           // its uncertainty from the realisations; 0: unknown
};

struct PosteriorOptions {
  bool grid = true;        // false: Latin hypercube
  double edge_mass = 0.05; // refuse when an outermost cell holds more than this
  int noise_draws = 400;   // redraws of ln L within its error
  std::uint64_t seed = 1;
};

struct ParameterPosterior {
  std::string key, unit;
  double best = 0, median = 0, lo68 = 0, hi68 = 0, lo95 = 0, hi95 = 0;
  double mass_low_edge = 0, mass_high_edge = 0;
  std::vector<double> values, marginal, profile; // grid: per distinct value (profile: Δ ln L)
};

struct SweepPosterior {
  std::vector<ParameterPosterior> parameters;
  std::size_t best_point = 0;  // index into the points
  double best_probability = 1; // share of noise draws in which it is best
  bool noise_known = false;
  std::vector<std::string> notes;
};

// Throws InputError (field "posterior") for fewer than two distinct values of a parameter, a
// non-finite ln L, or too much mass at an edge (naming the parameter and the direction).
SweepPosterior sweep_posterior(const std::vector<std::string>& keys,
                               const std::vector<std::string>& units,
                               const std::vector<PosteriorPoint>& points,
                               const PosteriorOptions& o);

} // namespace undertow::sweep

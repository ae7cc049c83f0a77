#pragma once
// The likelihood of a catalog under a kinematic model, written for what was measured: for each
// source, p(ϖ, μα*, μδ, v_LSR | θ) = ∫ N₄(measured | predicted(d, θ), C_meas + C_int(d, θ))
// p(d | θ) dd, the unknown distance marginalised by Gauss-Legendre quadrature in true parallax
// u = 1/d over the range where the parallax likelihood and the prior are not negligible. C_meas
// holds the measurement errors with the catalog's correlations (parallax with both proper
// motions, and the two proper motions); C_int is the intrinsic velocity dispersion projected onto
// the proper motions (scaled by 1/(κ d)) and the line of sight. The quadrature nodes depend on the
// data only, so ln L is a smooth function of θ. The normalisation of the distance prior, which
// depends on R0, z☉, the disk scale lengths or the parallax zero point, is integrated on its own
// grid over the prior's range, including the catalog's parallax signal-to-noise selection.
// Cost: linear in sources × nodes; sources are spread over OpenMP threads and summed in a fixed
// order, so ln L has the same bits for any thread count.
#include <vector>

#include "undertow/fit/kinematic_model.hpp"
#include "undertow/fit/measured_sources.hpp"
#include "undertow/residuals/catalog.hpp"

namespace undertow::fit {

class Likelihood {
public:
  // The global parallax zero point ϖ_0: fixed at `value`, or free within [min, max] (the nodes
  // cover that range).
  struct Offset {
    bool free = false;
    double value = 0, min = 0, max = 0;
  };
  // Throws InputError naming a source whose parallax leaves no probability inside the prior's
  // distance range.
  Likelihood(const residuals::Catalog& c, KinematicModel m, Offset offset);

  // ln L(θ), summed over sources; -inf where θ is outside the model's domain.
  double operator()(const FullParams& p, bool parallel = true) const;
  // Per source: ln L_i and the probability that the source belongs to the outlier component.
  void per_source(const FullParams& p, std::vector<double>& ln_l,
                  std::vector<double>* outlier_probability, bool parallel = true) const;

  std::size_t sources() const { return n_; }
  const KinematicModel& model() const { return m_; }

private:
  void source_terms(std::size_t i, const FullParams& p, double& ln_good, double& ln_bad) const;
  double ln_normalisation(std::size_t i, const FullParams& p) const; // cached when constant
  double integrate_normalisation(std::size_t i, const FullParams& p) const;
  // ln P(selected | true distance d) of source i under the parallax S/N cut (zero point offset)
  double ln_selected(std::size_t i, double d, double offset) const;

  KinematicModel m_;
  MeasuredSources s_;
  std::size_t n_ = 0;
  int nodes_ = 0, norm_nodes_ = 48;
  std::vector<double> norm_d_, norm_lnw_; // n_ × norm_nodes_ (ln w includes 2 ln d)
  std::vector<double> norm_lns_;          // ln S(d) when the zero point is fixed
  std::vector<double> norm_lnw_s_;        // norm_lnw_ + norm_lns_
  std::vector<double> ln_z_const_;        // per source, when the normalisation is constant
  bool norm_varies_ = false;
};

} // namespace undertow::fit

#pragma once
// The verdict of a simulation against a measured catalog, written for what was measured: for
// each source, the density of its proper motions and v_LSR given its parallax,
//   p(μα*, μδ, v_LSR | ϖ, model) = Σ_nodes W_j p(μα*, μδ, v_LSR | d_j, ϖ, model),
// with the unknown distance marginalised over the Gauss-Legendre nodes in true parallax of
// fit/measured_sources.hpp (W_j ∝ weight × prior(d_j) × N(ϖ | 1/d_j), normalised over the
// nodes; the distance prior is the comparison's, the same for every model). At each node the k
// simulated young sources nearest in the Galactic plane predict the velocity by the Student-t
// predictive of compare/predictive.hpp (their sampling noise), projected onto the proper motions
// and the line of sight, widened by an intrinsic floor σ_int (motions the simulation does not
// hold: a maser's motion about its star, unresolved gas turbulence) and by the measurement
// covariance, conditional on the parallax error through its correlations with the proper
// motions. Conditioning on the parallax keeps the survey's selection on parallax out of the
// verdict: it is a verdict on motions, not on where the sources are.
// Nuisances: σ_int is marginalised over a uniform prior on [floor_min, floor_max] by
// Gauss-Legendre quadrature (fixed when the two are equal). The Sun's velocity (U☉, Θ0 + V☉,
// W☉), on which every prediction depends linearly, is marginalised over a Gaussian prior (a
// kinematic fit's posterior) by Laplace's method (MacKay 2003, Information Theory, Inference and
// Learning Algorithms, ch. 27), or held fixed, and the result says which. R0 is fixed, or
// marginalised over a Gaussian by Gauss-Hermite quadrature; z☉ is fixed.
#include <array>
#include <string>
#include <vector>

#include <Eigen/Dense>

#include "undertow/fit/distance_prior.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/sky/lsr.hpp"

namespace undertow::compare {

// Simulated young sources in the simulation's Galactocentric frame (kpc, km/s).
struct SimulatedYoung {
  std::vector<double> x, y, z, vx, vy, vz;
};

struct VerdictSettings {
  std::size_t neighbours = 30; // k, at least 5
  int nodes = 24;              // along each line of sight
  fit::DistancePrior prior;
  sky::LsrForm lsr = sky::LsrForm::apex;
  // student: the predictive t of the neighbours (sampling noise); gaussian: that noise ignored;
  // robust: the t's degrees of freedom capped at robust_dof, heavy tails whatever k, so a few
  // sources the model cannot hold (a misassociated maser, a wrong v_LSR) do not decide the verdict
  enum class Tails { student, gaussian, robust } tails = Tails::student;
  double robust_dof = 4;
  double floor_min_kms = 0, floor_max_kms = 15;
  int floor_nodes = 12;
  double r0_kpc = 8.1, z_sun_kpc = 0;
  Eigen::Vector3d sun_velocity_kms{11.1, 240, 7.25}; // (U☉, Θ0 + V☉, W☉): the prior's mean
  bool marginalise_sun = false;
  Eigen::Matrix3d sun_velocity_cov = Eigen::Matrix3d::Identity(); // (km/s)²
  double far_kpc = 1.5; // a node whose k-th neighbour is farther than this is reported
  // R0 marginalised over N(r0_kpc, r0_err_kpc) by Gauss-Hermite quadrature on r0_nodes values,
  // the Sun's velocity prior taken conditional on R0 through their covariance (a fit's joint
  // posterior); each value of R0 moves every line-of-sight node, so each is a whole verdict.
  bool marginalise_r0 = false;
  double r0_err_kpc = 0;
  Eigen::Vector3d sun_velocity_r0_cov = Eigen::Vector3d::Zero(); // cov((U, Θ0+V, W), R0), km/s kpc
  int r0_nodes = 5;
};

struct VerdictResult {
  double log_likelihood = 0;         // marginal over σ_int and (when asked) the Sun's velocity
  double log_likelihood_at_best = 0; // at the joint maximum (σ_int on its quadrature nodes)
  double floor_kms = 0;              // σ_int at that maximum
  double floor_mean_kms = 0;         // its posterior mean
  std::array<double, 3> sun_velocity_kms{}; // at the maximum
  double r0_kpc = 0;                        // the R0 node of the largest posterior weight
  std::vector<std::string> names;
  std::vector<double> source_log_likelihood; // per source, at the maximum
  double far_share = 0; // posterior-weighted share of nodes beyond far_kpc from their neighbours
  std::vector<std::string> notes;
};

// Throws InputError when the simulation has fewer than k young sources, or a source's parallax
// leaves no probability inside the prior's range.
VerdictResult judge(const residuals::Catalog& used, const SimulatedYoung& sim,
                    const VerdictSettings& s);

} // namespace undertow::compare

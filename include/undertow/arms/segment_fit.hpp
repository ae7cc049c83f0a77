#pragma once
// The pitch-angle fit of one arm segment (docs/arms.md): the posterior of the pitch p, the arm's
// radius R_ref at the segment's reference azimuth ψ_ref and its width w, sampled with the ensemble
// sampler (fit/ensemble_sampler.hpp) under the likelihood of arms/segment_likelihood.hpp, with
// priors uniform in p (degrees), ln R_ref and ln w inside their ranges. The Galactic geometry is
// fixed, or several geometries (draws from a kinematic fit's posterior of R0 and z_sun) each get a
// chain of their own and the pooled samples marginalise over them (the arm data's own weak hold on
// R0 is left out: the kinematic fit's posterior stands as the prior and is not updated).
#include <array>
#include <atomic>
#include <cstdint>
#include <string>
#include <vector>

#include "undertow/arms/segment_likelihood.hpp"

namespace undertow::arms {

struct SegmentPriors {
  double pitch_min_deg = 1, pitch_max_deg = 45;
  double width_min_kpc = 0.05, width_max_kpc = 1.5;
  double radius_min_kpc = 1, radius_max_kpc = 30; // of R_ref
  void validate() const;                          // throws detail::ParameterError naming the option
};

struct SegmentSampling {
  int walkers = 24;
  long chunk = 200, steps_max = 8000;
  double tau_multiple = 30; // kept steps >= this × the largest autocorrelation time
  double r_hat_max = 1.03;
  double de_fraction = 0.5;
  std::uint64_t seed = 1;
};

// A posterior summary: the median and the 16th and 84th percentiles.
struct Interval {
  double median = 0, lo = 0, hi = 0;
  double sigma() const { return 0.5 * (hi - lo); }
};

struct SegmentResult {
  std::string group;
  std::size_t sources = 0;
  double psi_ref_deg = 0;
  double window_min_deg = -180, window_max_deg = 180; // the segment's window in ψ (absolute)
  Interval pitch_deg, radius_kpc, width_kpc;
  double ln_radius_mean = 0, pitch_rad_mean = 0; // the posterior mean of (ln R_ref, p) ...
  std::array<double, 3> ln_radius_pitch_cov{};   // ... and its covariance (LL, Lp, pp), p in rad
  double acceptance = 0, tau_max = 0, r_hat_max = 0;
  long steps = 0; // per chain
  bool converged = false, interrupted = false;
  std::vector<std::array<double, 3>> samples; // (p deg, ln R_ref, w kpc), pooled, after burn-in
};

enum class SegmentMethod { marginalised, naive };

// One chain per likelihood (one per Galactic geometry), pooled. `group` names the segment.
SegmentResult fit_segment(const std::vector<const SegmentLikelihood*>& likelihoods,
                          const SegmentPriors& priors, const SegmentSampling& sampling,
                          SegmentMethod method, const std::string& group,
                          const std::atomic<bool>* stop = nullptr);

// The reference azimuth of a segment (radians): the circular mean of its sources' azimuths at
// their measured distances (1/ϖ, or the distance given), which keeps R_ref and p nearly
// uncorrelated. Sources with ϖ <= 0 are left out; all of them: the mean of the directions at 1 kpc.
double reference_azimuth(const std::vector<residuals::Source>& sources, const fit::Geometry& g);

// Each source's Galactocentric azimuth ψ (radians) at its measured distance (1/ϖ, or the distance
// given); NaN where ϖ <= 0.
std::vector<double> measured_azimuths(const std::vector<residuals::Source>& sources,
                                      const fit::Geometry& g);
// The smallest and largest of them as ψ − psi_ref (radians, within ±π).
std::array<double, 2> azimuth_span(const std::vector<residuals::Source>& sources,
                                   const fit::Geometry& g, double psi_ref);

// Refuses (InputError naming the file and the group) a segment that cannot fix a pitch: fewer
// than three sources, or sources spanning less than min_spread_deg of azimuth at their measured
// distances.
void check_segment(const std::vector<residuals::Source>& sources, const fit::Geometry& g,
                   const std::string& group, const std::string& file, double min_spread_deg = 0.5);

} // namespace undertow::arms

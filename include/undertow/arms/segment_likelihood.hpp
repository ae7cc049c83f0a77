#pragma once
// The likelihood of one arm segment's measured parallaxes (or distances) given the sources'
// directions, for a logarithmic spiral arm of pitch p through R_ref at the segment's reference
// azimuth ψ_ref, with a Gaussian profile of dispersion w (kpc) across the arm (docs/arms.md).
//
// Along the line of sight of source i the arm places sources with density per unit distance
//   q_i(d) ∝ d² exp(−δ(d)²/(2w²)) exp(−|z(d)|/h_z) W(ψ(d)),
// δ: the distance across the arm (arms/spiral_geometry.hpp), z: the height above the plane, h_z:
// the sources' scale height, W: the segment's window in azimuth, 1 inside and falling off as a
// Gaussian of 2° outside (a segment is a selection in azimuth: a sight line that leaves it holds
// none of its sources), and the same fall-off, over 0.1 kpc (or w_min if wider), beyond the
// distance range. Conditioning on the direction, the likelihood of the measurement is
//   L_i = ∫ N(ϖ_i | 1/d, σ_i) q_i(d) dd / ∫ q_i(d) dd
// (a Gaussian in distance for a catalog that gives distances): the unknown distance is
// marginalised, never replaced by 1/ϖ. Both integrals use the midpoint rule on uniform grids in d
// with steps h no longer than the narrowest arm allowed (w_min) and, in the numerator, 1/1.5 of the
// narrower of w_min and the measurement's width: for a Gaussian integrand of dispersion σ the
// rule's relative error is about 2 exp(−2π²σ²/h²) (Trefethen & Weideman 2014, SIAM Rev. 56, 385,
// §5), below 1e-8 for σ >= h; the numerator's integrand, a product of two Gaussians, is at least
// min/√2 wide. The grids depend on the Galactic
// geometry (R0, z_sun) only, so they are built once; an evaluation costs one exp per node.
//
// The naive alternative places each source at 1/ϖ (or its given distance) and takes
// δ_i ~ N(0, w): what a fit that ignores distance errors does, kept for comparison.
#include <cstddef>
#include <string>
#include <vector>

#include "undertow/fit/distance_posterior.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/units.hpp"

namespace undertow::arms {

struct SightLines {
  double distance_min_kpc = 0.05, distance_max_kpc = 20; // where sources can be
  double width_min_kpc = 0.05;    // the narrowest arm the fit allows: sets the grid spacing
  double scale_height_kpc = 0.05; // h_z of the sources' vertical density; 0: none
  // the segment's window: the arm holds sources at ψ − ψ_ref in this range (radians)
  double window_lo = -units::pi, window_hi = units::pi;
  void validate() const; // throws detail::ParameterError naming the option
};

class SegmentLikelihood {
public:
  // psi_ref in radians. Throws InputError (the catalog file and line) for a source whose
  // measurement leaves no probability inside the distance range.
  SegmentLikelihood(const std::vector<residuals::Source>& sources, const fit::Geometry& g,
                    double psi_ref, const SightLines& s, const std::string& file = {});
  // ln L summed over the sources, up to a constant that does not depend on (p, R_ref, w).
  double operator()(double pitch_deg, double ln_r_ref, double width_kpc) const;
  // The naive ln L (1/ϖ positions, errors ignored); sources with ϖ <= 0 are left out of it.
  double naive(double pitch_deg, double ln_r_ref, double width_kpc) const;

  std::size_t size() const { return num_begin_.size() - 1; }
  std::size_t nodes() const { return R_.size(); }
  double psi_ref() const { return psi_ref_; }
  double window_lo() const { return window_lo_; } // ψ − ψ_ref, radians
  double window_hi() const { return window_hi_; }
  // Each source's naive position: R (kpc) and ψ − ψ_ref (rad), NaN where ϖ <= 0.
  const std::vector<double>& naive_R() const { return naive_R_; }
  const std::vector<double>& naive_dpsi() const { return naive_dpsi_; }

private:
  double psi_ref_, window_lo_, window_hi_;
  // nodes of all sources, numerator grids first then denominator grids, structure of arrays:
  // R, ln R, ψ − ψ_ref, and the weight (h d² exp(−|z|/h_z), times the measurement's likelihood on
  // the numerator grids) scaled by its source's largest, with that scale's log apart
  std::vector<double> R_, lnR_, dpsi_, w_, lnw_;
  std::vector<std::size_t> num_begin_, den_begin_;
  std::vector<double> num_lnscale_, den_lnscale_;
  std::vector<double> naive_R_, naive_dpsi_;
};

} // namespace undertow::arms

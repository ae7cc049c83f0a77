#pragma once
// How many arms (docs/arms.md): given fitted segments, each summarised by the posterior mean and
// covariance of (ln R_ref, p) at its reference azimuth ψ_j, the evidence for m = 1 … m_max arms
// sharing one pitch p and a regular spacing Δ = (2π/m) tan p in ln R (arms/spiral_geometry.hpp).
// Under m arms, segment j lies on the arm whose ln R at ψ = 0 is φ0 − n_j Δ, so
//   ln R_ref,j = φ0 − n_j Δ − ψ_j tan p,   p_j = p,
// with φ0 uniform over one spacing [0, Δ), p uniform over the pitch range, and each n_j one of
// the Λ/Δ arm crossings that fit in the range of ln R (Λ = ln(R_max/R_min)), all equally likely.
// The evidence Z(m) = ∫∫ dp dφ0 π(p) Δ⁻¹ Π_j [(Δ/Λ) Σ_n N₂(segment j | n, p, φ0)] is computed on
// a grid in (p, φ0). It is compared with segments placed independently (each ln R uniform over Λ,
// one shared pitch): regular spacing must beat that to mean anything. Many arms of small spacing
// fit anything and tend to that baseline, so Z(m) carries its own Occam factor.
#include <array>
#include <string>
#include <vector>

#include "undertow/arms/segment_fit.hpp"

namespace undertow::arms {

struct SegmentSummary {
  std::string group;
  double psi_ref_rad = 0;
  double ln_radius = 0, pitch_rad = 0; // posterior mean
  std::array<double, 3> cov{};         // of (ln R_ref, p): LL, Lp, pp
};
SegmentSummary summary_of(const SegmentResult& r);

struct ArmCountSettings {
  int m_max = 8;
  double pitch_min_deg = 1, pitch_max_deg = 45;
  double radius_min_kpc = 1, radius_max_kpc = 30;
  int pitch_nodes = 600, phase_nodes = 256;
  double reference_radius_kpc = 8.15; // where the arms' azimuth is reported (usually R0)
};

struct ArmCountResult {
  std::vector<int> m;
  // ln Z(m) − ln Z(independent segments), and the posterior probability of m (equal priors)
  std::vector<double> ln_evidence, probability;
  int best_m = 0;
  double ln_bayes_factor_next = 0;        // ln Z(best m) − ln Z(the next best m)
  double ln_bayes_factor_independent = 0; // ln Z(best m) − ln Z(independent segments)
  // at the best m: the shared pitch (degrees, from the grid posterior) and the azimuth (degrees,
  // in (−180/m, 180/m]) at which an arm crosses reference_radius_kpc, with its circular spread
  Interval pitch_deg;
  double arm_azimuth_deg = 0, arm_azimuth_sigma_deg = 0;
  // at the best m: each segment's arm relative to the first segment's (0: the same arm, k: the
  // k-th arm inward of it, modulo m), its probability, and the probability of the same arm
  std::vector<int> arm;
  std::vector<double> arm_probability, same_arm_as_first;
};

// Throws InputError when fewer than two segments are given (nothing to space).
ArmCountResult count_arms(const std::vector<SegmentSummary>& segments, const ArmCountSettings& s);

} // namespace undertow::arms

#pragma once
// Priors on a source's distance along its line of sight, as a density per unit distance
// p(d) ∝ ρ(d) d² between distance_min_kpc and distance_max_kpc (ρ: space density of sources):
//  - uniform: ρ constant (young disk sources within a survey's reach);
//  - disk: an exponential disk, ρ ∝ exp(-R/h_R - |z|/h_z) in Galactocentric R and z (sources of
//    a thin disk seen across several kpc);
//  - edsd: the exponentially decreasing space density of Bailer-Jones (2015, PASP 127, 994),
//    p(d) ∝ d² exp(-d/L), a prior for nearby stars (it pulls distant disk sources too close);
//  - table: ρ(d) given by the user as a table of heliocentric distance and relative density,
//    interpolated linearly in ln ρ.
// A catalog selected by its observed parallax signal-to-noise (ϖ_obs / σ_ϖ > k) makes the prior
// of a selected source p(d) S(d) / Z with S(d) = Φ((1/d + ϖ_0)/σ_ϖ - k); the likelihood of the
// measured parallax then carries 1/S(d), so only the normalisation Z = ∫ p S dd remains
// (docs/fit.md).
#include <cmath>
#include <string>
#include <vector>

namespace undertow::fit {

struct DistancePrior {
  enum class Kind { uniform, disk, edsd, table } kind = Kind::uniform;
  double distance_min_kpc = 0.0, distance_max_kpc = 20.0;
  double edsd_length_kpc = 1.35;
  double disk_scale_length_kpc = 3.0, disk_scale_height_kpc = 0.1; // disk (fit parameters too)
  std::vector<double> table_distance_kpc, table_ln_density;        // table, ascending distance
  double parallax_snr_min = 0; // the catalog's selection on ϖ_obs/σ_ϖ; 0: none

  // Throws InputError naming the key ("distance_max_kpc", ...) for an invalid setting.
  void validate() const;
  // ln ρ at heliocentric distance d and Galactocentric (R, z), without the d² volume factor.
  double ln_density(double d_kpc, double R_kpc, double z_kpc) const;
  // True when ρ does not depend on the Galactic geometry (R0, z_sun) nor on fit parameters.
  bool heliocentric() const { return kind != Kind::disk; }
};

DistancePrior::Kind distance_prior_from_name(const std::string& name); // throws InputError
std::string distance_prior_name(DistancePrior::Kind k);

// Reads a two-column table (distance_kpc, density) from a CSV file; density > 0.
void read_density_table(const std::string& path, DistancePrior& p);

} // namespace undertow::fit

namespace undertow::fit {

// Galactocentric x, y, z of the point at heliocentric distance d along the unit vector n
// (heliocentric Galactic axes), for the Sun at R0 and height z_sun (the tilted frame of
// docs/conventions.md: the Sun at x = −R0 cos θ, z = z_sun).
inline void galactocentric_xyz(double d, const double n[3], double r0, double z_sun, double& x,
                               double& y, double& z) {
  const double s = z_sun / r0, c = std::sqrt(1 - s * s);
  const double xh = d * n[0] - r0, zh = d * n[2];
  x = c * xh + s * zh, y = d * n[1], z = -s * xh + c * zh;
}

// Its Galactocentric R and z.
inline void galactocentric_rz(double d, const double n[3], double r0, double z_sun, double& R,
                              double& z) {
  double x = 0, y = 0;
  galactocentric_xyz(d, n, r0, z_sun, x, y, z);
  R = std::sqrt(x * x + y * y);
}

} // namespace undertow::fit

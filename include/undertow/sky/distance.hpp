#pragma once
// Distances from parallaxes. 1/parallax is the default; it is biased (too long on average) when
// the fractional parallax error is not small. The alternative is the mode of the posterior with
// an exponentially decreasing space density prior, P(r) ~ r^2 exp(-r/L) (Bailer-Jones 2015,
// PASP 127, 994, §4): the real root of r^3/L - 2 r^2 + (varpi/sigma^2) r - 1/sigma^2 = 0
// (r in kpc, varpi and sigma in mas) that maximises the posterior.
namespace undertow::sky {

inline double inverse_parallax_kpc(double parallax_mas) {
  return 1.0 / parallax_mas;
}
double edsd_mode_kpc(double parallax_mas, double sigma_mas, double length_scale_kpc);
// The posterior median with the same prior (Bailer-Jones et al. 2018, AJ 156, 58 use the median):
// the numerical CDF on a logarithmic grid around the mode.
double edsd_median_kpc(double parallax_mas, double sigma_mas, double length_scale_kpc);

} // namespace undertow::sky

#pragma once
// Peculiar motions of sources: U_s toward the Galactic centre, V_s in the direction of rotation
// minus the circular speed Theta(R), W_s toward the north Galactic pole (docs/conventions.md),
// with uncertainties by Monte Carlo over the measurement errors and by first-order propagation
// (the linearisation of Johnson & Soderblom 1987, AJ 93, 864, evaluated with a numerical
// Jacobian of the full transformation).
#include <array>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "undertow/fit/distance_prior.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/sky/lsr.hpp"
#include "undertow/sky/solar_frame.hpp"

namespace undertow::residuals {

struct RotationCurve {
  enum class Kind { model, flat, linear } kind = Kind::flat;
  std::function<double(double)> model; // Theta(R) in km/s for Kind::model
  double theta0_kms = 230, r0_kpc = 8.1, slope_kms_kpc = 0;
  double at(double R) const;
};

// One set of Galactic parameters (a posterior sample of a kinematic fit).
struct GalacticDraw {
  sky::SolarFrame sun;
  RotationCurve rotation;
};

// The defaults of every route to the residuals (the residuals command, a run's [comparison], a
// sweep's points): Monte Carlo draws per source and bootstrap resamples.
inline constexpr int kDefaultDraws = 1000;
inline constexpr int kDefaultBootstrap = 1000;

struct ResidualSettings {
  sky::SolarFrame sun;
  RotationCurve rotation;
  sky::LsrForm lsr = sky::LsrForm::apex;
  // inverse: 1/ϖ, with Monte Carlo draws of perturbed parallaxes. The others take the distance
  // from the posterior p(d | ϖ, prior) and draw their Monte Carlo distances from it
  // (fit::DistancePosterior): edsd (its mode) and edsd-median with the exponentially decreasing
  // space density prior of length edsd_length_kpc; posterior-median with `prior` (uniform space
  // density in a range, an exponential disk, or a table: docs/fit.md says which suits which
  // sources).
  enum class Distance { inverse, edsd, edsd_median, posterior_median } distance = Distance::inverse;
  double edsd_length_kpc = 1.35;
  fit::DistancePrior prior;
  double parallax_offset_mas = 0; // global zero point: measured = true + offset (+ the catalog's)
  // When not empty, Monte Carlo draw k takes its Galactic parameters from entry k % size (the
  // posterior of a kinematic fit), and the nominal values use `sun` and `rotation`.
  std::vector<GalacticDraw> galactic_draws;
  double parallax_snr_min = 0; // sources below are left out (listed in the result)
  int draws = kDefaultDraws;   // Monte Carlo draws per source
  std::uint64_t seed = 1;
};

struct SourceResidual {
  std::string name, group;
  double distance_kpc = 0, R_kpc = 0, psi_deg = 0, z_kpc = 0;
  std::array<double, 3> uvw{};     // U_s, V_s, W_s at the measured values, km/s
  std::array<double, 3> mc_mean{}; // mean over the draws
  std::array<double, 9> mc_cov{};  // covariance over the draws, (km/s)^2, row-major
  std::array<double, 9> lin_cov{}; // first-order propagation, (km/s)^2
  double frac_parallax_err = 0; // sigma_parallax/parallax; sigma_d/d for a distance given directly
};

struct ResidualResult {
  std::vector<SourceResidual> sources;
  std::vector<std::string> excluded; // "name: why"
  std::vector<std::string> warnings;
};

// U, V, W of one set of observables at one distance.
std::array<double, 3> peculiar_motion(const sky::Observed& o, double distance_kpc,
                                      const sky::SolarFrame& sun, const RotationCurve& rotation,
                                      double* R_out = nullptr, double* psi_out = nullptr,
                                      double* z_out = nullptr);
inline std::array<double, 3> peculiar_motion(const sky::Observed& o, double distance_kpc,
                                             const ResidualSettings& s, double* R_out = nullptr,
                                             double* psi_out = nullptr, double* z_out = nullptr) {
  return peculiar_motion(o, distance_kpc, s.sun, s.rotation, R_out, psi_out, z_out);
}

// "inverse", "edsd-median", "edsd-mode", "posterior-median"; throws InputError otherwise.
ResidualSettings::Distance distance_from_name(const std::string& name);

ResidualResult compute_residuals(const Catalog& c, const ResidualSettings& s);

} // namespace undertow::residuals

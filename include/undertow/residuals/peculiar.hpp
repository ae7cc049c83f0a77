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

struct ResidualSettings {
  sky::SolarFrame sun;
  RotationCurve rotation;
  sky::LsrForm lsr = sky::LsrForm::apex;
  enum class Distance { inverse, edsd, edsd_median } distance = Distance::inverse;
  double edsd_length_kpc = 1.35;
  double min_parallax_snr = 0; // sources below are left out (listed in the result)
  int draws = 1000;            // Monte Carlo draws per source
  std::uint64_t seed = 1;
};

struct SourceResidual {
  std::string name, group;
  double distance_kpc = 0, R_kpc = 0, psi_deg = 0, z_kpc = 0;
  std::array<double, 3> uvw{};     // U_s, V_s, W_s at the measured values, km/s
  std::array<double, 3> mc_mean{}; // mean over the draws
  std::array<double, 9> mc_cov{};  // covariance over the draws, (km/s)^2, row-major
  std::array<double, 9> lin_cov{}; // first-order propagation, (km/s)^2
  double frac_parallax_err = 0;
};

struct ResidualResult {
  std::vector<SourceResidual> sources;
  std::vector<std::string> excluded; // "name: why"
  std::vector<std::string> warnings;
};

// U, V, W of one set of observables at one distance.
std::array<double, 3> peculiar_motion(const sky::Observed& o, double distance_kpc,
                                      const ResidualSettings& s, double* R_out = nullptr,
                                      double* psi_out = nullptr, double* z_out = nullptr);

// "inverse", "edsd-median", "edsd-mode"; throws InputError for any other name.
ResidualSettings::Distance distance_from_name(const std::string& name);

ResidualResult compute_residuals(const Catalog& c, const ResidualSettings& s);

} // namespace undertow::residuals

#pragma once
// The parameters of a kinematic model of a catalog (docs/fit.md): Galactic parameters, the
// rotation curve, the sources' mean peculiar motion and dispersion, a parallax zero point, an
// outlier fraction and the disk prior's scale lengths. Every parameter is fixed or free; a free
// one has a prior: flat (improper, optionally bounded), uniform (bounded) or Gaussian.
#include <array>
#include <cmath>
#include <string>
#include <vector>

#include "undertow/error.hpp"

namespace undertow::fit {

enum class Param {
  r0,                // R0, kpc
  theta0,            // Θ0, km/s
  sun_angular_speed, // Ω☉ = (Θ0 + V☉)/R0, km/s/kpc: an alternative to Θ0
  rotation_slope,    // dΘ/dR, km/s/kpc (linear form)
  rotation_index,    // α of Θ = Θ0 (R/R0)^α (power-law form)
  model_scale,       // s of Θ = s v_c,model(R) (model form)
  u_sun,             // U☉, km/s
  v_sun,             // V☉, km/s
  w_sun,             // W☉, km/s
  z_sun,             // z☉, kpc
  mean_u,            // Ū_s, km/s
  mean_v,            // V̄_s, km/s
  mean_w,            // W̄_s, km/s
  dispersion,        // σ, km/s (isotropic)
  dispersion_u,      // σ_U, km/s (per component)
  dispersion_v,      // σ_V
  dispersion_w,      // σ_W
  parallax_offset,   // ϖ_0, mas: ϖ_measured = ϖ_true + ϖ_0
  outlier_fraction,  // f of the outlier mixture
  disk_scale_length, // h_R of the disk distance prior, kpc
  disk_scale_height, // h_z of the disk distance prior, kpc
  count
};
inline constexpr std::size_t kParams = std::size_t(Param::count);
using FullParams = std::array<double, kParams>;

struct ParamInfo {
  const char* key;   // fit-file key and table column
  const char* plain; // symbol in Markdown and text
  const char* latex; // symbol in LaTeX
  const char* unit;
};
const ParamInfo& param_info(Param p);
// By key; throws InputError listing the valid keys.
Param param_from_key(const std::string& key, const SourcePlace& where);

// Where a parameter must stay for the model to make sense (scales and dispersions positive, the
// outlier fraction in [0, 1]).
bool in_domain(Param p, double v);

struct Prior {
  enum class Kind { flat, uniform, gaussian } kind = Kind::flat;
  double min = -INFINITY, max = INFINITY; // bounds (flat and uniform; hard limits for gaussian)
  double mean = 0, sigma = 1;             // gaussian
  double log_density(double x) const;     // -inf outside the bounds
  bool informative() const { return kind == Kind::gaussian; }
};

struct ParamSetting {
  Param param{};
  bool free = false;
  double value = 0; // fixed value, or the optimiser's starting point
  Prior prior;
  SourcePlace place; // where it was given
};

} // namespace undertow::fit

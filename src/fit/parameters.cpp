#include "undertow/fit/parameters.hpp"

#include <cmath>

#include "undertow/units.hpp"

namespace undertow::fit {
namespace {

constexpr ParamInfo kInfo[kParams] = {
    {"r0_kpc", "R0", "R_0", "kpc"},
    {"theta0_kms", "Θ0", "\\Theta_0", "km/s"},
    {"sun_angular_speed_kms_kpc", "Ω☉", "\\Omega_\\odot", "km/s/kpc"},
    {"rotation_slope_kms_kpc", "dΘ/dR", "\\mathrm{d}\\Theta/\\mathrm{d}R", "km/s/kpc"},
    {"rotation_index", "α", "\\alpha", ""},
    {"model_scale", "s", "s", ""},
    {"u_sun_kms", "U☉", "U_\\odot", "km/s"},
    {"v_sun_kms", "V☉", "V_\\odot", "km/s"},
    {"w_sun_kms", "W☉", "W_\\odot", "km/s"},
    {"z_sun_kpc", "z☉", "z_\\odot", "kpc"},
    {"mean_u_kms", "Ū_s", "\\bar U_s", "km/s"},
    {"mean_v_kms", "V̄_s", "\\bar V_s", "km/s"},
    {"mean_w_kms", "W̄_s", "\\bar W_s", "km/s"},
    {"dispersion_kms", "σ", "\\sigma", "km/s"},
    {"dispersion_u_kms", "σ_U", "\\sigma_U", "km/s"},
    {"dispersion_v_kms", "σ_V", "\\sigma_V", "km/s"},
    {"dispersion_w_kms", "σ_W", "\\sigma_W", "km/s"},
    {"parallax_offset_mas", "ϖ0", "\\varpi_0", "mas"},
    {"outlier_fraction", "f_out", "f_\\mathrm{out}", ""},
    {"disk_scale_length_kpc", "h_R", "h_R", "kpc"},
    {"disk_scale_height_kpc", "h_z", "h_z", "kpc"},
};

} // namespace

const ParamInfo& param_info(Param p) {
  return kInfo[std::size_t(p)];
}

Param param_from_key(const std::string& key, const SourcePlace& where) {
  std::string valid;
  for (std::size_t i = 0; i < kParams; ++i) {
    if (key == kInfo[i].key) return Param(i);
    valid += (i ? ", " : "") + std::string(kInfo[i].key);
  }
  throw InputError(where, "unknown parameter '" + key + "' (valid: " + valid + ")");
}

bool in_domain(Param p, double v) {
  switch (p) {
  case Param::r0:
  case Param::model_scale:
  case Param::disk_scale_length:
  case Param::disk_scale_height:
  case Param::dispersion:
  case Param::dispersion_u:
  case Param::dispersion_v:
  case Param::dispersion_w:
    return v > 0 && std::isfinite(v);
  case Param::outlier_fraction:
    return v >= 0 && v <= 1;
  default:
    return std::isfinite(v);
  }
}

double Prior::log_density(double x) const {
  if (!(x >= min && x <= max)) return -INFINITY;
  if (kind == Kind::gaussian) {
    const double t = (x - mean) / sigma;
    return -0.5 * t * t - std::log(sigma * std::sqrt(2 * units::pi));
  }
  if (kind == Kind::uniform) return -std::log(max - min);
  return 0;
}

} // namespace undertow::fit

#include "undertow/plot/labels.hpp"

#include <cctype>
#include <map>

#include "undertow/io/unit_notation.hpp"

namespace undertow::plot {

std::string parameter_label(const std::string& name) {
  static const std::map<std::string, std::string> known = {
      {"r0_kpc", "R#d0#u [kpc]"},
      {"theta0_kms", "Θ#d0#u [km s#u-1#d]"},
      {"rotation_slope_kms_kpc", "dΘ/dR [km s#u-1#d kpc#u-1#d]"},
      {"u_sun_kms", "U#d⊙#u [km s#u-1#d]"},
      {"v_sun_kms", "V#d⊙#u [km s#u-1#d]"},
      {"w_sun_kms", "W#d⊙#u [km s#u-1#d]"},
      {"z_sun_kpc", "z#d⊙#u [kpc]"},
      {"mean_u_kms", "<U#ds#u> [km s#u-1#d]"},
      {"mean_v_kms", "<V#ds#u> [km s#u-1#d]"},
      {"mean_w_kms", "<W#ds#u> [km s#u-1#d]"},
      {"dispersion_kms", "σ#dvir#u [km s#u-1#d]"},
      {"parallax_offset_mas", "ϖ#d0#u [mas]"},
      {"outlier_fraction", "f#dout#u"},
      {"disk_scale_length_kpc", "h#dR#u [kpc]"},
      {"disk_scale_height_kpc", "h#dz#u [kpc]"},
      {"pattern_speed_kms_kpc", "Ω#dp#u [km s#u-1#d kpc#u-1#d]"},
      {"pitch_deg", "pitch [deg]"},
      {"log_likelihood", "ln L"},
  };
  const auto it = known.find(name);
  if (it != known.end()) return it->second;
  // A unit suffix becomes a bracket: "force_ratio" stays, "amplitude_kpc" -> "amplitude [kpc]".
  const auto [stem, unit] = io::split_unit_suffix(name);
  if (unit.empty()) return name;
  return stem + " [" + plplot_unit(unit) + "]";
}

std::string plplot_unit(const std::string& unit) {
  // through the FITS notation ("km s-1 kpc-1"): each factor, its power raised
  const std::string fits = io::fits_unit(unit);
  std::string out;
  std::size_t b = 0;
  while (b < fits.size()) {
    const std::size_t e = std::min(fits.find(' ', b), fits.size());
    const std::string factor = fits.substr(b, e - b);
    std::size_t k = 0;
    while (k < factor.size() && std::isalpha(static_cast<unsigned char>(factor[k])))
      ++k;
    const std::string base = factor.substr(0, k), power = factor.substr(k);
    out += (out.empty() ? "" : " ") + (base == "solMass" ? std::string("M#d⊙#u") : base) +
           (power.empty() ? "" : "#u" + power + "#d");
    b = e + 1;
  }
  return out;
}

} // namespace undertow::plot

#include "undertow/plot/labels.hpp"

#include <map>

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
  // A unit suffix becomes a bracket: "strength_kms2" stays, "amplitude_kpc" -> "amplitude [kpc]".
  static const std::map<std::string, std::string> units = {{"_kpc", "kpc"},
                                                           {"_kms", "km s#u-1#d"},
                                                           {"_deg", "deg"},
                                                           {"_myr", "Myr"},
                                                           {"_kms_kpc", "km s#u-1#d kpc#u-1#d"},
                                                           {"_msun", "M#d⊙#u"}};
  std::string best;
  for (const auto& [suffix, unit] : units)
    if (name.size() > suffix.size() && name.ends_with(suffix) && suffix.size() > best.size())
      best = suffix;
  if (best.empty()) return name;
  return name.substr(0, name.size() - best.size()) + " [" + units.at(best) + "]";
}

} // namespace undertow::plot

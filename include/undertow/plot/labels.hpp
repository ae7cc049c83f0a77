#pragma once
// Axis labels for the parameters and columns that undertow writes (r0_kpc -> "R₀ [kpc]"), in
// PLplot's text escapes; an unknown name is shown as it is.
#include <string>

namespace undertow::plot {

std::string parameter_label(const std::string& name);
// One of our unit strings ("km/s/kpc", "Msun", "(km/s)^2") in PLplot's escapes, through the FITS
// notation: "km s#u-1#d kpc#u-1#d", "M#d⊙#u", "km#u2#d s#u-2#d".
std::string plplot_unit(const std::string& unit);

} // namespace undertow::plot

#pragma once
// Axis labels for the parameters and columns that undertow writes (r0_kpc -> "R₀ [kpc]"), in
// PLplot's text escapes; an unknown name is shown as it is.
#include <string>

namespace undertow::plot {

std::string parameter_label(const std::string& name);

} // namespace undertow::plot

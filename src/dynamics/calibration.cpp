#include "undertow/dynamics/calibration.hpp"

#include <cmath>
#include <set>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"

namespace undertow::dynamics {

double calibrate(potential::Model& m, double r0_kpc, double theta0_kms,
                 const std::vector<std::string>& labels) {
  // ParameterError names the key, so that a reader reports it at that key's line
  undertow::detail::positive(r0_kpc, "radius_kpc");
  undertow::detail::positive(theta0_kms, "speed_kms");
  if (labels.empty()) throw InputError("calibration: rescale names no component");
  std::set<std::size_t> chosen;
  for (const auto& l : labels)
    chosen.insert(m.component_index(l));
  double fixed = 0, scaled = 0; // contributions to v_c^2 at R0
  for (std::size_t i = 0; i < m.components.size(); ++i) {
    const double v2 = -r0_kpc * m.component_acceleration(i, {r0_kpc, 0, 0})[0];
    (chosen.count(i) ? scaled : fixed) += v2;
  }
  const double factor = (theta0_kms * theta0_kms - fixed) / scaled;
  if (!(factor > 0) || !std::isfinite(factor))
    throw InputError("calibration: cannot reach " + undertow::detail::num(theta0_kms) +
                     " km/s at R = " + undertow::detail::num(r0_kpc) +
                     " kpc: the components not rescaled already give " +
                     undertow::detail::num(std::sqrt(fixed)) + " km/s");
  for (std::size_t i : chosen)
    std::visit([&](auto& c) { c.scale_mass(factor); }, m.components[i].shape);
  return factor;
}

} // namespace undertow::dynamics

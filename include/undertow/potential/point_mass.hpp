#pragma once
// Kepler point mass: Phi = -GM/r.
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct PointMass {
  static constexpr const char* kind = "point-mass";
  static constexpr bool vanishes_at_infinity = true;
  double gm = 0; // G M in kpc (km/s)^2

  static PointMass make(double mass_msun) {
    return {units::G * detail::positive(mass_msun, "mass_msun")};
  }
  UNDERTOW_INLINE double potential(double x, double y, double z) const {
    return -gm / std::sqrt(x * x + y * y + z * z);
  }
  UNDERTOW_INLINE void add_accel(double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double r2 = x * x + y * y + z * z;
    const double f = -gm / (r2 * std::sqrt(r2));
    ax += f * x;
    ay += f * y;
    az += f * z;
  }
  double density(double, double, double) const { return 0.0; } // away from r = 0
  double enclosed_mass(double) const { return gm / units::G; }
  void scale_mass(double s) { gm *= s; }
};

} // namespace undertow::potential

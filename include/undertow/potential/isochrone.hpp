#pragma once
// Hénon's (1959) isochrone: Phi = -GM / (b + sqrt(b^2 + r^2)); Binney & Tremaine (2008) §2.2.2.
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct Isochrone {
  static constexpr const char* kind = "isochrone";
  static constexpr bool vanishes_at_infinity = true;
  double gm = 0; // kpc (km/s)^2
  double b = 1;  // kpc

  static Isochrone make(double mass_msun, double scale_kpc) {
    return {units::G * detail::positive(mass_msun, "mass_msun"),
            detail::positive(scale_kpc, "scale_kpc")};
  }
  UNDERTOW_INLINE double potential(double x, double y, double z) const {
    return -gm / (b + std::sqrt(b * b + x * x + y * y + z * z));
  }
  UNDERTOW_INLINE void add_accel(double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double s = std::sqrt(b * b + x * x + y * y + z * z);
    const double bs = b + s;
    const double f = -gm / (s * bs * bs);
    ax += f * x;
    ay += f * y;
    az += f * z;
  }
  double density(double x, double y, double z) const {
    const double r2 = x * x + y * y + z * z;
    const double s = std::sqrt(b * b + r2);
    const double bs = b + s;
    return (gm / units::G) * (3 * bs * s * s - r2 * (b + 3 * s)) /
           (4 * units::pi * bs * bs * bs * s * s * s);
  }
  double enclosed_mass(double r) const {
    const double s = std::sqrt(b * b + r * r);
    return (gm / units::G) * r * r * r / (s * (b + s) * (b + s));
  }
  void scale_mass(double s) { gm *= s; }
};

} // namespace undertow::potential

#pragma once
// Plummer (1911, MNRAS 71, 460) sphere: Phi = -GM / sqrt(r^2 + b^2).
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct Plummer {
  static constexpr const char* kind = "plummer";
  static constexpr bool vanishes_at_infinity = true;
  double gm = 0; // kpc (km/s)^2
  double b = 1;  // kpc

  static Plummer make(double mass_msun, double scale_kpc) {
    return {units::G * detail::positive(mass_msun, "mass_msun"),
            detail::positive(scale_kpc, "scale_kpc")};
  }
  UNDERTOW_INLINE double potential(double x, double y, double z) const {
    return -gm / std::sqrt(x * x + y * y + z * z + b * b);
  }
  UNDERTOW_INLINE void add_accel(double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double s2 = x * x + y * y + z * z + b * b;
    const double f = -gm / (s2 * std::sqrt(s2));
    ax += f * x;
    ay += f * y;
    az += f * z;
  }
  double density(double x, double y, double z) const {
    const double q = 1 + (x * x + y * y + z * z) / (b * b);
    return 3 * (gm / units::G) / (4 * units::pi * b * b * b) * std::pow(q, -2.5);
  }
  double enclosed_mass(double r) const {
    return (gm / units::G) * r * r * r / std::pow(r * r + b * b, 1.5);
  }
  void scale_mass(double s) { gm *= s; }
};

} // namespace undertow::potential

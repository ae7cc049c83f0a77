#pragma once
// Hernquist (1990, ApJ 356, 359) sphere: Phi = -GM / (r + a).
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct Hernquist {
  static constexpr const char* kind = "hernquist";
  static constexpr bool vanishes_at_infinity = true;
  double gm = 0; // kpc (km/s)^2
  double a = 1;  // kpc

  static Hernquist make(double mass_msun, double scale_kpc) {
    return {units::G * detail::positive(mass_msun, "mass_msun"),
            detail::positive(scale_kpc, "scale_kpc")};
  }
  UNDERTOW_INLINE double potential(double x, double y, double z) const {
    return -gm / (std::sqrt(x * x + y * y + z * z) + a);
  }
  UNDERTOW_INLINE void add_accel(double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double r = std::sqrt(x * x + y * y + z * z + detail::tiny2);
    const double ra = r + a;
    const double f = -gm / (r * ra * ra);
    ax += f * x;
    ay += f * y;
    az += f * z;
  }
  double density(double x, double y, double z) const {
    const double r = std::sqrt(x * x + y * y + z * z);
    const double ra = r + a;
    return (gm / units::G) * a / (2 * units::pi * r * ra * ra * ra);
  }
  double enclosed_mass(double r) const { return (gm / units::G) * r * r / ((r + a) * (r + a)); }
  void scale_mass(double s) { gm *= s; }
};

} // namespace undertow::potential

#pragma once
// Miyamoto & Nagai (1975, PASJ 27, 533) disk: Phi = -GM / sqrt(R^2 + (a + sqrt(z^2 + b^2))^2).
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct MiyamotoNagai {
  static constexpr const char* kind = "miyamoto-nagai";
  static constexpr bool vanishes_at_infinity = true;
  double gm = 0; // kpc (km/s)^2
  double a = 1;  // radial scale, kpc (a = 0 is a Plummer sphere)
  double b = 1;  // vertical scale, kpc

  static MiyamotoNagai make(double mass_msun, double radial_kpc, double vertical_kpc) {
    return {units::G * detail::positive(mass_msun, "mass_msun"),
            detail::non_negative(radial_kpc, "radial_scale_kpc"),
            detail::positive(vertical_kpc, "vertical_scale_kpc")};
  }
  UNDERTOW_INLINE double potential(double x, double y, double z) const {
    const double az = a + std::sqrt(z * z + b * b);
    return -gm / std::sqrt(x * x + y * y + az * az);
  }
  UNDERTOW_INLINE void add_accel(double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double zeta = std::sqrt(z * z + b * b);
    const double s = a + zeta;
    const double d2 = x * x + y * y + s * s;
    const double g = -gm / (d2 * std::sqrt(d2) * zeta); // one division for both factors
    const double f = g * zeta;
    ax += f * x;
    ay += f * y;
    az += g * z * s;
  }
  double density(double x, double y, double z) const {
    const double R2 = x * x + y * y;
    const double zeta = std::sqrt(z * z + b * b);
    const double s = a + zeta;
    const double d2 = R2 + s * s;
    return (gm / units::G) * b * b / (4 * units::pi) * (a * R2 + (a + 3 * zeta) * s * s) /
           (std::pow(d2, 2.5) * zeta * zeta * zeta);
  }
  double total_mass() const { return gm / units::G; }
  void scale_mass(double s) { gm *= s; }
};

} // namespace undertow::potential

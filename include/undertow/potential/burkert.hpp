#pragma once
// Burkert (1995, ApJL 447, L25) cored halo: rho = rho0 r0^3 / ((r + r0)(r^2 + r0^2)).
// M(r) and Phi(r) by partial fractions of the density integrals (derivation in docs/potentials.md).
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct Burkert {
  static constexpr const char* kind = "burkert";
  static constexpr bool vanishes_at_infinity = true;
  double gpr3 = 0; // G pi rho0 r0^3, kpc (km/s)^2
  double r0 = 1;   // kpc

  static Burkert make(double rho0_msun_kpc3, double core_kpc) {
    const double rho = detail::positive(rho0_msun_kpc3, "density_msun_kpc3");
    const double r = detail::positive(core_kpc, "core_kpc");
    return {units::G * units::pi * rho * r * r * r, r};
  }
  // M(r) / (pi rho0 r0^3) = 2 ln(1+u) + ln(1+u^2) - 2 atan(u)
  UNDERTOW_INLINE static double mass_shape(double u) {
    return 2 * std::log1p(u) + std::log1p(u * u) - 2 * std::atan(u);
  }
  UNDERTOW_INLINE double potential(double x, double y, double z) const {
    const double r = std::sqrt(x * x + y * y + z * z + detail::tiny2);
    const double u = r / r0;
    const double outer =
        units::pi / 4 + 0.5 * std::log1p(u) - 0.25 * std::log1p(u * u) - 0.5 * std::atan(u);
    return -gpr3 * mass_shape(u) / r - 4 * gpr3 / r0 * outer;
  }
  UNDERTOW_INLINE void add_accel(double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double r2 = x * x + y * y + z * z + detail::tiny2;
    const double r = std::sqrt(r2);
    const double f = -gpr3 * mass_shape(r / r0) / (r2 * r);
    ax += f * x;
    ay += f * y;
    az += f * z;
  }
  double density(double x, double y, double z) const {
    const double r = std::sqrt(x * x + y * y + z * z);
    return gpr3 / (units::G * units::pi) / ((r + r0) * (r * r + r0 * r0));
  }
  double enclosed_mass(double r) const { return gpr3 / units::G * mass_shape(r / r0); }
  void scale_mass(double s) { gpr3 *= s; }
};

} // namespace undertow::potential

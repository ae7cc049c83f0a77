#pragma once
// Navarro, Frenk & White (1996, ApJ 462, 563) halo: rho = rho_s / (x (1 + x)^2), x = r / r_s,
// Phi = -4 pi G rho_s r_s^3 ln(1 + x) / r.
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct Nfw {
  static constexpr const char* kind = "nfw";
  static constexpr bool vanishes_at_infinity = true;
  double gms = 0; // G 4 pi rho_s r_s^3, kpc (km/s)^2
  double rs = 1;  // kpc

  static Nfw make(double rho_s_msun_kpc3, double scale_kpc) {
    const double rho = detail::positive(rho_s_msun_kpc3, "density_msun_kpc3");
    const double r = detail::positive(scale_kpc, "scale_kpc");
    return {units::G * 4 * units::pi * rho * r * r * r, r};
  }
  // By virial mass: M_vir = (4/3) pi r_vir^3 overdensity rho_crit, r_s = r_vir / c, with
  // rho_crit = 3 H0^2 / (8 pi G) (common practice).
  static Nfw make_virial(double mvir_msun, double concentration, double overdensity,
                         double hubble_kms_mpc) {
    const double m = detail::positive(mvir_msun, "virial_mass_msun");
    const double c = detail::positive(concentration, "concentration");
    const double delta = detail::positive(overdensity, "overdensity");
    const double h0 = detail::positive(hubble_kms_mpc, "hubble_kms_mpc") * 1e-3; // km/s/kpc
    const double rho_crit = 3 * h0 * h0 / (8 * units::pi * units::G);
    const double rvir = std::cbrt(3 * m / (4 * units::pi * delta * rho_crit));
    const double rs = rvir / c;
    const double mu = std::log1p(c) - c / (1 + c);
    return {units::G * m / mu, rs};
  }
  UNDERTOW_INLINE double potential(double x, double y, double z) const {
    const double r = std::sqrt(x * x + y * y + z * z + detail::tiny2);
    return -gms * std::log1p(r / rs) / r;
  }
  UNDERTOW_INLINE void add_accel(double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double r2 = x * x + y * y + z * z + detail::tiny2;
    const double r = std::sqrt(r2);
    const double u = r / rs;
    // M(r) / (4 pi rho_s r_s^3) = ln(1 + u) - u / (1 + u), with one division for both quotients
    const double f = -gms * (std::log1p(u) * (1 + u) - u) / ((1 + u) * r2 * r);
    ax += f * x;
    ay += f * y;
    az += f * z;
  }
  double density(double x, double y, double z) const {
    const double u = std::sqrt(x * x + y * y + z * z) / rs;
    return gms / (units::G * 4 * units::pi * rs * rs * rs) / (u * (1 + u) * (1 + u));
  }
  double enclosed_mass(double r) const {
    const double u = r / rs;
    return gms / units::G * (std::log1p(u) - u / (1 + u));
  }
  void scale_mass(double s) { gms *= s; }
};

} // namespace undertow::potential

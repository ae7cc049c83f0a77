#pragma once
// Spherical power law with a Gaussian cut-off: rho = rho1 (r / r1)^-alpha exp(-(r / rc)^2).
// M(r) = 2 pi rho1 r1^alpha rc^(3-alpha) gamma((3-alpha)/2, (r/rc)^2) and
// Phi(r) = -G M(r) / r - 2 pi G rho1 r1^alpha rc^(2-alpha) Gamma(1 - alpha/2, (r/rc)^2),
// with the (non-normalised) incomplete gamma functions of Boost.Math.
// The kernel calls Boost and therefore does not vectorise; it is exact.
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct TaperedCusp {
  static constexpr const char* kind = "tapered-cusp";
  static constexpr bool vanishes_at_infinity = true;
  double rho1 = 0;  // Msun/kpc^3 at r1
  double r1 = 1;    // kpc
  double alpha = 1; // inner slope, 0 <= alpha < 2
  double rc = 1;    // kpc

  static TaperedCusp make(double rho1_msun_kpc3, double r1_kpc, double alpha, double rc_kpc);

  double mass_at(double r) const; // Msun
  double potential_at_radius(double r) const;
  double potential(double x, double y, double z) const {
    return potential_at_radius(std::sqrt(x * x + y * y + z * z));
  }
  void add_accel(double x, double y, double z, double& ax, double& ay, double& az) const {
    const double r2 = x * x + y * y + z * z + detail::tiny2;
    const double r = std::sqrt(r2);
    const double f = -units::G * mass_at(r) / (r2 * r);
    ax += f * x;
    ay += f * y;
    az += f * z;
  }
  double density(double x, double y, double z) const {
    const double r = std::sqrt(x * x + y * y + z * z);
    return rho1 * std::pow(r / r1, -alpha) * std::exp(-(r / rc) * (r / rc));
  }
  double enclosed_mass(double r) const { return mass_at(r); }
  double total_mass() const;
  void scale_mass(double s) { rho1 *= s; }
};

} // namespace undertow::potential

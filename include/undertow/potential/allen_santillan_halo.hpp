#pragma once
// The halo of Allen & Santillán (1991, RMxAA 22, 255), also used by Irrgang et al. (2013,
// A&A 549, A137, their model I):
//   M(r) = M_h (r/a)^g / (1 + (r/a)^(g-1))                                 for r < L,
//   Phi(r) = -G M(r)/r - G M_h / ((g-1) a) [ F(L/a) - F(r/a) ],
//   F(y) = -(g-1) / (1 + y^(g-1)) + ln(1 + y^(g-1)),
// and for r >= L a point mass M(L): the halo is cut at L.
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct AllenSantillanHalo {
  static constexpr const char* kind = "allen-santillan-halo";
  static constexpr bool vanishes_at_infinity = true;
  double gm = 0;    // G M_h, kpc (km/s)^2
  double a = 1;     // kpc
  double g = 2.02;  // exponent gamma
  double cut = 100; // L, kpc

  static AllenSantillanHalo make(double mass_msun, double scale_kpc, double exponent,
                                 double cutoff_kpc) {
    AllenSantillanHalo h{units::G * detail::positive(mass_msun, "mass_msun"),
                         detail::positive(scale_kpc, "scale_kpc"),
                         detail::positive(exponent, "exponent"),
                         detail::positive(cutoff_kpc, "cutoff_kpc")};
    if (!(h.g > 1 && h.g < 3))
      throw detail::ParameterError("exponent", "must lie in (1, 3), got " + detail::num(h.g));
    return h;
  }
  UNDERTOW_INLINE double gmass(double r) const { // G M(r) for r < L
    const double p = std::pow(r / a, g - 1);
    return gm * p * (r / a) / (1 + p);
  }
  UNDERTOW_INLINE double shape_f(double r) const {
    const double p = std::pow(r / a, g - 1);
    return -(g - 1) / (1 + p) + std::log1p(p);
  }
  UNDERTOW_INLINE double potential(double x, double y, double z) const {
    const double r = std::sqrt(x * x + y * y + z * z + detail::tiny2);
    if (r >= cut) return -gmass(cut) / r;
    return -gmass(r) / r - gm / ((g - 1) * a) * (shape_f(cut) - shape_f(r));
  }
  UNDERTOW_INLINE void add_accel(double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double r2 = x * x + y * y + z * z + detail::tiny2;
    const double r = std::sqrt(r2);
    const double f = -gmass(r < cut ? r : cut) / (r2 * r);
    ax += f * x;
    ay += f * y;
    az += f * z;
  }
  double density(double x, double y, double z) const {
    const double r = std::sqrt(x * x + y * y + z * z);
    if (r >= cut) return 0.0;
    const double yy = r / a, p = std::pow(yy, g - 1);
    // dM/dr = (M_h / a) y^(g-1) (g + y^(g-1)) / (1 + y^(g-1))^2
    const double dmdr = gm / units::G / a * p * (g + p) / ((1 + p) * (1 + p));
    return dmdr / (4 * units::pi * r * r);
  }
  double enclosed_mass(double r) const { return gmass(r < cut ? r : cut) / units::G; }
  void scale_mass(double s) { gm *= s; }
};

} // namespace undertow::potential

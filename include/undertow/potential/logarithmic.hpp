#pragma once
// Flattened logarithmic halo (Binney & Tremaine 2008, §2.3.2, eq. 2.71):
// Phi = (v0^2 / 2) ln(Rc^2 + R^2 + z^2 / q^2).
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct Logarithmic {
  static constexpr const char* kind = "logarithmic";
  static constexpr bool vanishes_at_infinity = false; // Phi grows without bound
  double v02 = 1;                                     // (km/s)^2
  double rc2 = 0;                                     // kpc^2
  double iq2 = 1;                                     // 1 / q^2

  static Logarithmic make(double speed_kms, double core_kpc, double flattening) {
    const double v = detail::positive(speed_kms, "speed_kms");
    const double rc = detail::non_negative(core_kpc, "core_kpc");
    const double q = detail::positive(flattening, "flattening");
    // B&T 2008 §2.3.2: the density is negative somewhere when q < 1/sqrt(2).
    if (q < 1 / std::sqrt(2.0))
      throw detail::ParameterError("flattening", "must be at least 1/sqrt(2) = 0.7071 or the "
                                                 "density turns negative (Binney & Tremaine "
                                                 "2008 §2.3.2), got " +
                                                     detail::num(q));
    return {v * v, rc * rc, 1 / (q * q)};
  }
  UNDERTOW_INLINE double potential(double x, double y, double z) const {
    return 0.5 * v02 * std::log(rc2 + x * x + y * y + z * z * iq2);
  }
  UNDERTOW_INLINE void add_accel(double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double f = -v02 / (rc2 + x * x + y * y + z * z * iq2 + detail::tiny2);
    ax += f * x;
    ay += f * y;
    az += f * z * iq2;
  }
  double density(double x, double y, double z) const {
    const double R2 = x * x + y * y, z2 = z * z, q2 = 1 / iq2;
    const double d = rc2 + R2 + z2 * iq2;
    return v02 / (4 * units::pi * units::G * q2) *
           ((2 * q2 + 1) * rc2 + R2 + std::fmax(2 - iq2, 0.0) * z2) /
           (d * d); // 1/q^2 may round just above 2 at q = 1/sqrt(2)
  }
  void scale_mass(double s) { v02 *= s; }
};

} // namespace undertow::potential

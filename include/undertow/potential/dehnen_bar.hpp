#pragma once
// Quadrupole bar of Dehnen (2000, AJ 119, 800, eq. 1), in three dimensions with the radius r
// in place of R and the factor (R/r)^2 (a common extension; in the plane it is Dehnen's form):
//   Phi = A cos(2 (psi - psi_b(t))) (R/r)^2 f(r),
//   f = (r/r_b)^3 - 2 (r <= r_b),  -(r_b/r)^3 (r >= r_b).
// Written as A Q(x, y) h(r) with Q = R^2 cos(2(psi - psi_b)) a harmonic quadratic and
// h = f / r^2, so no azimuth is computed. The bar's long axis is at psi_b; the force grows as
// 1/r at the very centre, as in the published form.
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct DehnenBar {
  static constexpr const char* kind = "dehnen-bar";
  double amp = 0; // A_f, (km/s)^2
  double rb = 3;  // bar radius, kpc

  static DehnenBar make(double rb_kpc, double amplitude_kms2) {
    return {detail::finite(amplitude_kms2, "amplitude_km2_s2"),
            detail::positive(rb_kpc, "bar_radius_kpc")};
  }
  // Dehnen's strength alpha = 3 (A_f / v0^2) (r_b / R0)^3 with v0 the circular speed at R0.
  static double amplitude_from_strength(double alpha, double v0_kms, double r0_kpc, double rb_kpc) {
    const double q = r0_kpc / rb_kpc;
    return alpha * v0_kms * v0_kms * q * q * q / 3;
  }

  struct At {
    double amp;
    double c2, s2; // cos, sin of 2 psi_b(t)
  };
  At at(double growth, double angle) const {
    return {amp * growth, std::cos(2 * angle), std::sin(2 * angle)};
  }

  // X = -x, Y = y are the axes of psi; Q = (X^2 - Y^2) cos 2psi_b + 2 X Y sin 2psi_b.
  UNDERTOW_INLINE static double quad(const At& w, double x, double y) {
    return (x * x - y * y) * w.c2 - 2 * x * y * w.s2;
  }
  UNDERTOW_INLINE double potential(const At& w, double x, double y, double z) const {
    const double r2 = detail::at_least(x * x + y * y + z * z, 1e-12), r = std::sqrt(r2);
    const double rb3 = rb * rb * rb;
    const double h = r < rb ? r / rb3 - 2 / r2 : -rb3 / (r2 * r2 * r);
    return w.amp * quad(w, x, y) * h;
  }
  UNDERTOW_INLINE void add_accel(const At& w, double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double r2 = detail::at_least(x * x + y * y + z * z, 1e-12), r = std::sqrt(r2);
    const double rb3 = rb * rb * rb, ir3 = 1 / (r2 * r);
    const bool in = r < rb;
    const double h = in ? r / rb3 - 2 / r2 : -rb3 * ir3 / r2;
    const double hp_over_r = in ? (1 / rb3 + 4 * ir3) / r : 5 * rb3 * ir3 * ir3 / r;
    const double Q = quad(w, x, y);
    const double Qx = 2 * x * w.c2 - 2 * y * w.s2, Qy = -2 * y * w.c2 - 2 * x * w.s2;
    const double g = w.amp * Q * hp_over_r;
    ax -= w.amp * h * Qx + g * x;
    ay -= w.amp * h * Qy + g * y;
    az -= g * z;
  }
  // Laplacian of Q h = Q (h'' + 6 h'/r): 12/r^4 + 6/(r r_b^3) inside, 0 outside.
  double density(const At& w, double x, double y, double z) const {
    const double r = std::sqrt(x * x + y * y + z * z);
    if (r >= rb) return 0.0;
    const double lap = 12 / (r * r * r * r) + 6 / (r * rb * rb * rb);
    return w.amp * quad(w, x, y) * lap / (4 * units::pi * units::G);
  }
};

} // namespace undertow::potential

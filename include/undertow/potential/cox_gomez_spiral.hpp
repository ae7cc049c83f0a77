#pragma once
// Three-dimensional spiral arms of Cox & Gómez (2002, ApJS 142, 261, eqs. 8-9):
//   Phi = -4 pi G H rho0 exp(-(R - r0)/R_s) sum_{n=1..3} C_n / (K_n D_n) cos(n gamma)
//         [sech(K_n z / beta_n)]^beta_n,
//   gamma = N (psi - psi_p(t) + ln(R / r0) / tan(alpha)),  K_n = n N / (R sin alpha),
//   beta_n = K_n H (1 + 0.4 K_n H),  D_n = (1 + K_n H + 0.3 (K_n H)^2) / (1 + 0.3 K_n H),
//   C = (8/(3 pi), 1/2, 8/(15 pi)).
// psi is measured in the sense of rotation, so the sign of the ln term makes the arms trail.
// The form is built for the disk: R enters softened as sqrt(R^2 + eps^2), eps = 0.1 pc, so
// the centre gives no NaN; the change is below 1e-8 relative for R > 1 kpc.
#include <array>

#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct CoxGomezSpiral {
  static constexpr const char* kind = "cox-gomez-spiral";
  static constexpr std::array<double, 3> C = {8.0 / (3 * units::pi), 0.5, 8.0 / (15 * units::pi)};
  static constexpr double eps2 = 1e-8; // softening squared, kpc^2
  int arms = 2;
  double nd = 2;                     // arms as a double
  double sin_a = 0.25, tan_a = 0.26; // pitch alpha
  double r0 = 8;                     // kpc
  double inv_rs = 1.0 / 7;           // 1/kpc
  double H = 0.18;                   // kpc
  double pref = 0;                   // 4 pi G H rho0, (km/s)^2

  static CoxGomezSpiral make(int arms, double pitch_deg, double r0_kpc, double rs_kpc, double h_kpc,
                             double rho0_msun_kpc3) {
    if (arms < 1 || arms > 16)
      throw detail::ParameterError("arms", "must be a whole number from 1 to 16, got " +
                                               std::to_string(arms));
    const double p = detail::finite(pitch_deg, "pitch_deg");
    if (!(p > 0 && p < 90))
      throw detail::ParameterError("pitch_deg",
                                   "must lie in (0, 90) degrees, got " + detail::num(p));
    CoxGomezSpiral s;
    s.arms = arms;
    s.nd = arms;
    s.sin_a = std::sin(p * units::deg);
    s.tan_a = std::tan(p * units::deg);
    s.r0 = detail::positive(r0_kpc, "reference_radius_kpc");
    s.inv_rs = 1 / detail::positive(rs_kpc, "radial_scale_kpc");
    s.H = detail::positive(h_kpc, "scale_height_kpc");
    const double rho0 = detail::positive(rho0_msun_kpc3, "density_msun_kpc3");
    s.pref = 4 * units::pi * units::G * s.H * rho0;
    return s;
  }

  struct At {
    double amp;    // growth factor
    double offset; // -N psi_p(t)
  };
  // Offset reduced to [-pi, pi] (see LogSpiral::at).
  At at(double growth, double angle) const {
    return {growth, std::remainder(-nd * angle, 2 * units::pi)};
  }

  template <class T>
  UNDERTOW_INLINE T potential_t(const At& w, const T& x, const T& y, const T& z) const {
    using std::abs, std::atan2, std::cos, std::exp, std::expm1, std::log, std::log1p, std::sqrt;
    const T R = sqrt(x * x + y * y + eps2);
    const T gam = nd * atan2(y, -x) + w.offset + nd * log(R / r0) / tan_a;
    T sum = 0.0;
#pragma GCC unroll 3
    for (int n = 1; n <= 3; ++n) {
      const T K = double(n) * nd / (R * sin_a);
      const T KH = K * H;
      const T beta = KH * (1.0 + 0.4 * KH);
      const T D = (1.0 + KH + 0.3 * KH * KH) / (1.0 + 0.3 * KH);
      const T au = abs(z) / (H * (1.0 + 0.4 * KH));
      const T lc = au + log1p(0.5 * expm1(-2.0 * au)); // ln cosh(u) - stable as u -> 0
      sum = sum + C[n - 1] / (K * D) * cos(double(n) * gam) * exp(-beta * lc);
    }
    return -w.amp * pref * exp((r0 - R) * inv_rs) * sum;
  }
  UNDERTOW_INLINE double potential(const At& w, double x, double y, double z) const {
    return potential_t(w, x, y, z);
  }

  UNDERTOW_INLINE void add_accel(const At& w, double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    const double Rt2 = x * x + y * y;
    const double R = std::sqrt(Rt2 + eps2);
    const double iR = 1.0 / R;
    const double gam = nd * std::atan2(y, -x) + w.offset + nd * std::log(R * (1 / r0)) / tan_a;
    const double c1 = std::cos(gam), s1 = std::sin(gam);
    const double c2 = c1 * c1 - s1 * s1, s2 = 2 * s1 * c1;
    const double c3 = c2 * c1 - s2 * s1, s3 = s2 * c1 + c2 * s1;
    const double cn[3] = {c1, c2, c3}, sn[3] = {s1, s2, s3};
    const double P = -w.amp * pref * std::exp((r0 - R) * inv_rs);
    const double gR = nd / (R * tan_a); // d gamma / dR
    double sR = 0, sPsi = 0, sZ = 0;
#pragma GCC unroll 3
    for (int k = 0; k < 3; ++k) {
      const double n = k + 1;
      const double K = n * nd / (R * sin_a);
      const double KH = K * H;
      const double beta = KH * (1.0 + 0.4 * KH);
      const double num = 1.0 + KH + 0.3 * KH * KH, den = 1.0 + 0.3 * KH;
      const double D = num / den;
      const double wv = 1.0 / (1.0 + 0.4 * KH);
      const double au = std::fabs(z) * wv / H;
      const double t = std::expm1(-2.0 * au);
      const double lc = au + std::log1p(0.5 * t);
      const double th = std::copysign(-t / (2.0 + t), z); // tanh(u)
      const double S = std::exp(-beta * lc);
      const double A = C[k] / (K * D) * S;
      const double dlnS_dK = -H * (1.0 + 0.8 * KH) * lc + beta * th * 0.4 * z * wv * wv;
      const double dlnD_dK = (H + 0.6 * K * H * H) / num - 0.3 * H / den;
      const double dA_dR = A * (-1.0 / K - dlnD_dK + dlnS_dK) * (-K * iR);
      sR += (dA_dR - inv_rs * A) * cn[k] - A * n * sn[k] * gR;
      sPsi += -A * n * sn[k] * nd;
      sZ += A * (-beta * th * wv / H) * cn[k];
    }
    const double dR = P * sR, dpsi = P * sPsi / (Rt2 + detail::tiny2), dz = P * sZ;
    ax -= dR * x * iR + dpsi * y;
    ay -= dR * y * iR - dpsi * x;
    az -= dz;
  }
};

} // namespace undertow::potential

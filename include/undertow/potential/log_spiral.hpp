#pragma once
// Logarithmic m-armed spiral in the tight-winding form (Lin & Shu 1964, ApJ 140, 646;
// Binney & Tremaine 2008, §6.1):
//   Phi = -A F(R) Z(z) cos(chi),  chi = m (psi - psi_p(t)) + m cot(p) ln(R / R_ref),
// psi the Galactocentric azimuth in the sense of rotation, measured from the Sun's direction.
// With A > 0 the potential troughs (the arms) lie at chi = 0: at R_ref, psi = psi_p, and
// the arms trail for pitch p > 0. Envelope F = exp(-(R - R_ref)/R_s) T(R)/T(R_ref) with the
// inner taper T = R^2 / (R^2 + R_in^2), which keeps the force finite at the centre.
// Vertical profile Z = sech^beta(K z / beta), beta = K h (the form of Cox & Gomez 2002, ApJS
// 142, 261, with one K): the arm's density, A F cos(chi) Z [k_e^2 - K^2 tanh^2 + (K^2/beta)
// sech^2] / (4 pi G) with k_e^2 = m^2 / (R^2 sin^2 p) - (F'' + F'/R) / F, lies in a layer of
// thickness ~h and keeps its sign at every height wherever K <= k_e(R). K is therefore the
// smallest k_e inside the outer radius R_out: there the arms are overdense and the gaps
// underdense at every height, and the column density is finite. The sech^2(z/h) profile of
// earlier versions was the case K = 2/h, whose arms turn underdense above the plane.
// h = infinity: no vertical decay (planar arms; infinite column density, midplane use only).
#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

struct LogSpiral {
  static constexpr const char* kind = "log-spiral";
  int m = 2;
  double md = 2;     // m as a double, so the kernels stay in floating point
  double cotp = 1;   // cot(pitch angle)
  double rref = 8;   // kpc
  double inv_rs = 0; // 1 / envelope scale length, 1/kpc (0: flat envelope)
  double rin2 = 1;   // inner taper radius squared, kpc^2
  double inv_h = 0;  // 1 / scale height, 1/kpc (0: no vertical decay)
  double kz = 0;     // K, the vertical decay rate far from the plane, 1/kpc (0: planar)
  double beta = 1;   // K h
  double kz2b = 0;   // 2 K / beta = 2 / h
  double rout = 20;  // kpc, out to which the arm density keeps its sign at every height
  double amp = 0;    // A, (km/s)^2
  double norm = 1;   // 1 / T(R_ref)
  double log_rref = std::log(8.0);

  // k_e^2 at R (1/kpc^2): the squared wavenumber of the arms less the envelope's curvature.
  double effective_wavenumber2(double R) const {
    const double d = R * R + rin2;
    const double g = -inv_rs + 2 * rin2 / (R * d);                      // F'/F
    const double gp = -2 * rin2 * (3 * R * R + rin2) / (R * R * d * d); // (F'/F)'
    return md * md * (1 + cotp * cotp) / (R * R) - (gp + g * g + g / R);
  }

  // pitch in degrees (0, 90); envelope_kpc and height_kpc may be +infinity.
  static LogSpiral make(int arms, double pitch_deg, double rref_kpc, double envelope_kpc,
                        double taper_kpc, double height_kpc, double amplitude_kms2,
                        double outer_kpc = 20) {
    if (arms < 1 || arms > 16)
      throw detail::ParameterError("arms", "must be a whole number from 1 to 16, got " +
                                               std::to_string(arms));
    const double p = detail::finite(pitch_deg, "pitch_deg");
    if (!(p > 0 && p < 90))
      throw detail::ParameterError(
          "pitch_deg", "must lie in (0, 90) degrees (trailing arms), got " + detail::num(p));
    LogSpiral s;
    s.m = arms;
    s.md = arms;
    s.cotp = 1 / std::tan(p * units::deg);
    s.rref = detail::positive(rref_kpc, "reference_radius_kpc");
    if (!(envelope_kpc > 0))
      throw detail::ParameterError("envelope_scale_kpc",
                                   "must be positive, got " + detail::num(envelope_kpc));
    s.inv_rs = 1 / envelope_kpc;
    const double rin = detail::positive(taper_kpc, "inner_taper_kpc");
    s.rin2 = rin * rin;
    if (!(height_kpc > 0))
      throw detail::ParameterError("scale_height_kpc",
                                   "must be positive, got " + detail::num(height_kpc));
    s.inv_h = 1 / height_kpc;
    s.amp = detail::finite(amplitude_kms2, "amplitude_km2_s2");
    s.norm = (s.rref * s.rref + s.rin2) / (s.rref * s.rref);
    s.log_rref = std::log(s.rref);
    s.rout = detail::positive(outer_kpc, "outer_radius_kpc");
    if (s.inv_h > 0) {
      // K = the smallest k_e over (0, R_out]; k_e falls with R but for the taper's bump.
      double k2 = INFINITY;
      for (int i = 1; i <= 4000; ++i) {
        const double R = s.rout * i / 4000.0;
        k2 = std::min(k2, s.effective_wavenumber2(R));
      }
      if (!(k2 > 0))
        throw detail::ParameterError("outer_radius_kpc",
                                     "the envelope falls off faster than the arms wind inside " +
                                         detail::num(s.rout) +
                                         " kpc, so no vertical profile keeps the arms overdense at "
                                         "every height there: lower outer_radius_kpc or lengthen "
                                         "envelope_scale_kpc");
      s.kz = std::sqrt(k2);
      s.beta = s.kz * height_kpc;
      s.kz2b = 2 * s.kz / s.beta;
    }
    return s;
  }

  struct At {
    double amp;    // A times the growth factor
    double offset; // -m psi_p(t)
  };
  // The phase offset is reduced to [-pi, pi]: exact, and it keeps the per-position cos and sin
  // arguments small (libmvec's large-argument path is several times slower).
  At at(double growth, double angle) const {
    return {amp * growth, std::remainder(-md * angle, 2 * units::pi)};
  }

  // Peak over azimuth of |dPhi/dR| at R_ref, z = 0, per unit amplitude A (1/kpc).
  double peak_radial_force_per_amplitude() const {
    const double d = rref * rref + rin2;
    const double fprime = 2 * rref * rin2 / (d * d) * norm - inv_rs;
    const double k = md * cotp / rref;
    return std::sqrt(fprime * fprime + k * k);
  }

  template <class T>
  UNDERTOW_INLINE T potential_t(const At& w, const T& x, const T& y, const T& z) const {
    using std::abs, std::atan2, std::cos, std::exp, std::log, std::sqrt;
    const T R2 = x * x + y * y + detail::tiny2;
    const T R = sqrt(R2);
    const T F = exp((rref - R) * inv_rs) * norm * R2 / (R2 + rin2);
    // Z = sech^beta(K z / beta) = (2 / (1 + e))^beta exp(-K |z|), e = exp(-2 K |z| / beta)
    const T e = exp(-kz2b * abs(z));
    const T Z = exp(beta * log(2.0 / (1.0 + e)) - kz * abs(z));
    const T chi = md * atan2(y, -x) + w.offset + md * cotp * log(R / rref);
    return -w.amp * F * Z * cos(chi);
  }
  UNDERTOW_INLINE double potential(const At& w, double x, double y, double z) const {
    return potential_t(w, x, y, z);
  }

  // The kernel for a compile-time arm number M (M = 0: any m, through atan2). For M >= 1 the
  // factor e^{i M psi} is built from the unit vector (-x + i y)/R by complex multiplication,
  // which saves the atan2 call; both forms give the same potential to rounding.
  template <int M>
  UNDERTOW_INLINE void add_accel_m(const At& w, double x, double y, double z, double& ax,
                                   double& ay, double& az) const {
    // One division for three reciprocals (1/R, 1/(R^2 + R_in^2), 1/(1 + e)): division is the
    // slowest vector operation in this kernel.
    const double R2 = x * x + y * y + detail::tiny2;
    const double R = std::sqrt(R2);
    const double dd = R2 + rin2;
    const double e = std::exp(-kz2b * std::fabs(z));
    const double ope = 1.0 + e;
    const double inv = 1.0 / (R * dd * ope);
    const double iR = inv * dd * ope;
    const double id = inv * R * ope;
    const double iope = inv * R * dd;
    const double E = std::exp((rref - R) * inv_rs) * norm;
    const double Eid = E * id;
    const double F = Eid * R2;
    const double Fp = Eid * (2 * R * rin2 * id - inv_rs * R2);
    const double FoR = Eid * R; // F / R
    const double FoR2 = Eid;    // F / R^2
    const double Z = std::exp(beta * std::log(2.0 * iope) - kz * std::fabs(z));
    const double Zp = -kz * Z * std::copysign((1.0 - e) * iope, z); // dZ/dz = -K tanh Z
    double c, s;
    if constexpr (M == 0) {
      const double chi = md * std::atan2(y, -x) + w.offset + md * cotp * (std::log(R) - log_rref);
      c = std::cos(chi);
      s = std::sin(chi);
    } else {
      const double ux = -x * iR, uy = y * iR; // e^{i psi}
      double pc = ux, ps = uy;
#pragma GCC unroll 16
      for (int k = 1; k < M; ++k) {
        const double t = pc * ux - ps * uy;
        ps = pc * uy + ps * ux;
        pc = t;
      }
      const double phase = w.offset + md * cotp * (std::log(R) - log_rref);
      const double cp = std::cos(phase), sp = std::sin(phase);
      c = pc * cp - ps * sp;
      s = ps * cp + pc * sp;
    }
    const double mk = md * cotp;
    const double dR = -w.amp * Z * (Fp * c - FoR * s * mk); // dPhi/dR
    const double dpsi = w.amp * Z * md * s * FoR2;          // (dPhi/dpsi) / R^2
    const double dz = -w.amp * F * Zp * c;
    ax -= dR * x * iR + dpsi * y;
    ay -= dR * y * iR - dpsi * x;
    az -= dz;
  }
  UNDERTOW_INLINE void add_accel(const At& w, double x, double y, double z, double& ax, double& ay,
                                 double& az) const {
    add_accel_m<0>(w, x, y, z, ax, ay, az);
  }
};

} // namespace undertow::potential

#include "undertow/residuals/peculiar.hpp"

#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/sky/distance.hpp"
#include "undertow/tracers/random.hpp"
#include "undertow/units.hpp"

namespace undertow::residuals {
namespace {

double distance_of(double w, double sw, const ResidualSettings& s) {
  switch (s.distance) {
  case ResidualSettings::Distance::edsd:
    return sky::edsd_mode_kpc(w, sw, s.edsd_length_kpc);
  case ResidualSettings::Distance::edsd_median:
    return sky::edsd_median_kpc(w, sw, s.edsd_length_kpc);
  case ResidualSettings::Distance::inverse:
    break;
  }
  return sky::inverse_parallax_kpc(w);
}

struct Inputs {
  double w, pa, pd, v; // parallax mas, mu_alpha*, mu_delta mas/yr, v_LSR km/s
};

std::array<double, 3> uvw_of(const Source& src, const Inputs& in, double sw,
                             const ResidualSettings& s, double* R = nullptr, double* psi = nullptr,
                             double* z = nullptr, double* d_out = nullptr) {
  const sky::Observed o{src.ra_deg, src.dec_deg, in.pa, in.pd,
                        sky::lsr_to_helio(in.v, src.ra_deg, src.dec_deg, s.lsr)};
  const double d = distance_of(in.w, sw, s);
  if (d_out) *d_out = d;
  return peculiar_motion(o, d, s, R, psi, z);
}

} // namespace

ResidualSettings::Distance distance_from_name(const std::string& n) {
  if (n == "inverse") return ResidualSettings::Distance::inverse;
  if (n == "edsd-median") return ResidualSettings::Distance::edsd_median;
  if (n == "edsd-mode") return ResidualSettings::Distance::edsd;
  throw InputError("unknown distance estimator '" + n + "' (inverse, edsd-median, edsd-mode)");
}

double RotationCurve::at(double R) const {
  switch (kind) {
  case Kind::model:
    return model(R);
  case Kind::flat:
    return theta0_kms;
  case Kind::linear:
    return theta0_kms + slope_kms_kpc * (R - r0_kpc);
  }
  return NAN;
}

std::array<double, 3> peculiar_motion(const sky::Observed& o, double d, const ResidualSettings& s,
                                      double* R_out, double* psi_out, double* z_out) {
  const auto g = sky::to_galactocentric(o, d, s.sun);
  const double R = std::hypot(g.r[0], g.r[1]);
  const double ex = -g.r[0] / R, ey = -g.r[1] / R; // toward the centre
  const double rx = g.r[1] / R, ry = -g.r[0] / R;  // direction of rotation
  if (R_out) *R_out = R;
  if (psi_out) *psi_out = std::atan2(g.r[1], -g.r[0]) / units::deg;
  if (z_out) *z_out = g.r[2];
  return {g.v[0] * ex + g.v[1] * ey, g.v[0] * rx + g.v[1] * ry - s.rotation.at(R), g.v[2]};
}

ResidualResult compute_residuals(const Catalog& c, const ResidualSettings& s) {
  s.sun.validate();
  ResidualResult out;
  std::uint64_t index = 0;
  for (const Source& src : c.sources) {
    ++index;
    const double snr = src.parallax_mas / src.parallax_err_mas;
    if (s.min_parallax_snr > 0 && snr < s.min_parallax_snr) {
      out.excluded.push_back(src.name + ": parallax/error = " + detail::num(snr) + " below " +
                             detail::num(s.min_parallax_snr));
      continue;
    }
    if (s.distance == ResidualSettings::Distance::inverse && !(src.parallax_mas > 0)) {
      out.excluded.push_back(src.name + ": non-positive parallax has no 1/parallax distance");
      continue;
    }
    SourceResidual r;
    r.name = src.name;
    r.group = src.group;
    r.frac_parallax_err = src.parallax_err_mas / std::fabs(src.parallax_mas);
    if (s.distance == ResidualSettings::Distance::inverse && r.frac_parallax_err > 0.1)
      out.warnings.push_back(src.name + ": fractional parallax error " +
                             detail::num(r.frac_parallax_err) +
                             ": 1/parallax is biased (too far on average) at this level");
    const Inputs nominal{src.parallax_mas, src.pmra_masyr, src.pmdec_masyr, src.vlsr_kms};
    r.uvw = uvw_of(src, nominal, src.parallax_err_mas, s, &r.R_kpc, &r.psi_deg, &r.z_kpc,
                   &r.distance_kpc);

    // Monte Carlo: draws from the measurement errors (proper motions correlated as given), each
    // source with its own stream from (seed, source index).
    tracers::TracerStream rng(s.seed, index, 0x5eed);
    std::array<double, 3> sum{};
    std::array<double, 9> sum2{};
    int used = 0;
    const double rho = src.corr_pm, q = std::sqrt(std::fmax(0.0, 1 - rho * rho));
    for (int k = 0; k < s.draws; ++k) {
      const double n1 = rng.normal(), n2 = rng.normal(), n3 = rng.normal(), n4 = rng.normal();
      const Inputs in{src.parallax_mas + src.parallax_err_mas * n1,
                      src.pmra_masyr + src.pmra_err_masyr * n2,
                      src.pmdec_masyr + src.pmdec_err_masyr * (rho * n2 + q * n3),
                      src.vlsr_kms + src.vlsr_err_kms * n4};
      if (s.distance == ResidualSettings::Distance::inverse && !(in.w > 0)) continue; // no distance
      const auto u = uvw_of(src, in, src.parallax_err_mas, s);
      for (int a = 0; a < 3; ++a) {
        sum[a] += u[a];
        for (int b = 0; b < 3; ++b)
          sum2[3 * a + b] += u[a] * u[b];
      }
      ++used;
    }
    if (used < 2) {
      out.excluded.push_back(src.name + ": too few Monte Carlo draws with a positive parallax");
      continue;
    }
    if (used < s.draws)
      out.warnings.push_back(src.name + ": " + std::to_string(s.draws - used) +
                             " Monte Carlo draws had a non-positive parallax and were dropped");
    for (int a = 0; a < 3; ++a)
      r.mc_mean[a] = sum[a] / used;
    for (int a = 0; a < 3; ++a)
      for (int b = 0; b < 3; ++b)
        r.mc_cov[3 * a + b] = (sum2[3 * a + b] - used * r.mc_mean[a] * r.mc_mean[b]) / (used - 1);

    // First-order propagation: J C J^T with the Jacobian by central differences.
    const double sig[4] = {src.parallax_err_mas, src.pmra_err_masyr, src.pmdec_err_masyr,
                           src.vlsr_err_kms};
    double J[3][4];
    for (int k = 0; k < 4; ++k) {
      const double h = 1e-4 * sig[k];
      Inputs p = nominal, m = nominal;
      double* pp[] = {&p.w, &p.pa, &p.pd, &p.v};
      double* mm[] = {&m.w, &m.pa, &m.pd, &m.v};
      *pp[k] += h;
      *mm[k] -= h;
      const auto up = uvw_of(src, p, src.parallax_err_mas, s),
                 um = uvw_of(src, m, src.parallax_err_mas, s);
      for (int a = 0; a < 3; ++a)
        J[a][k] = (up[a] - um[a]) / (2 * h);
    }
    double C[4][4] = {};
    for (int k = 0; k < 4; ++k)
      C[k][k] = sig[k] * sig[k];
    C[1][2] = C[2][1] = rho * sig[1] * sig[2];
    for (int a = 0; a < 3; ++a)
      for (int b = 0; b < 3; ++b) {
        double v = 0;
        for (int k = 0; k < 4; ++k)
          for (int l = 0; l < 4; ++l)
            v += J[a][k] * C[k][l] * J[b][l];
        r.lin_cov[3 * a + b] = v;
      }
    out.sources.push_back(r);
  }
  return out;
}

} // namespace undertow::residuals

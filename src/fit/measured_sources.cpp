#include "undertow/fit/measured_sources.hpp"

#include <algorithm>
#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/fit/quadrature.hpp"
#include "undertow/sky/galactic.hpp"
#include "undertow/units.hpp"

namespace undertow::fit {
namespace {

// The nodes' range in true parallax u: the likelihood's ±7σ around the measured value (a
// parallax widened by the zero point's range, or a distance given directly), cut to the prior's
// distance range.
void node_range(const residuals::Source& s, double dmin, double dmax, double omin, double omax,
                double& u_lo, double& u_hi) {
  if (s.has_distance()) {
    const double d_hi = std::min(dmax, s.distance_kpc + 7 * s.distance_err_kpc),
                 d_lo = std::max(
                     {dmin, s.distance_kpc - 7 * s.distance_err_kpc, 1e-3 * s.distance_kpc});
    u_lo = 1 / d_hi, u_hi = 1 / d_lo;
    return;
  }
  const double wlo = s.parallax_mas - s.parallax_offset_mas - omax,
               whi = s.parallax_mas - s.parallax_offset_mas - omin;
  u_lo = std::max(1 / dmax, wlo - 7 * s.parallax_err_mas);
  u_hi = std::min(dmin > 0 ? 1 / dmin : INFINITY, whi + 7 * s.parallax_err_mas);
}

} // namespace

bool parallax_within_prior(const residuals::Source& s, const DistancePrior& prior, double omin,
                           double omax) {
  double lo = 0, hi = 0;
  node_range(s, prior.distance_min_kpc, prior.distance_max_kpc, omin, omax, lo, hi);
  return hi > lo;
}

MeasuredSources::MeasuredSources(const residuals::Catalog& c, const DistancePrior& prior,
                                 int nodes_per_source, sky::LsrForm lsr_form, double omin,
                                 double omax)
    : n(c.sources.size()), nodes(nodes_per_source) {
  prior.validate();
  if (nodes < 4 || nodes > kMaxNodes)
    throw InputError(SourcePlace{{}, 0, 0, "nodes"},
                     "must lie between 4 and " + std::to_string(kMaxNodes));
  const auto& R = sky::icrs_to_galactic_matrix();
  const auto& gl = gauss_legendre(nodes);
  const double dmin = prior.distance_min_kpc, dmax = prior.distance_max_kpc;
  for (auto* x : {&nx, &ny, &nz,  &ex,  &ey,  &ez,  &qx,  &qy,  &qz,  &lsr, &w, &a,
                  &dd, &v,  &off, &cww, &cwa, &cwd, &caa, &cad, &cdd, &cvv, &sw})
    x->resize(n);
  const std::size_t nn = n * std::size_t(nodes);
  node_u.resize(nn), node_d.resize(nn), node_m.resize(nn), node_lnw.resize(nn);
  distance_given.resize(n);
  if (prior.kind == DistancePrior::Kind::table) node_table.resize(nn);
  for (std::size_t i = 0; i < n; ++i) {
    const auto& s = c.sources[i];
    const double ra = s.ra_deg * units::deg, dec = s.dec_deg * units::deg;
    const sky::Vec3 nv{std::cos(dec) * std::cos(ra), std::cos(dec) * std::sin(ra), std::sin(dec)};
    const sky::Vec3 e{-std::sin(ra), std::cos(ra), 0};
    const sky::Vec3 q{-std::sin(dec) * std::cos(ra), -std::sin(dec) * std::sin(ra), std::cos(dec)};
    const auto ng = sky::mul(R, nv), eg = sky::mul(R, e), qg = sky::mul(R, q);
    nx[i] = ng[0], ny[i] = ng[1], nz[i] = ng[2];
    ex[i] = eg[0], ey[i] = eg[1], ez[i] = eg[2];
    qx[i] = qg[0], qy[i] = qg[1], qz[i] = qg[2];
    lsr[i] = sky::lsr_correction_kms(s.ra_deg, s.dec_deg, lsr_form);
    // a distance given directly stands where the parallax stands: measured value, error, no
    // zero point, no correlation with the proper motions
    const bool given = s.has_distance();
    distance_given[i] = given ? 1 : 0;
    w[i] = given ? s.distance_kpc : s.parallax_mas, a[i] = s.pmra_masyr, dd[i] = s.pmdec_masyr,
    v[i] = s.vlsr_kms;
    off[i] = given ? 0.0 : s.parallax_offset_mas;
    const double sw_ = given ? s.distance_err_kpc : s.parallax_err_mas, sa = s.pmra_err_masyr,
                 sd = s.pmdec_err_masyr;
    sw[i] = sw_;
    cww[i] = sw_ * sw_, caa[i] = sa * sa, cdd[i] = sd * sd;
    cvv[i] = s.vlsr_err_kms * s.vlsr_err_kms;
    cwa[i] = s.corr_w_pa * sw_ * sa, cwd[i] = s.corr_w_pd * sw_ * sd, cad[i] = s.corr_pm * sa * sd;
    // nodes in true parallax: the likelihood's ±7σ around the measured value (widened by the
    // zero point's range), cut to the prior's distance range
    double u_lo = 0, u_hi = 0;
    node_range(s, dmin, dmax, omin, omax, u_lo, u_hi);
    if (!(u_hi > u_lo))
      throw InputError(SourcePlace{c.file, s.line, 0, given ? "distance_kpc" : "parallax_mas"},
                       "source " + s.name +
                           (given ? ": distance " + detail::num(s.distance_kpc) + " ± " +
                                        detail::num(sw_) + " kpc"
                                  : ": parallax " + detail::num(s.parallax_mas) + " ± " +
                                        detail::num(sw_) + " mas") +
                           " leaves no probability between " + detail::num(dmin) + " and " +
                           detail::num(dmax) + " kpc (the distance prior's range)");
    // Gauss-Legendre in the variable the likelihood is Gaussian in: u for a parallax, d for a
    // distance given directly
    const double x_lo = given ? 1 / u_hi : u_lo, x_hi = given ? 1 / u_lo : u_hi;
    const double mid = 0.5 * (x_hi + x_lo), half = 0.5 * (x_hi - x_lo);
    for (int j = 0; j < nodes; ++j) {
      const std::size_t k = i * std::size_t(nodes) + std::size_t(j);
      const double x = mid + half * gl.nodes[std::size_t(j)];
      const double u = given ? 1 / x : x;
      node_u[k] = u;
      node_d[k] = 1 / u;
      node_m[k] = x; // the measured quantity's true value at the node
      // in u: dd = du / u^2 and the prior's volume factor d^2 = u^-2; in d: the factor d^2
      node_lnw[k] = std::log(gl.weights[std::size_t(j)] * half) +
                    (given ? 2 * std::log(x) : -4 * std::log(u));
      if (prior.kind == DistancePrior::Kind::table) node_table[k] = prior.ln_density(1 / u, 0, 0);
    }
  }
}

} // namespace undertow::fit

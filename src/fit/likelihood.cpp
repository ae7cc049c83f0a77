#include "undertow/fit/likelihood.hpp"

#include <algorithm>
#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/detail/log_sum_exp.hpp"
#include "undertow/error.hpp"
#include "undertow/fit/quadrature.hpp"
#include "undertow/sky/solar_frame.hpp"
#include "undertow/units.hpp"

namespace undertow::fit {
namespace {

constexpr double kLn2Pi = 1.8378770664093453;

// Everything a source's node loop needs that depends on θ but not on the node.
struct NodeInputs {
  // directions rotated into the Galactocentric (tilted) frame
  double nx, ny, nz, ex, ey, ez, qx, qy, qz;
  double sx, sy, sz;    // the Sun's position, kpc
  double vsx, vsy, vsz; // the Sun's velocity, km/s
  double mu, mv, mw;    // mean peculiar motion
  double th0, r0, slope, index, scale;
  double s2, su2, sv2, sw2; // intrinsic dispersions squared
  double hr, hz;            // disk prior
  double offset;            // total parallax zero point
  // measured values and covariance
  double w, a, dd, v, lsr, cww, cwa, cwd, caa, cad, cdd, cvv;
  const double* model_vc;
  double model_step;
  int model_n;
};

// ln N₄ and ln prior per node for rotation form K, dispersion isotropic or not, prior kind P.
// Straight-line arithmetic over nodes so the loop vectorises; compiled for three x86-64 levels.
// Returns the log-sum-exp over the nodes when table is null; otherwise adds table[j] (a
// tabulated prior's ln ρ) to each node first.
template <RotationForm K, bool Aniso, DistancePrior::Kind P>
UNDERTOW_CLONES double node_values(const NodeInputs& in, const double* __restrict u,
                                   const double* __restrict dist, const double* __restrict meas,
                                   const double* __restrict lnw, const double* __restrict table,
                                   int n, double* __restrict out) {
  const double kinv = 1 / sky::kKappa;
  // the parallax row of the LDL^T factor is the same at every node
  const double d0 = in.cww, i0 = 1 / d0, l10 = in.cwa * i0, l20 = in.cwd * i0;
#pragma omp simd
  for (int j = 0; j < n; ++j) {
    const double uj = u[j], d = dist[j];
    const double x = in.sx + d * in.nx, y = in.sy + d * in.ny, z = in.sz + d * in.nz;
    const double iR = 1 / std::sqrt(x * x + y * y + detail::tiny2), R = (x * x + y * y) * iR;
    double th;
    if constexpr (K == RotationForm::flat)
      th = in.th0;
    else if constexpr (K == RotationForm::linear)
      th = in.th0 + in.slope * (R - in.r0);
    else if constexpr (K == RotationForm::power_law)
      th = in.th0 * std::exp(in.index * std::log(R / in.r0));
    else {
      const double xr = R / in.model_step;
      int i = int(xr);
      i = i < in.model_n - 2 ? i : in.model_n - 2;
      const double f = xr - i;
      th = in.scale * (in.model_vc[i] + f * (in.model_vc[i + 1] - in.model_vc[i]));
    }
    const double vrot = th + in.mv;
    // toward the centre: -(x, y)/R; rotation: (y, -x)/R
    const double vx = (-in.mu * x + vrot * y) * iR - in.vsx;
    const double vy = (-in.mu * y - vrot * x) * iR - in.vsy;
    const double vz = in.mw - in.vsz;
    const double vr = vx * in.nx + vy * in.ny + vz * in.nz;
    const double ve = vx * in.ex + vy * in.ey + vz * in.ez;
    const double vq = vx * in.qx + vy * in.qy + vz * in.qz;
    const double k = uj * kinv; // mas/yr per km/s at this distance
    // meas: the measured quantity's true value (u, or d for a distance given directly)
    const double r0 = in.w - (meas[j] + in.offset), r1 = in.a - ve * k, r2 = in.dd - vq * k,
                 r3 = in.v - (vr + in.lsr);
    double c11, c12, c13, c22, c23, c33;
    if constexpr (Aniso) {
      // intrinsic covariance sum_k s_k^2 P_k P_k^T, P rows: e, q (scaled by k) and n on the
      // local axes b1 = -(x,y)/R, b2 = (y,-x)/R, b3 = z
      const double e1 = -(in.ex * x + in.ey * y) * iR, e2 = (in.ex * y - in.ey * x) * iR,
                   e3 = in.ez;
      const double q1 = -(in.qx * x + in.qy * y) * iR, q2 = (in.qx * y - in.qy * x) * iR,
                   q3 = in.qz;
      const double n1 = -(in.nx * x + in.ny * y) * iR, n2 = (in.nx * y - in.ny * x) * iR,
                   n3 = in.nz;
      const double k2 = k * k;
      c11 = in.caa + k2 * (in.su2 * e1 * e1 + in.sv2 * e2 * e2 + in.sw2 * e3 * e3);
      c12 = in.cad + k2 * (in.su2 * e1 * q1 + in.sv2 * e2 * q2 + in.sw2 * e3 * q3);
      c22 = in.cdd + k2 * (in.su2 * q1 * q1 + in.sv2 * q2 * q2 + in.sw2 * q3 * q3);
      c13 = k * (in.su2 * e1 * n1 + in.sv2 * e2 * n2 + in.sw2 * e3 * n3);
      c23 = k * (in.su2 * q1 * n1 + in.sv2 * q2 * n2 + in.sw2 * q3 * n3);
      c33 = in.cvv + in.su2 * n1 * n1 + in.sv2 * n2 * n2 + in.sw2 * n3 * n3;
    } else {
      const double t = in.s2 * k * k;
      c11 = in.caa + t, c12 = in.cad, c22 = in.cdd + t;
      c13 = 0, c23 = 0, c33 = in.cvv + in.s2;
    }
    // LDL^T factorisation of the 4x4 covariance (parallax row first; c03 = 0): no square roots,
    // three reciprocals per node
    const double d1 = c11 - l10 * l10 * d0, i1 = 1 / d1;
    const double l21 = (c12 - l20 * l10 * d0) * i1, l31 = c13 * i1;
    const double d2 = c22 - l20 * l20 * d0 - l21 * l21 * d1, i2 = 1 / d2;
    const double l32 = (c23 - l31 * l21 * d1) * i2;
    const double d3 = c33 - l31 * l31 * d1 - l32 * l32 * d2;
    const double y1 = r1 - l10 * r0, y2 = r2 - l20 * r0 - l21 * y1, y3 = r3 - l31 * y1 - l32 * y2;
    const double chi2 = r0 * r0 * i0 + y1 * y1 * i1 + y2 * y2 * i2 + y3 * y3 / d3;
    double lnp;
    if constexpr (P == DistancePrior::Kind::disk) {
      const double zs = z < 0 ? -z : z;
      lnp = -R / in.hr - zs / in.hz;
    } else if constexpr (P == DistancePrior::Kind::edsd) {
      lnp = -d / in.hr; // hr carries the edsd length here
    } else {
      lnp = 0; // uniform; a table's ln rho is added by the caller
    }
    // lnw carries the quadrature weight, du/dd and the prior's volume factor d^2
    out[j] = lnw[j] + lnp - 0.5 * (chi2 + std::log(d0 * d1 * d2 * d3)) - 2 * kLn2Pi;
  }
  if (table)
    for (int j = 0; j < n; ++j)
      out[j] += table[j];
  double m = -INFINITY;
#pragma omp simd reduction(max : m)
  for (int j = 0; j < n; ++j)
    m = out[j] > m ? out[j] : m;
  if (!(m > -INFINITY) || !(m < INFINITY)) return m;
  double sum = 0;
#pragma omp simd reduction(+ : sum)
  for (int j = 0; j < n; ++j)
    sum += std::exp(out[j] - m);
  return m + std::log(sum);
}

using NodeFn = double (*)(const NodeInputs&, const double*, const double*, const double*,
                          const double*, const double*, int, double*);

template <RotationForm K, bool A> NodeFn pick_prior(DistancePrior::Kind p) {
  switch (p) {
  case DistancePrior::Kind::disk:
    return &node_values<K, A, DistancePrior::Kind::disk>;
  case DistancePrior::Kind::edsd:
    return &node_values<K, A, DistancePrior::Kind::edsd>;
  default:
    return &node_values<K, A, DistancePrior::Kind::uniform>;
  }
}
template <RotationForm K> NodeFn pick_aniso(bool a, DistancePrior::Kind p) {
  return a ? pick_prior<K, true>(p) : pick_prior<K, false>(p);
}
NodeFn pick(RotationForm k, bool a, DistancePrior::Kind p) {
  switch (k) {
  case RotationForm::flat:
    return pick_aniso<RotationForm::flat>(a, p);
  case RotationForm::linear:
    return pick_aniso<RotationForm::linear>(a, p);
  case RotationForm::power_law:
    return pick_aniso<RotationForm::power_law>(a, p);
  case RotationForm::model:
    return pick_aniso<RotationForm::model>(a, p);
  }
  return nullptr;
}

// ln ∫ exp(-R/h_R - |z|/h_z) d^2 S(d) dd on the normalisation nodes (lnw carries the weights,
// d^2 and, when the zero point is fixed, ln S): the disk prior's normalisation, vectorised.
UNDERTOW_CLONES double disk_normalisation(const double* __restrict d, const double* __restrict lnw,
                                          int n, double nx, double ny, double nz, double r0,
                                          double z_sun, double hr, double hz,
                                          double* __restrict out) {
  const double s = z_sun / r0, c = std::sqrt(1 - s * s), ihr = 1 / hr, ihz = 1 / hz;
#pragma omp simd
  for (int j = 0; j < n; ++j) {
    const double x = d[j] * nx - r0, y = d[j] * ny, zz = d[j] * nz;
    const double xt = c * x + s * zz, z = -s * x + c * zz;
    const double za = z < 0 ? -z : z;
    out[j] = lnw[j] - std::sqrt(xt * xt + y * y) * ihr - za * ihz;
  }
  double m = -INFINITY;
#pragma omp simd reduction(max : m)
  for (int j = 0; j < n; ++j)
    m = out[j] > m ? out[j] : m;
  double sum = 0;
#pragma omp simd reduction(+ : sum)
  for (int j = 0; j < n; ++j)
    sum += std::exp(out[j] - m);
  return m + std::log(sum);
}

// ln Φ(x), the standard normal CDF; below x = -30, where erfc underflows, the leading terms of
// its asymptotic series (Abramowitz & Stegun 1964, 26.2.12).
double ln_phi(double x) {
  if (x < -30)
    return -0.5 * x * x - std::log(-x) - 0.5 * std::log(2 * units::pi) + std::log1p(-1 / (x * x));
  return std::log(0.5 * std::erfc(-x / std::sqrt(2.0)));
}

double get(const FullParams& p, Param k) {
  return p[std::size_t(k)];
}

} // namespace

Likelihood::Likelihood(const residuals::Catalog& c, KinematicModel m, Offset off)
    : m_(std::move(m)), s_(c, m_.prior, m_.nodes, m_.lsr, off.free ? off.min : off.value,
                           off.free ? off.max : off.value),
      n_(s_.n), nodes_(s_.nodes) {
  if (off.free && std::all_of(s_.distance_given.begin(), s_.distance_given.end(),
                              [](unsigned char g) { return g != 0; }))
    throw InputError(SourcePlace{c.file, 0, 0, "parallax_offset"},
                     "a free parallax zero point, but the catalog gives distances, not "
                     "parallaxes: nothing constrains it; fix it");
  if (m_.rotation == RotationForm::model && m_.model_vc_kms.size() < 2)
    throw InputError("the model rotation curve needs a tabulated circular speed");
  const auto& gn = gauss_legendre(norm_nodes_);
  const double dmin = m_.prior.distance_min_kpc, dmax = m_.prior.distance_max_kpc;
  norm_d_.resize(n_ * std::size_t(norm_nodes_));
  norm_lnw_.resize(n_ * std::size_t(norm_nodes_));
  for (std::size_t i = 0; i < n_; ++i) {
    const double dm = 0.5 * (dmax + dmin), dh = 0.5 * (dmax - dmin);
    for (int j = 0; j < norm_nodes_; ++j) {
      const double d = dm + dh * gn.nodes[std::size_t(j)];
      norm_d_[i * std::size_t(norm_nodes_) + std::size_t(j)] = d;
      norm_lnw_[i * std::size_t(norm_nodes_) + std::size_t(j)] =
          std::log(gn.weights[std::size_t(j)] * dh) + 2 * std::log(d);
    }
  }
  const bool snr_cut = m_.prior.parallax_snr_min > 0;
  norm_varies_ = !m_.prior.heliocentric() || (snr_cut && off.free);
  if (snr_cut && !off.free) {
    norm_lns_.resize(norm_d_.size());
    for (std::size_t i = 0; i < n_; ++i)
      for (int j = 0; j < norm_nodes_; ++j) {
        const std::size_t k = i * std::size_t(norm_nodes_) + std::size_t(j);
        norm_lns_[k] = ln_selected(i, norm_d_[k], off.value);
      }
  }
  if (!norm_lns_.empty()) {
    norm_lnw_s_ = norm_lnw_;
    for (std::size_t k = 0; k < norm_lnw_s_.size(); ++k)
      norm_lnw_s_[k] += norm_lns_[k];
  }
  if (!norm_varies_) {
    FullParams p{};
    p[std::size_t(Param::r0)] = 8;
    p[std::size_t(Param::parallax_offset)] = off.value;
    ln_z_const_.resize(n_);
    for (std::size_t i = 0; i < n_; ++i)
      ln_z_const_[i] = integrate_normalisation(i, p);
  }
}

double Likelihood::ln_selected(std::size_t i, double d, double offset) const {
  // the selection parallax/error >= k at true distance d: Phi((1/d + zero point)/sigma - k); a
  // distance given directly: distance/error >= k (the same to first order), Phi(d/sigma - k)
  const double mean = s_.distance_given[i] ? d : 1 / d + s_.off[i] + offset;
  return ln_phi(mean / s_.sw[i] - m_.prior.parallax_snr_min);
}

double Likelihood::ln_normalisation(std::size_t i, const FullParams& p) const {
  return norm_varies_ ? integrate_normalisation(i, p) : ln_z_const_[i];
}

double Likelihood::integrate_normalisation(std::size_t i, const FullParams& p) const {
  const std::size_t b = i * std::size_t(norm_nodes_);
  double buf[kMaxNodes];
  const double n[3] = {s_.nx[i], s_.ny[i], s_.nz[i]};
  const DistancePrior& prior = m_.prior;
  const double hr = get(p, Param::disk_scale_length), hz = get(p, Param::disk_scale_height);
  const bool disk = prior.kind == DistancePrior::Kind::disk;
  const bool snr = prior.parallax_snr_min > 0;
  if (disk && (!snr || !norm_lns_.empty()))
    return disk_normalisation(
        norm_d_.data() + b, (norm_lns_.empty() ? norm_lnw_ : norm_lnw_s_).data() + b, norm_nodes_,
        n[0], n[1], n[2], get(p, Param::r0), get(p, Param::z_sun), hr, hz, buf);
  for (int j = 0; j < norm_nodes_; ++j) {
    const double d = norm_d_[b + std::size_t(j)];
    double v = norm_lnw_[b + std::size_t(j)];
    if (disk) {
      double R = 0, z = 0;
      galactocentric_rz(d, n, get(p, Param::r0), get(p, Param::z_sun), R, z);
      v += -R / hr - std::fabs(z) / hz;
    } else {
      v += prior.ln_density(d, 0, 0);
    }
    if (snr)
      v += norm_lns_.empty() ? ln_selected(i, d, get(p, Param::parallax_offset))
                             : norm_lns_[b + std::size_t(j)];
    buf[j] = v;
  }
  return detail::log_sum_exp(buf, std::size_t(norm_nodes_));
}

void Likelihood::source_terms(std::size_t i, const FullParams& p, double& ln_good,
                              double& ln_bad) const {
  NodeInputs in{};
  const double r0 = get(p, Param::r0), zs = get(p, Param::z_sun);
  const double s = zs / r0, c = std::sqrt(1 - s * s);
  // the tilt about y (docs/conventions.md): (x, y, z) -> (c x + s z, y, -s x + c z)
  const auto tilt = [&](double x, double y, double z, double& ox, double& oy, double& oz) {
    ox = c * x + s * z, oy = y, oz = -s * x + c * z;
  };
  tilt(s_.nx[i], s_.ny[i], s_.nz[i], in.nx, in.ny, in.nz);
  tilt(s_.ex[i], s_.ey[i], s_.ez[i], in.ex, in.ey, in.ez);
  tilt(s_.qx[i], s_.qy[i], s_.qz[i], in.qx, in.qy, in.qz);
  tilt(-r0, 0, 0, in.sx, in.sy, in.sz);
  in.th0 = m_.theta0(p);
  in.vsx = get(p, Param::u_sun), in.vsy = in.th0 + get(p, Param::v_sun),
  in.vsz = get(p, Param::w_sun);
  in.mu = get(p, Param::mean_u), in.mv = get(p, Param::mean_v), in.mw = get(p, Param::mean_w);
  in.r0 = r0, in.slope = get(p, Param::rotation_slope), in.index = get(p, Param::rotation_index);
  in.scale = get(p, Param::model_scale);
  const double sg = get(p, Param::dispersion);
  in.s2 = sg * sg;
  in.su2 = get(p, Param::dispersion_u) * get(p, Param::dispersion_u);
  in.sv2 = get(p, Param::dispersion_v) * get(p, Param::dispersion_v);
  in.sw2 = get(p, Param::dispersion_w) * get(p, Param::dispersion_w);
  in.hr = m_.prior.kind == DistancePrior::Kind::edsd ? m_.prior.edsd_length_kpc
                                                     : get(p, Param::disk_scale_length);
  in.hz = get(p, Param::disk_scale_height);
  // the zero point applies to parallaxes, not to distances given directly
  in.offset = s_.distance_given[i] ? 0.0 : s_.off[i] + get(p, Param::parallax_offset);
  in.w = s_.w[i], in.a = s_.a[i], in.dd = s_.dd[i], in.v = s_.v[i], in.lsr = s_.lsr[i];
  in.cww = s_.cww[i], in.cwa = s_.cwa[i], in.cwd = s_.cwd[i], in.caa = s_.caa[i],
  in.cad = s_.cad[i], in.cdd = s_.cdd[i], in.cvv = s_.cvv[i];
  in.model_vc = m_.model_vc_kms.data();
  in.model_step = m_.model_step_kpc;
  in.model_n = int(m_.model_vc_kms.size());
  const NodeFn fn = pick(m_.rotation, m_.anisotropic, m_.prior.kind);
  const double* u = s_.node_u.data() + i * std::size_t(nodes_);
  const double* lnw = s_.node_lnw.data() + i * std::size_t(nodes_);
  const double* dist = s_.node_d.data() + i * std::size_t(nodes_);
  const double* meas = s_.node_m.data() + i * std::size_t(nodes_);
  const double* table =
      s_.node_table.empty() ? nullptr : s_.node_table.data() + i * std::size_t(nodes_);
  double buf[kMaxNodes];
  ln_good = fn(in, u, dist, meas, lnw, table, nodes_, buf);
  ln_bad = -INFINITY;
  if (m_.outliers) {
    const double so = m_.outlier_dispersion_kms;
    NodeInputs out = in;
    out.s2 = so * so;
    ln_bad = pick(m_.rotation, false, m_.prior.kind)(out, u, dist, meas, lnw, table, nodes_, buf);
  }
}

void Likelihood::per_source(const FullParams& p, std::vector<double>& lnl,
                            std::vector<double>* pout, bool parallel) const {
  lnl.assign(n_, 0.0);
  if (pout) pout->assign(n_, 0.0);
  const double f = m_.outliers ? get(p, Param::outlier_fraction) : 0.0;
  const long n = long(n_);
#pragma omp parallel for schedule(static) if (parallel)
  for (long k = 0; k < n; ++k) {
    const std::size_t i = std::size_t(k);
    double g, b;
    source_terms(i, p, g, b);
    double l = g;
    if (m_.outliers) {
      const double m = std::max(g, b);
      l = m + std::log((1 - f) * std::exp(g - m) + f * std::exp(b - m));
      if (pout) (*pout)[i] = f * std::exp(b - l);
    }
    lnl[i] = l - ln_normalisation(i, p);
  }
}

double Likelihood::operator()(const FullParams& p, bool parallel) const {
  const double r0 = get(p, Param::r0), zs = get(p, Param::z_sun);
  if (!(r0 > 0) || !(std::fabs(zs) < r0)) return -INFINITY;
  std::vector<double> lnl;
  per_source(p, lnl, nullptr, parallel);
  double s = 0;
  for (double v : lnl)
    s += v;
  return std::isnan(s) ? -INFINITY : s;
}

} // namespace undertow::fit

#include "undertow/compare/verdict.hpp"

#include <algorithm>
#include <cmath>
#include <functional>
#include <nlopt.hpp>

#include "undertow/compare/neighbour_field.hpp"
#include "undertow/compare/predictive.hpp"
#include "undertow/detail/kernel.hpp"
#include "undertow/detail/log_sum_exp.hpp"
#include "undertow/error.hpp"
#include "undertow/fit/measured_sources.hpp"
#include "undertow/fit/quadrature.hpp"
#include "undertow/sky/solar_frame.hpp"

namespace undertow::compare {
namespace {

using Eigen::Matrix3d;
using Eigen::Vector3d;

// One line-of-sight node that carries weight: everything that does not depend on the Sun's
// velocity or σ_int.
struct Node {
  double lnw = 0;        // ln W_j, normalised over the source's nodes
  double k = 0;          // mas/yr per km/s at this distance
  double shift0 = 0;     // the parallax residual / σ_ϖ², for the conditional mean
  Vector3d loc;          // predicted Galactocentric velocity
  Matrix3d P;            // velocity to (μα*, μδ, v_r): rows k e, k q, n
  Matrix3d plp, ppt;     // P Λ Pᵀ and P Pᵀ
  double nu = 0, tr = 0; // the predictive's degrees of freedom and tr Λ
};

struct Source {
  Vector3d e, q, n;
  Vector3d meas; // μα*, μδ, v_LSR - LSR correction
  Matrix3d c;    // measurement covariance of the three, given nothing
  Vector3d cw;   // covariance of each with the parallax
  double cww = 0;
  std::vector<Node> nodes;
};

// One node at one value of σ_int, reduced to what varies with the Sun's velocity v: the
// prediction is linear in v, so with the Cholesky factor L of the node's covariance the
// quadratic form is Q = |a + B v|², a = L⁻¹(measured - P loc - shift), B = L⁻¹ P.
struct Term {
  double a[3], B[9];
  double lnc; // ln W_j - ½ ln det + the t's normalisation
  double nu;  // effective degrees of freedom (∞: Gaussian)
};

// ln p(μα*, μδ, v_LSR | ϖ) of one source from its terms at one σ_int.
double source_ln_l(const Term* terms, std::size_t n, const Vector3d& v) {
  double buf[fit::kMaxNodes];
  for (std::size_t j = 0; j < n; ++j) {
    const Term& t = terms[j];
    double q = 0;
    for (int r = 0; r < 3; ++r) {
      const double y = t.a[r] + t.B[3 * r] * v[0] + t.B[3 * r + 1] * v[1] + t.B[3 * r + 2] * v[2];
      q += y * y;
    }
    buf[j] = t.lnc + (std::isfinite(t.nu) ? -0.5 * (t.nu + 3) * std::log1p(q / t.nu) : -0.5 * q);
  }
  return detail::log_sum_exp(buf, n);
}

Term make_term(const Source& src, const Node& nd, double s2, const VerdictSettings& st) {
  Matrix3d cov = nd.plp + s2 * nd.ppt + src.c;
  cov -= src.cw * src.cw.transpose() / src.cww; // conditional on the parallax error
  const Eigen::LLT<Matrix3d> llt(cov);
  const Matrix3d L = llt.matrixL();
  const Matrix3d& P = nd.P;
  const Vector3d r0 = src.meas - P * nd.loc - src.cw * nd.shift0;
  const Vector3d a = L.triangularView<Eigen::Lower>().solve(r0);
  const Matrix3d B = L.triangularView<Eigen::Lower>().solve(P);
  Term t;
  for (int r = 0; r < 3; ++r) {
    t.a[r] = a[r];
    for (int c = 0; c < 3; ++c)
      t.B[3 * r + c] = B(r, c);
  }
  const double lndet = 2 * std::log(L(0, 0) * L(1, 1) * L(2, 2));
  const double added = 3 * s2 + (src.c(0, 0) + src.c(1, 1)) / (nd.k * nd.k) + src.c(2, 2);
  t.nu =
      st.tails == VerdictSettings::Tails::gaussian ? INFINITY : effective_dof(nd.nu, nd.tr, added);
  if (st.tails == VerdictSettings::Tails::robust) t.nu = std::min(t.nu, st.robust_dof);
  t.lnc = nd.lnw + ln_t3(0, lndet, t.nu); // ln t3 at Q = 0; the Q-dependent part is added later
  return t;
}

} // namespace

namespace {

// The verdict at the settings' R0.
VerdictResult judge_at_r0(const residuals::Catalog& used, const SimulatedYoung& sim,
                          const VerdictSettings& st) {
  if (st.tails == VerdictSettings::Tails::robust && !(st.robust_dof >= 1))
    throw InputError(SourcePlace{{}, 0, 0, "robust_dof"}, "must be at least 1");
  if (st.neighbours < 5)
    throw InputError(SourcePlace{{}, 0, 0, "neighbours"}, "the verdict needs at least 5");
  if (sim.x.size() < st.neighbours)
    throw InputError("the simulation has " + std::to_string(sim.x.size()) +
                     " young sources, fewer than the " + std::to_string(st.neighbours) +
                     " neighbours each prediction needs");
  if (!(st.floor_min_kms >= 0) || !(st.floor_max_kms >= st.floor_min_kms))
    throw InputError(SourcePlace{{}, 0, 0, "floor_kms"}, "needs 0 <= minimum <= maximum (km/s)");
  const fit::MeasuredSources ms(used, st.prior, st.nodes, st.lsr, 0, 0);
  std::vector<std::array<double, 3>> vel(sim.x.size());
  for (std::size_t i = 0; i < vel.size(); ++i)
    vel[i] = {sim.vx[i], sim.vy[i], sim.vz[i]};
  const NeighbourField field(sim.x, sim.y, std::move(vel));

  // the tilted frame of docs/conventions.md: (x, y, z) -> (c x + s z, y, -s x + c z)
  const double sn = st.z_sun_kpc / st.r0_kpc, cs = std::sqrt(1 - sn * sn);
  const auto tilt = [&](double x, double y, double z) {
    return Vector3d(cs * x + sn * z, y, -sn * x + cs * z);
  };
  const Vector3d sun = tilt(-st.r0_kpc, 0, 0);
  std::vector<Source> src(ms.n);
  double far_w = 0;
  const long n = long(ms.n);
  std::vector<double> far(ms.n, 0.0);
#pragma omp parallel for schedule(dynamic)
  for (long ii = 0; ii < n; ++ii) {
    const std::size_t i = std::size_t(ii);
    Source& s = src[i];
    s.e = tilt(ms.ex[i], ms.ey[i], ms.ez[i]);
    s.q = tilt(ms.qx[i], ms.qy[i], ms.qz[i]);
    s.n = tilt(ms.nx[i], ms.ny[i], ms.nz[i]);
    s.meas = Vector3d(ms.a[i], ms.dd[i], ms.v[i] - ms.lsr[i]);
    s.c << ms.caa[i], ms.cad[i], 0, ms.cad[i], ms.cdd[i], 0, 0, 0, ms.cvv[i];
    s.cw = Vector3d(ms.cwa[i], ms.cwd[i], 0);
    s.cww = ms.cww[i];
    const double nhel[3] = {ms.nx[i], ms.ny[i], ms.nz[i]};
    // node weights: quadrature × prior × parallax likelihood, normalised
    std::vector<double> lnw(std::size_t(ms.nodes));
    for (int j = 0; j < ms.nodes; ++j) {
      const std::size_t k = i * std::size_t(ms.nodes) + std::size_t(j);
      double R = 0, z = 0;
      fit::galactocentric_rz(ms.node_d[k], nhel, st.r0_kpc, st.z_sun_kpc, R, z);
      const double r0 = ms.w[i] - (ms.node_m[k] + ms.off[i]); // parallax or distance given
      lnw[std::size_t(j)] =
          ms.node_lnw[k] +
          (ms.node_table.empty() ? st.prior.ln_density(ms.node_d[k], R, z) : ms.node_table[k]) -
          0.5 * r0 * r0 / ms.cww[i];
    }
    const double norm = detail::log_sum_exp(lnw);
    for (int j = 0; j < ms.nodes; ++j) {
      const std::size_t k = i * std::size_t(ms.nodes) + std::size_t(j);
      const double w = lnw[std::size_t(j)] - norm;
      if (w < -50) continue; // below 1e-21 of the whole (beyond the ±7σ the nodes span)
      Node nd;
      nd.lnw = w;
      nd.k = ms.node_u[k] / sky::kKappa;
      nd.shift0 = (ms.w[i] - (ms.node_m[k] + ms.off[i])) / ms.cww[i];
      const Vector3d pos = sun + ms.node_d[k] * s.n;
      const auto chosen = field.nearest(pos.x(), pos.y(), st.neighbours);
      const auto mom = field.moments(chosen, pos.x(), pos.y());
      if (mom.radius_kpc > st.far_kpc) far[i] += std::exp(w);
      const Predictive pr = predictive(mom);
      nd.loc = pr.location;
      nd.nu = pr.nu;
      nd.tr = pr.scale.trace();
      nd.P.row(0) = nd.k * s.e.transpose();
      nd.P.row(1) = nd.k * s.q.transpose();
      nd.P.row(2) = s.n.transpose();
      nd.plp = nd.P * pr.scale * nd.P.transpose();
      nd.ppt = nd.P * nd.P.transpose();
      s.nodes.push_back(nd);
    }
  }
  for (double f : far)
    far_w += f;

  // σ_int: Gauss-Legendre nodes over its uniform prior, or one fixed value
  std::vector<double> floors, lnfw;
  if (st.floor_max_kms > st.floor_min_kms) {
    const auto& gl = fit::gauss_legendre(std::max(2, st.floor_nodes));
    const double mid = 0.5 * (st.floor_max_kms + st.floor_min_kms),
                 half = 0.5 * (st.floor_max_kms - st.floor_min_kms);
    for (std::size_t g = 0; g < gl.nodes.size(); ++g)
      floors.push_back(mid + half * gl.nodes[g]), lnfw.push_back(std::log(0.5 * gl.weights[g]));
  } else {
    floors.push_back(st.floor_min_kms), lnfw.push_back(0);
  }
  const std::size_t G = floors.size();
  // every (source, σ_int node, line-of-sight node) reduced once to its Term
  std::vector<std::vector<Term>> terms(ms.n * G);
#pragma omp parallel for schedule(dynamic)
  for (long ii = 0; ii < n; ++ii)
    for (std::size_t g = 0; g < G; ++g) {
      auto& tv = terms[std::size_t(ii) * G + g];
      for (const auto& nd : src[std::size_t(ii)].nodes)
        tv.push_back(make_term(src[std::size_t(ii)], nd, floors[g] * floors[g], st));
    }
  // per σ_int node: Σ_i ln L_i (sources in parallel, summed in a fixed order)
  const auto totals = [&](const Vector3d& vs, std::vector<double>* per_source, std::size_t g_only) {
    std::vector<double> lnl(ms.n * G);
#pragma omp parallel for schedule(static)
    for (long ii = 0; ii < n; ++ii)
      for (std::size_t g = 0; g < G; ++g)
        if (g_only == G || g == g_only) {
          const auto& tv = terms[std::size_t(ii) * G + g];
          lnl[std::size_t(ii) * G + g] = source_ln_l(tv.data(), tv.size(), vs);
        }
    std::vector<double> t(G, 0.0);
    for (std::size_t i = 0; i < ms.n; ++i)
      for (std::size_t g = 0; g < G; ++g)
        t[g] += lnl[i * G + g];
    if (per_source) {
      per_source->resize(ms.n);
      for (std::size_t i = 0; i < ms.n; ++i)
        (*per_source)[i] = lnl[i * G + g_only];
    }
    return t;
  };
  const auto marginal_floor = [&](const Vector3d& vs) {
    auto t = totals(vs, nullptr, G);
    for (std::size_t g = 0; g < G; ++g)
      t[g] += lnfw[g];
    return detail::log_sum_exp(t);
  };

  VerdictResult out;
  Vector3d vbest = st.sun_velocity_kms;
  if (st.marginalise_sun) {
    const Eigen::LLT<Matrix3d> pl(st.sun_velocity_cov);
    if (pl.info() != Eigen::Success)
      throw InputError(SourcePlace{{}, 0, 0, "sun_velocity_cov"}, "is not positive definite");
    const Matrix3d Lp = pl.matrixL();
    const double ln_prior_norm =
        -1.5 * std::log(2 * M_PI) - std::log(Lp(0, 0) * Lp(1, 1) * Lp(2, 2));
    const auto lpost = [&](const Vector3d& v) {
      const Vector3d d = v - st.sun_velocity_kms;
      return marginal_floor(v) + ln_prior_norm - 0.5 * d.dot(pl.solve(d));
    };
    std::vector<double> x{vbest[0], vbest[1], vbest[2]}, step(3);
    for (int a = 0; a < 3; ++a)
      step[std::size_t(a)] = 0.5 * std::sqrt(st.sun_velocity_cov(a, a));
    std::function<double(const double*)> f = [&](const double* p) {
      return lpost(Vector3d(p[0], p[1], p[2]));
    };
    nlopt::opt o(nlopt::LN_NELDERMEAD, 3);
    o.set_max_objective(
        [](unsigned, const double* p, double*, void* data) {
          const double v = (*static_cast<std::function<double(const double*)>*>(data))(p);
          return std::isfinite(v) ? v : -1e300;
        },
        &f);
    o.set_initial_step(step);
    o.set_xtol_abs(1e-3);
    o.set_maxeval(2000);
    double fmax = 0;
    try {
      o.optimize(x, fmax);
    } catch (const nlopt::roundoff_limited&) {
    } catch (const std::exception& e) {
      out.notes.push_back(std::string("the Sun's velocity: the optimiser stopped early (") +
                          e.what() + "); the values at the maximum are where it stopped");
    }
    vbest = Vector3d(x[0], x[1], x[2]);
    const Vector3d dv = vbest - st.sun_velocity_kms;
    const double pull = std::sqrt(dv.dot(pl.solve(dv)));
    if (pull > 3)
      out.notes.push_back("the data pull the Sun's velocity " +
                          detail::num(std::round(10 * pull) / 10) +
                          " sigma from its prior mean: the model lacks a motion that the Sun's "
                          "velocity absorbs (see u_sun_kms, sun_vphi_kms, w_sun_kms)");
    // Laplace: ln Z = F(v̂) + (3/2) ln 2π - ½ ln det(-H), H by central differences
    const double f0 = lpost(vbest);
    Matrix3d H;
    double h[3];
    for (int a = 0; a < 3; ++a)
      h[a] = std::clamp(0.05 * std::sqrt(st.sun_velocity_cov(a, a)), 0.02, 0.5);
    for (int a = 0; a < 3; ++a)
      for (int b = a; b < 3; ++b) {
        Vector3d ea = Vector3d::Zero(), eb = Vector3d::Zero();
        ea[a] = h[a], eb[b] = h[b];
        double v;
        if (a == b)
          v = (lpost(vbest + ea) - 2 * f0 + lpost(vbest - ea)) / (h[a] * h[a]);
        else
          v = (lpost(vbest + ea + eb) - lpost(vbest + ea - eb) - lpost(vbest - ea + eb) +
               lpost(vbest - ea - eb)) /
              (4 * h[a] * h[b]);
        H(a, b) = H(b, a) = v;
      }
    const Eigen::LLT<Matrix3d> nh(-H);
    if (nh.info() == Eigen::Success) {
      const Matrix3d Ln = nh.matrixL();
      out.log_likelihood = f0 + 1.5 * std::log(2 * M_PI) - std::log(Ln(0, 0) * Ln(1, 1) * Ln(2, 2));
      out.notes.push_back("the Sun's velocity (U, Theta0 + V, W) marginalised over its prior by "
                          "Laplace's method");
    } else {
      out.log_likelihood = f0;
      out.notes.push_back("the Sun's velocity: the posterior is not peaked (the Hessian is not "
                          "negative definite); ln L is the maximum of likelihood x prior, not the "
                          "marginal");
    }
  } else {
    out.log_likelihood = marginal_floor(vbest);
    out.notes.push_back("the Sun's velocity held fixed at (" + detail::num(vbest[0]) + ", " +
                        detail::num(vbest[1]) + ", " + detail::num(vbest[2]) +
                        ") km/s: the verdict does not carry its uncertainty");
  }
  // the maximum over σ_int's nodes at v̂, and σ_int's posterior mean
  auto t = totals(vbest, nullptr, G);
  std::size_t gbest = 0;
  for (std::size_t g = 0; g < G; ++g)
    if (t[g] > t[gbest]) gbest = g;
  {
    std::vector<double> lp(G);
    for (std::size_t g = 0; g < G; ++g)
      lp[g] = t[g] + lnfw[g];
    const double z = detail::log_sum_exp(lp);
    for (std::size_t g = 0; g < G; ++g)
      out.floor_mean_kms += floors[g] * std::exp(lp[g] - z);
  }
  totals(vbest, &out.source_log_likelihood, gbest);
  out.log_likelihood_at_best = t[gbest];
  out.floor_kms = floors[gbest];
  out.sun_velocity_kms = {vbest[0], vbest[1], vbest[2]};
  out.r0_kpc = st.r0_kpc;
  for (const auto& s : used.sources)
    out.names.push_back(s.name);
  out.far_share = ms.n ? far_w / double(ms.n) : 0;
  if (G > 1) {
    if (gbest == 0 && st.floor_min_kms == 0)
      out.notes.push_back("sigma_int peaks at its lowest node: the simulation alone explains the "
                          "catalog's dispersion");
    if (gbest + 1 == G)
      out.notes.push_back("sigma_int peaks at the top of its range (" +
                          detail::num(st.floor_max_kms) +
                          " km/s): the model lacks dispersion; the verdict depends on that bound");
  }
  if (out.far_share > 0.05)
    out.notes.push_back(detail::num(100 * out.far_share) +
                        " % of the weight rests on predictions whose neighbours lie farther than " +
                        detail::num(st.far_kpc) + " kpc: simulate more young sources there");
  return out;
}

} // namespace

VerdictResult judge(const residuals::Catalog& used, const SimulatedYoung& sim,
                    const VerdictSettings& st) {
  if (!st.marginalise_r0) return judge_at_r0(used, sim, st);
  if (!(st.r0_err_kpc > 0))
    throw InputError(SourcePlace{{}, 0, 0, "r0_err_kpc"}, "must be positive to marginalise R0");
  const auto& gh = fit::gauss_hermite(std::max(1, st.r0_nodes));
  std::vector<VerdictResult> at;
  std::vector<double> lnz;
  const double var_r = st.r0_err_kpc * st.r0_err_kpc;
  const double r0_low = st.r0_kpc + std::sqrt(2.0) * st.r0_err_kpc * gh.nodes.front();
  if (!(r0_low > std::fabs(st.z_sun_kpc) + 0.5))
    throw InputError(SourcePlace{{}, 0, 0, "r0_err_kpc"},
                     "too wide for R0 = " + detail::num(st.r0_kpc) +
                         " kpc: the quadrature would place the Sun at R0 = " + detail::num(r0_low) +
                         " kpc");
  for (std::size_t q = 0; q < gh.nodes.size(); ++q) {
    VerdictSettings s = st;
    s.marginalise_r0 = false;
    s.r0_kpc = st.r0_kpc + std::sqrt(2.0) * st.r0_err_kpc * gh.nodes[q];
    // the Sun's velocity given R0: the conditional of the joint Gaussian
    s.sun_velocity_kms =
        st.sun_velocity_kms + st.sun_velocity_r0_cov * (s.r0_kpc - st.r0_kpc) / var_r;
    s.sun_velocity_cov =
        st.sun_velocity_cov - st.sun_velocity_r0_cov * st.sun_velocity_r0_cov.transpose() / var_r;
    for (int a = 0; a < 3; ++a)
      s.sun_velocity_cov(a, a) = std::max(s.sun_velocity_cov(a, a), 1e-4);
    at.push_back(judge_at_r0(used, sim, s));
    lnz.push_back(std::log(gh.weights[q] / std::sqrt(M_PI)) + at.back().log_likelihood);
  }
  const std::size_t best = std::size_t(std::max_element(lnz.begin(), lnz.end()) - lnz.begin());
  VerdictResult out = at[best];
  out.log_likelihood = detail::log_sum_exp(lnz);
  out.notes.push_back(
      "R0 marginalised over " + detail::num(st.r0_kpc) + " +- " + detail::num(st.r0_err_kpc) +
      " kpc by " + std::to_string(gh.nodes.size()) +
      "-point Gauss-Hermite quadrature; the values at the maximum are those at R0 = " +
      detail::num(out.r0_kpc) + " kpc");
  if (gh.nodes.size() > 1 && (best == 0 || best + 1 == gh.nodes.size()))
    out.notes.push_back("the catalog prefers an R0 at the edge of the quadrature (" +
                        detail::num(out.r0_kpc) + " kpc): R0's prior and the model disagree");
  return out;
}

} // namespace undertow::compare

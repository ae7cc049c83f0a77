#include "undertow/fit/kinematic_fit.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>

#include <Eigen/Dense>
#include <nlopt.hpp>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/fit/ensemble_sampler.hpp"
#include "undertow/tracers/random.hpp"

namespace undertow::fit {
namespace {

const ParamSetting* find(const FitSpec& s, Param p) {
  for (const auto& q : s.params)
    if (q.param == p) return &q;
  return nullptr;
}

bool pinned(const FitSpec& s, Param p) {
  const auto* q = find(s, p);
  return !q || !q->free || q->prior.informative();
}

ParamSummary summarise(std::vector<double> v) {
  ParamSummary s;
  if (v.empty()) return s;
  double m = 0;
  for (double x : v)
    m += x;
  m /= double(v.size());
  double q = 0;
  for (double x : v)
    q += (x - m) * (x - m);
  s.mean = m;
  s.sd = std::sqrt(q / double(v.size() > 1 ? v.size() - 1 : 1));
  s.median = quantile(v, 0.5), s.lo = quantile(v, 0.15865525393145707),
  s.hi = quantile(v, 0.8413447460685429);
  return s;
}

} // namespace

double quantile(std::vector<double>& v, double q) {
  if (v.empty()) return NAN;
  if (!std::is_sorted(v.begin(), v.end())) std::sort(v.begin(), v.end());
  const double pos = q * double(v.size() - 1);
  const std::size_t i = std::size_t(pos);
  const double t = pos - double(i);
  return i + 1 < v.size() ? v[i] * (1 - t) + v[i + 1] * t : v[i];
}

std::vector<std::string> degeneracies(const FitSpec& s) {
  std::vector<std::string> out;
  const RotationForm f = s.model.rotation;
  if (f == RotationForm::flat || f == RotationForm::linear) {
    if (s.model.angular_speed_form) {
      if (!pinned(s, Param::v_sun) && !pinned(s, Param::mean_v))
        out.push_back("v_sun_kms and mean_v_kms are free without a Gaussian prior, but with a " +
                      rotation_form_name(f) +
                      " rotation curve and sun_angular_speed_kms_kpc the data constrain only "
                      "their difference: fix one or give one a Gaussian prior");
    } else if (!pinned(s, Param::theta0) && !pinned(s, Param::v_sun) && !pinned(s, Param::mean_v)) {
      out.push_back("theta0_kms, v_sun_kms and mean_v_kms are all free without a Gaussian prior, "
                    "but with a " +
                    rotation_form_name(f) +
                    " rotation curve the data constrain only Θ0 + V☉ and Θ0 + V̄_s: fix one "
                    "or give one a Gaussian prior (e.g. V☉ = 12.24 ± 2 km/s, Schönrich, "
                    "Binney & Dehnen 2010, MNRAS 403, 1829)");
    }
  }
  if (!pinned(s, Param::w_sun) && !pinned(s, Param::mean_w))
    out.push_back("w_sun_kms and mean_w_kms are both free without a Gaussian prior, but the data "
                  "constrain only W̄_s − W☉: fix one (e.g. mean_w_kms = 0) or give one a Gaussian "
                  "prior");
  return out;
}

std::vector<Param> free_params(const FitSpec& s) {
  std::vector<Param> f;
  for (const auto& q : s.params)
    if (q.free) f.push_back(q.param);
  return f;
}

FullParams start_values(const FitSpec& s) {
  const auto free = free_params(s);
  std::vector<double> x;
  for (Param p : free)
    x.push_back(find(s, p)->value);
  return full_from_free(s, free, x.data());
}

Likelihood::Offset offset_range(const FitSpec& s) {
  Likelihood::Offset off;
  const auto* q = find(s, Param::parallax_offset);
  if (!q) return off;
  off.value = q->value;
  if (!q->free) return off;
  const auto& p = q->prior;
  if (p.kind == Prior::Kind::flat && !(std::isfinite(p.min) && std::isfinite(p.max)))
    throw InputError(q->place, "a free parallax zero point needs bounds (min, max) or a "
                               "Gaussian prior");
  off.free = true;
  off.min = std::isfinite(p.min) ? p.min : p.mean - 5 * p.sigma;
  off.max = std::isfinite(p.max) ? p.max : p.mean + 5 * p.sigma;
  return off;
}

FullParams full_from_free(const FitSpec& s, const std::vector<Param>& free, const double* x) {
  FullParams p{};
  p[std::size_t(Param::r0)] = 8;
  for (Param k : {Param::dispersion, Param::dispersion_u, Param::dispersion_v, Param::dispersion_w,
                  Param::model_scale, Param::disk_scale_length, Param::disk_scale_height})
    p[std::size_t(k)] = 1;
  for (const auto& q : s.params)
    p[std::size_t(q.param)] = q.value;
  for (std::size_t k = 0; k < free.size(); ++k)
    p[std::size_t(free[k])] = x[k];
  return p;
}

double log_posterior(const FitSpec& s, const std::vector<Param>& free, const Likelihood& L,
                     const double* x, bool parallel) {
  double lp = 0;
  for (std::size_t k = 0; k < free.size(); ++k) {
    if (!in_domain(free[k], x[k])) return -INFINITY;
    lp += find(s, free[k])->prior.log_density(x[k]);
    if (!std::isfinite(lp)) return -INFINITY;
  }
  const FullParams p = full_from_free(s, free, x);
  if (!(std::fabs(p[std::size_t(Param::z_sun)]) < 0.5 * p[std::size_t(Param::r0)]))
    return -INFINITY;
  const double l = L(p, parallel);
  return std::isfinite(l) ? lp + l : -INFINITY;
}

std::vector<FullParams> posterior_draws(const FitSpec& s, const FitResult& r, std::size_t n) {
  const std::size_t nf = r.free.size(), total = nf ? r.samples.size() / nf : 0;
  std::vector<FullParams> out;
  if (!total) return out;
  n = std::min(n, total);
  for (std::size_t i = 0; i < n; ++i) {
    const std::size_t k = (i * total) / n;
    out.push_back(full_from_free(s, r.free, r.samples.data() + k * nf));
  }
  return out;
}

FitResult run_fit(const FitSpec& s, const Likelihood& L, const std::atomic<bool>* stop,
                  const Progress& progress) {
  const auto t0 = std::chrono::steady_clock::now();
  FitResult r;
  r.free = free_params(s);
  const std::size_t nf = r.free.size();
  if (nf == 0)
    throw InputError(SourcePlace{s.file, 0, 0, "parameters"},
                     "every parameter is fixed: nothing to fit (make at least one free)");
  if (s.sampler.walkers > 0 && s.sampler.walkers < int(2 * nf))
    throw InputError(SourcePlace{s.file, 0, 0, "sampler.walkers"},
                     "needs at least twice the number of free parameters (" +
                         std::to_string(2 * nf) + "), or 0 for the default");
  if (const auto d = degeneracies(s); !d.empty()) {
    if (!s.accept_degenerate) throw InputError(SourcePlace{s.file, 0, 0, "parameters"}, d[0]);
    for (const auto& m : d)
      r.warnings.push_back("degenerate: " + m);
  }
  const auto lpost = [&](const double* x, bool par) { return log_posterior(s, r.free, L, x, par); };

  // 1. The maximum a posteriori by Nelder-Mead (NLopt), restarted from its own result.
  std::vector<double> x(nf), lo(nf), hi(nf), step(nf), scale0(nf);
  for (std::size_t k = 0; k < nf; ++k) {
    const auto* q = find(s, r.free[k]);
    x[k] = q->value;
    lo[k] = q->prior.min, hi[k] = q->prior.max;
    double w = q->prior.kind == Prior::Kind::gaussian ? q->prior.sigma
               : std::isfinite(hi[k] - lo[k])         ? 0.05 * (hi[k] - lo[k])
                                                      : 0.05 * std::max(1.0, std::fabs(x[k]));
    step[k] = scale0[k] = w;
  }
  if (!std::isfinite(lpost(x.data(), true)))
    throw InputError(SourcePlace{s.file, 0, 0, "parameters"},
                     "the starting values have zero posterior probability (outside a bound, or "
                     "a source impossible under them)");
  double best = -INFINITY;
  for (int round = 0; round < 8; ++round) {
    nlopt::opt o(nlopt::LN_NELDERMEAD, unsigned(nf));
    std::function<double(const double*)> fobj = [&](const double* xx) { return lpost(xx, true); };
    o.set_max_objective(
        [](unsigned, const double* xx, double*, void* data) {
          const double v = (*static_cast<std::function<double(const double*)>*>(data))(xx);
          return std::isfinite(v) ? v : -1e300;
        },
        &fobj);
    std::vector<double> blo(nf), bhi(nf);
    for (std::size_t k = 0; k < nf; ++k)
      blo[k] = std::isfinite(lo[k]) ? lo[k] : -HUGE_VAL,
      bhi[k] = std::isfinite(hi[k]) ? hi[k] : HUGE_VAL;
    o.set_lower_bounds(blo);
    o.set_upper_bounds(bhi);
    o.set_initial_step(step);
    o.set_ftol_abs(1e-7);
    o.set_maxeval(20000);
    double v = -INFINITY;
    try {
      o.optimize(x, v);
    } catch (const nlopt::roundoff_limited&) {
    } catch (const std::exception& e) {
      r.warnings.push_back(std::string("optimiser: ") + e.what());
    }
    v = lpost(x.data(), true);
    if (progress) progress("maximum", round + 1, 8);
    const bool done = v - best < 1e-4;
    best = std::max(best, v);
    for (double& w : step)
      w *= 0.3;
    if (done) break;
  }

  // 2. Newton steps with finite-difference derivatives polish the maximum, and the curvature
  // there (the Laplace approximation) gives the walkers' starting distribution.
  std::vector<double> h(nf);
  for (std::size_t k = 0; k < nf; ++k)
    h[k] = 1e-2 * scale0[k];
  const auto f = [&](const std::vector<double>& y) { return lpost(y.data(), true); };
  const auto N = static_cast<Eigen::Index>(nf);
  Eigen::MatrixXd H(N, N);
  Eigen::VectorXd g(N);
  const auto curvature = [&](const std::vector<double>& y, double fy) {
    for (std::size_t a = 0; a < nf; ++a) {
      auto p1 = y, m1 = y;
      p1[a] += h[a], m1[a] -= h[a];
      const double fp = f(p1), fm = f(m1);
      g(long(a)) = (fp - fm) / (2 * h[a]);
      H(long(a), long(a)) = -(fp - 2 * fy + fm) / (h[a] * h[a]);
      for (std::size_t b = 0; b < a; ++b) {
        auto pp = y, pm = y, mp = y, mm = y;
        pp[a] += h[a], pp[b] += h[b];
        pm[a] += h[a], pm[b] -= h[b];
        mp[a] -= h[a], mp[b] += h[b];
        mm[a] -= h[a], mm[b] -= h[b];
        H(long(a), long(b)) = H(long(b), long(a)) =
            -(f(pp) - f(pm) - f(mp) + f(mm)) / (4 * h[a] * h[b]);
      }
    }
    return H.allFinite() && g.allFinite();
  };
  Eigen::MatrixXd Lc; // Cholesky factor of the Laplace covariance
  for (int it = 0; it < 10; ++it) {
    if (!curvature(x, best)) break;
    Eigen::LLT<Eigen::MatrixXd> llt(H);
    if (llt.info() != Eigen::Success) break;
    const Eigen::VectorXd dx = llt.solve(g);
    double gain = 0;
    for (double t = 1; t > 1e-3; t *= 0.5) {
      std::vector<double> y = x;
      for (std::size_t k = 0; k < nf; ++k)
        y[k] += t * dx(long(k));
      const double fy = f(y);
      if (fy > best) {
        gain = fy - best;
        x = y, best = fy;
        break;
      }
    }
    if (progress) progress("maximum", 8, 8);
    if (gain < 1e-6) break;
  }
  if (curvature(x, best)) {
    Eigen::LLT<Eigen::MatrixXd> llt(H);
    if (llt.info() == Eigen::Success) {
      const Eigen::MatrixXd cov = llt.solve(Eigen::MatrixXd::Identity(N, N));
      Eigen::LLT<Eigen::MatrixXd> lc(cov);
      if (lc.info() == Eigen::Success) Lc = lc.matrixL();
    }
  }
  if (!Lc.size()) {
    // at a bound or along a flat direction: each parameter's own curvature where it has one
    Lc = Eigen::MatrixXd::Zero(N, N);
    for (std::size_t k = 0; k < nf; ++k) {
      auto p1 = x, m1 = x;
      p1[k] += h[k], m1[k] -= h[k];
      const double c = -(f(p1) - 2 * best + f(m1)) / (h[k] * h[k]);
      Lc(long(k), long(k)) = std::isfinite(c) && c > 0 ? 1 / std::sqrt(c) : 1e-2 * scale0[k];
    }
    r.notes.push_back("the posterior is not curved like a Gaussian at its maximum (a bound or a "
                      "flat direction): the walkers start from each parameter's own curvature");
  }
  r.map_x = x;
  r.map_ln_posterior = best;
  const int walkers =
      s.sampler.walkers > 0 ? s.sampler.walkers : std::max(32, int(2 * nf + 2 + (2 * nf + 2) % 2));
  r.walkers = walkers;
  std::vector<double> start(std::size_t(walkers) * nf);
  tracers::TracerStream rng(s.sampler.seed, 0, 0xba11);
  for (int w = 0; w < walkers; ++w) {
    std::vector<double> y = x;
    for (int attempt = 0; attempt < 200; ++attempt) {
      Eigen::VectorXd z(static_cast<Eigen::Index>(nf));
      for (std::size_t k = 0; k < nf; ++k)
        z(long(k)) = rng.normal();
      const double shrink = attempt < 20 ? 1.0 : std::pow(0.8, attempt - 19);
      for (std::size_t k = 0; k < nf; ++k)
        y[k] = x[k] + (Lc.size() ? shrink * (Lc.row(long(k)) * z)(0)
                                 : shrink * 1e-3 * scale0[k] * z(long(k)));
      if (std::isfinite(f(y))) break;
      y = x;
    }
    std::copy(y.begin(), y.end(), start.begin() + long(std::size_t(w) * nf));
  }

  // 3. Sampling in chunks until converged.
  EnsembleSampler sampler(
      int(nf), walkers, s.sampler.seed, [&](const double* y) { return lpost(y, false); }, 2.0,
      s.sampler.de_fraction);
  sampler.start(start);
  const long max_steps = s.sampler.steps_max;
  const auto run = run_to_convergence(
      sampler, {s.sampler.chunk, max_steps, s.sampler.tau_multiple, s.sampler.r_hat_max}, stop,
      [&](long done) {
        if (progress) progress("sampling", done, max_steps);
      });
  r.converged = run.converged, r.interrupted = run.interrupted, r.diag = run.diag;
  r.steps = sampler.steps();
  if (!r.converged && !r.interrupted) {
    // kept = 3/4 of the total must reach tau_multiple × τ; split-R̂ − 1 falls about as 1/steps
    double need = s.sampler.tau_multiple * r.diag.tau_max * 4.0 / 3.0;
    if (std::isfinite(r.diag.r_hat_max) && r.diag.r_hat_max > s.sampler.r_hat_max)
      need = std::max(need, double(r.steps) * (r.diag.r_hat_max - 1) / (s.sampler.r_hat_max - 1));
    r.more_steps_needed =
        std::isfinite(need) ? std::max<long>(long(need) - r.steps, s.sampler.chunk) : r.steps;
  }
  r.acceptance = sampler.acceptance_fraction();
  r.chain = sampler.chain_data();
  r.ln_post = sampler.lnp_data();
  const long burn = r.diag.burn;
  for (long t = burn; t < r.steps; ++t)
    for (int w = 0; w < walkers; ++w)
      for (std::size_t k = 0; k < nf; ++k)
        r.samples.push_back(sampler.chain(t, w, int(k)));
  const std::size_t ns = r.samples.size() / nf;
  for (std::size_t k = 0; k < nf; ++k) {
    std::vector<double> v(ns);
    for (std::size_t i = 0; i < ns; ++i)
      v[i] = r.samples[i * nf + k];
    auto sm = summarise(v);
    sm.param = r.free[k];
    sm.map = x[k];
    const auto& pr = find(s, r.free[k])->prior;
    sm.prior_width = pr.kind == Prior::Kind::gaussian ? pr.sigma
                     : std::isfinite(pr.max - pr.min) ? (pr.max - pr.min) / std::sqrt(12.0)
                                                      : INFINITY;
    r.summary.push_back(sm);
    // a posterior that piles up against a bound is not a measurement: say so
    if (std::isfinite(pr.min) && std::isfinite(pr.max)) {
      const double edge = 0.01 * (pr.max - pr.min);
      std::size_t lo_n = 0, hi_n = 0;
      for (double x : v)
        lo_n += x<pr.min + edge, hi_n += x> pr.max - edge;
      for (const auto& [count, bound] : {std::pair{lo_n, pr.min}, std::pair{hi_n, pr.max}})
        if (double(count) > 0.05 * double(ns) && r.free[k] == Param::outlier_fraction && bound == 0)
          r.notes.push_back("outlier_fraction is consistent with no outliers: quote its 84 % "
                            "quantile, " +
                            detail::num(sm.hi) + ", as an upper limit"),
              r.at_bound.push_back(r.free[k]);
        else if (double(count) > 0.05 * double(ns) && (r.at_bound.push_back(r.free[k]), true))
          r.warnings.push_back(
              std::string(param_info(r.free[k]).key) + ": " +
              detail::num(100.0 * double(count) / double(ns)) +
              " % of the posterior lies against the prior's bound " + detail::num(bound) +
              ": the data want a value outside the range given, or the model does not describe "
              "them (coherent streaming, a wrong rotation-curve form); do not quote this "
              "interval as a measurement");
    }
  }
  r.correlation.assign(nf * nf, 0.0);
  for (std::size_t a = 0; a < nf; ++a)
    for (std::size_t b = 0; b < nf; ++b) {
      double c = 0;
      for (std::size_t i = 0; i < ns; ++i)
        c += (r.samples[i * nf + a] - r.summary[a].mean) *
             (r.samples[i * nf + b] - r.summary[b].mean);
      c /= double(ns > 1 ? ns - 1 : 1);
      r.correlation[a * nf + b] = c / (r.summary[a].sd * r.summary[b].sd);
    }
  // derived quantities
  r.derived_names = {"theta0_kms", "sun_angular_speed_kms_kpc", "theta0_plus_mean_v_kms"};
  r.derived_units = {"km/s", "km/s/kpc", "km/s"};
  std::vector<std::vector<double>> dv(3);
  for (std::size_t i = 0; i < ns; ++i) {
    const FullParams p = full_from_free(s, r.free, r.samples.data() + i * nf);
    const double th0 = s.model.theta0(p);
    dv[0].push_back(th0);
    dv[1].push_back((th0 + p[std::size_t(Param::v_sun)]) / p[std::size_t(Param::r0)]);
    dv[2].push_back(th0 + p[std::size_t(Param::mean_v)]);
  }
  const FullParams pmap = full_from_free(s, r.free, x.data());
  const double th0m = s.model.theta0(pmap);
  const double maps[3] = {th0m,
                          (th0m + pmap[std::size_t(Param::v_sun)]) / pmap[std::size_t(Param::r0)],
                          th0m + pmap[std::size_t(Param::mean_v)]};
  for (int k = 0; k < 3; ++k) {
    r.derived.push_back(summarise(dv[std::size_t(k)]));
    r.derived.back().map = maps[k];
  }
  r.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return r;
}

std::string constraint_summary(const FitSpec& s, const FitResult& r) {
  std::string well, prior, weak;
  const std::size_t nf = r.free.size();
  std::string bounded;
  for (std::size_t k = 0; k < nf; ++k) {
    const auto& m = r.summary[k];
    const std::string name = param_info(m.param).key;
    const double width = 0.5 * (m.hi - m.lo);
    if (std::find(r.at_bound.begin(), r.at_bound.end(), m.param) != r.at_bound.end())
      bounded += (bounded.empty() ? "" : ", ") + name;
    else if (std::isfinite(m.prior_width) && width > 0.7 * m.prior_width)
      prior += (prior.empty() ? "" : ", ") + name;
    else
      well += (well.empty() ? "" : ", ") + name + " (±" + detail::num(width) + " " +
              param_info(m.param).unit + ")";
  }
  for (std::size_t a = 0; a < nf; ++a)
    for (std::size_t b = a + 1; b < nf; ++b) {
      const double c = r.correlation[a * nf + b];
      if (std::fabs(c) >= 0.8)
        weak += std::string(weak.empty() ? "" : "; ") + param_info(r.free[a]).key + " and " +
                param_info(r.free[b]).key + " (correlation " + detail::num(c) + ")";
    }
  std::string out;
  if (!well.empty()) out += "The data constrain " + well + ".";
  if (!prior.empty())
    out += " Set mostly by their priors (the posterior is nearly as wide as the prior): " + prior +
           ".";
  if (!bounded.empty())
    out +=
        " Against a prior's bound, so not measured (an upper or lower limit at most): " + bounded +
        ".";
  if (!weak.empty())
    out += " Strongly correlated, so only a combination is well measured: " + weak + ".";
  out += " The derived Ω☉ = (Θ0 + V☉)/R0 = " + detail::num(r.derived[1].median) + " +" +
         detail::num(r.derived[1].hi - r.derived[1].median) + "/−" +
         detail::num(r.derived[1].median - r.derived[1].lo) +
         " km/s/kpc is usually the best-measured combination.";
  const auto d = degeneracies(s);
  for (const auto& m : d)
    out += " Degenerate: " + m + ".";
  const bool vmean_free = std::find(r.free.begin(), r.free.end(), Param::mean_v) != r.free.end();
  const bool vsun_free = std::find(r.free.begin(), r.free.end(), Param::v_sun) != r.free.end();
  if (vmean_free && vsun_free)
    out += " V☉ and V̄_s enter the data almost only through Θ0 + V☉ and Θ0 + V̄_s, so the lag "
           "V̄_s, and Θ0 itself, are only as good as the prior on V☉.";
  return out;
}

} // namespace undertow::fit

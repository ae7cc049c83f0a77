#include "undertow/fit/diagnostics.hpp"

#include <algorithm>
#include <cmath>
#include <complex>
#include <stdexcept>

#include <unsupported/Eigen/FFT>

#include "undertow/fit/ensemble_sampler.hpp"

namespace undertow::fit {

double autocorrelation_time(const std::vector<std::vector<double>>& series, double c) {
  if (series.empty() || series[0].size() < 4) return NAN;
  const std::size_t n = series[0].size();
  for (const auto& s : series)
    if (s.size() != n)
      throw std::invalid_argument("autocorrelation_time: series of unequal length");
  std::size_t m = 1;
  while (m < 2 * n)
    m <<= 1;
  Eigen::FFT<double> fft;
  std::vector<double> acf(n, 0.0);
  std::vector<double> buf(m);
  std::vector<std::complex<double>> spec;
  std::vector<double> back;
  for (const auto& s : series) {
    double mean = 0;
    for (double v : s)
      mean += v;
    mean /= double(n);
    std::fill(buf.begin(), buf.end(), 0.0);
    for (std::size_t i = 0; i < n; ++i)
      buf[i] = s[i] - mean;
    fft.fwd(spec, buf);
    for (auto& z : spec)
      z = std::norm(z);
    fft.inv(back, spec);
    if (!(back[0] > 0)) continue; // a constant series carries no information
    for (std::size_t i = 0; i < n; ++i)
      acf[i] += back[i] / back[0];
  }
  if (!(acf[0] > 0)) return NAN;
  const double a0 = acf[0];
  double tau = 1;
  for (std::size_t lag = 1; lag < n; ++lag) {
    tau += 2 * acf[lag] / a0;
    if (double(lag) >= c * tau) return tau;
  }
  return tau; // the window never closed: the chain is too short, and τ is a lower bound
}

double split_r_hat(const std::vector<std::vector<double>>& chains) {
  std::vector<std::vector<double>> halves;
  for (const auto& ch : chains) {
    if (ch.size() != chains[0].size())
      throw std::invalid_argument("split_r_hat: chains of unequal length");
    const std::size_t h = ch.size() / 2;
    if (h < 2) return NAN;
    halves.emplace_back(ch.begin(), ch.begin() + long(h));
    halves.emplace_back(ch.end() - long(h), ch.end());
  }
  const double n = double(halves[0].size()), m = double(halves.size());
  std::vector<double> means;
  double w = 0;
  for (const auto& c : halves) {
    double mu = 0;
    for (double v : c)
      mu += v;
    mu /= n;
    double s2 = 0;
    for (double v : c)
      s2 += (v - mu) * (v - mu);
    w += s2 / (n - 1);
    means.push_back(mu);
  }
  w /= m;
  double grand = 0;
  for (double mu : means)
    grand += mu;
  grand /= m;
  double b = 0;
  for (double mu : means)
    b += (mu - grand) * (mu - grand);
  b *= n / (m - 1);
  if (!(w > 0)) return NAN;
  const double var = (n - 1) / n * w + b / n;
  return std::sqrt(var / w);
}

ChainDiagnostics diagnose(const EnsembleSampler& s, long burn) {
  ChainDiagnostics d;
  d.burn = burn;
  d.kept = s.steps() - burn;
  for (int k = 0; k < s.ndim(); ++k) {
    std::vector<std::vector<double>> series(std::size_t(s.walkers()));
    for (int w = 0; w < s.walkers(); ++w) {
      auto& v = series[std::size_t(w)];
      v.reserve(std::size_t(d.kept));
      for (long t = burn; t < s.steps(); ++t)
        v.push_back(s.chain(t, w, k));
    }
    const double tau = autocorrelation_time(series);
    const double r = split_r_hat(series);
    d.tau.push_back(tau);
    d.r_hat.push_back(r);
    d.tau_max = std::max(d.tau_max, std::isfinite(tau) ? tau : INFINITY);
    d.r_hat_max = std::max(d.r_hat_max, std::isfinite(r) ? r : INFINITY);
  }
  return d;
}

ConvergenceRun run_to_convergence(EnsembleSampler& s, const ConvergenceRule& rule,
                                  const std::atomic<bool>* stop,
                                  const std::function<void(long)>& progress) {
  ConvergenceRun r;
  while (true) {
    const long steps_now = std::min<long>(rule.chunk, rule.steps_max - s.steps());
    if (steps_now <= 0) break;
    if (!s.run(int(steps_now), stop, progress)) {
      r.interrupted = true;
      return r;
    }
    r.diag = diagnose(s, s.steps() / 4);
    if (double(r.diag.kept) >= rule.tau_multiple * r.diag.tau_max &&
        r.diag.r_hat_max <= rule.r_hat_max) {
      r.converged = true;
      return r;
    }
  }
  r.diag = diagnose(s, s.steps() / 4);
  return r;
}

} // namespace undertow::fit

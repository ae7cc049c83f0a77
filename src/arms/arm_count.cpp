#include "undertow/arms/arm_count.hpp"

#include <algorithm>
#include <cmath>
#include <complex>

#include "undertow/detail/log_sum_exp.hpp"
#include "undertow/error.hpp"
#include "undertow/units.hpp"

namespace undertow::arms {

SegmentSummary summary_of(const SegmentResult& r) {
  return {r.group, r.psi_ref_deg * units::deg, r.ln_radius_mean, r.pitch_rad_mean,
          r.ln_radius_pitch_cov};
}

namespace {

// One segment's factor at (p, φ0) under m arms: ln[(Δ/Λ) Σ_n N₂], and (when share is given) the
// share of each arm label n mod m in the sum.
struct Segment {
  double psi, L, p, cpp, slope, vc; // slope = C_Lp/C_pp, vc = C_LL − C_Lp²/C_pp
};

double segment_factor(const Segment& g, int m, double p, double t, double delta, double phi0,
                      double ln_lambda, std::vector<double>* share) {
  const double rp = g.p - p;
  const double ln_np = -0.5 * rp * rp / g.cpp - 0.5 * std::log(2 * units::pi * g.cpp);
  const double sc = std::sqrt(g.vc);
  // r_L(n) = L − (φ0 − nΔ − ψ t) = base + nΔ, less the shift the pitch residual implies
  const double base = g.L - phi0 + g.psi * t - g.slope * rp;
  const double ln_front = std::log(delta) - ln_lambda + ln_np;
  if (16 * sc > 400 * delta) { // spacing far below the error: the sum is the integral / Δ
    if (share) share->assign(std::size_t(m), 1.0 / m);
    return ln_front - std::log(delta);
  }
  const double centre = -base / delta, reach = 8 * sc / delta + 1;
  const long n0 = long(std::floor(centre - reach)), n1 = long(std::ceil(centre + reach));
  double sum = 0;
  if (share) share->assign(std::size_t(m), 0.0);
  for (long n = n0; n <= n1; ++n) {
    const double r = base + double(n) * delta;
    const double v = std::exp(-0.5 * r * r / g.vc);
    sum += v;
    if (share) (*share)[std::size_t(((n % m) + m) % m)] += v;
  }
  if (share && sum > 0)
    for (double& x : *share)
      x /= sum;
  return ln_front + std::log(sum) - 0.5 * std::log(2 * units::pi * g.vc);
}

} // namespace

ArmCountResult count_arms(const std::vector<SegmentSummary>& segments, const ArmCountSettings& s) {
  if (segments.size() < 2)
    throw InputError("counting arms needs at least two fitted segments, got " +
                     std::to_string(segments.size()));
  std::vector<Segment> seg;
  double sc_min = INFINITY;
  for (const auto& x : segments) {
    const double cLL = x.cov[0], cLp = x.cov[1], cpp = x.cov[2];
    Segment g{x.psi_ref_rad, x.ln_radius, x.pitch_rad, cpp, cLp / cpp, cLL - cLp * cLp / cpp};
    if (!(cpp > 0) || !(g.vc > 0))
      throw InputError("segment '" + x.group + "': its posterior covariance is not positive");
    seg.push_back(g), sc_min = std::min(sc_min, std::sqrt(g.vc));
  }
  const double ln_lambda = std::log(std::log(s.radius_max_kpc / s.radius_min_kpc));
  const double p0 = s.pitch_min_deg * units::deg, p1 = s.pitch_max_deg * units::deg;
  const int np = s.pitch_nodes;
  const auto pitch_at = [&](int k) { return p0 + (k + 0.5) / np * (p1 - p0); };
  ArmCountResult r;
  // the baseline: independent segments sharing one pitch
  double ln_z0 = 0;
  {
    std::vector<double> v(static_cast<std::size_t>(np));
    for (int k = 0; k < np; ++k) {
      double a = 0;
      for (const auto& g : seg) {
        const double rp = g.p - pitch_at(k);
        a += -0.5 * rp * rp / g.cpp - 0.5 * std::log(2 * units::pi * g.cpp) - ln_lambda;
      }
      v[std::size_t(k)] = a;
    }
    ln_z0 = detail::log_sum_exp(v) - std::log(double(np));
  }
  const auto grid_phase = [&](double delta) {
    return std::clamp(int(std::ceil(delta / (sc_min / 3))), s.phase_nodes, 8192);
  };
  for (int m = 1; m <= s.m_max; ++m) {
    std::vector<double> v;
    for (int k = 0; k < np; ++k) {
      const double p = pitch_at(k), t = std::tan(p), delta = 2 * units::pi / m * t;
      const int nf = grid_phase(delta);
      std::vector<double> row(static_cast<std::size_t>(nf));
      for (int j = 0; j < nf; ++j) {
        const double phi0 = (j + 0.5) / nf * delta;
        double a = 0;
        for (const auto& g : seg)
          a += segment_factor(g, m, p, t, delta, phi0, ln_lambda, nullptr);
        row[std::size_t(j)] = a;
      }
      v.push_back(detail::log_sum_exp(row) - std::log(double(nf)));
    }
    r.m.push_back(m);
    r.ln_evidence.push_back(detail::log_sum_exp(v) - std::log(double(np)) - ln_z0);
  }
  const double top = *std::max_element(r.ln_evidence.begin(), r.ln_evidence.end());
  double total = 0;
  for (double x : r.ln_evidence)
    total += std::exp(x - top);
  for (double x : r.ln_evidence)
    r.probability.push_back(std::exp(x - top) / total);
  const auto ib = std::size_t(std::max_element(r.ln_evidence.begin(), r.ln_evidence.end()) -
                              r.ln_evidence.begin());
  r.best_m = r.m[ib];
  double next = -INFINITY;
  for (std::size_t i = 0; i < r.m.size(); ++i)
    if (i != ib) next = std::max(next, r.ln_evidence[i]);
  r.ln_bayes_factor_next = r.ln_evidence[ib] - next;
  r.ln_bayes_factor_independent = r.ln_evidence[ib];

  // the best m again, now keeping the posterior over (p, φ0) and the segments' arm labels
  const int m = r.best_m;
  const std::size_t J = seg.size();
  std::vector<double> wp(std::size_t(np), 0.0);
  std::vector<std::vector<double>> rel(J, std::vector<double>(std::size_t(m), 0.0));
  std::complex<double> phase_sum = 0;
  double wsum = 0;
  const double ln_rx = std::log(s.reference_radius_kpc);
  // the posterior's peak first, so the weights stay in range
  double peak = -INFINITY;
  for (int pass = 0; pass < 2; ++pass)
    for (int k = 0; k < np; ++k) {
      const double p = pitch_at(k), t = std::tan(p), delta = 2 * units::pi / m * t;
      const int nf = grid_phase(delta);
      for (int j = 0; j < nf; ++j) {
        const double phi0 = (j + 0.5) / nf * delta;
        std::vector<std::vector<double>> shares(J);
        double a = -std::log(double(nf)); // φ0's grid weight
        for (std::size_t q = 0; q < J; ++q)
          a += segment_factor(seg[q], m, p, t, delta, phi0, ln_lambda, pass ? &shares[q] : nullptr);
        if (pass == 0) {
          peak = std::max(peak, a);
          continue;
        }
        const double w = std::exp(a - peak);
        if (w < 1e-300) continue;
        wp[std::size_t(k)] += w, wsum += w;
        const double psi_arm = (phi0 - ln_rx) / t; // an arm at ln R_x, modulo 2π/m
        phase_sum += w * std::polar(1.0, m * psi_arm);
        for (std::size_t q = 0; q < J; ++q)
          for (int c = 0; c < m; ++c) {
            double x = 0;
            for (int b = 0; b < m; ++b)
              x += shares[0][std::size_t(b)] * shares[q][std::size_t((b + c) % m)];
            rel[q][std::size_t(c)] += w * x;
          }
      }
    }
  // the pitch's posterior quantiles from its grid
  const auto quantile = [&](double f) {
    double c = 0;
    for (int k = 0; k < np; ++k) {
      const double next_c = c + wp[std::size_t(k)] / wsum;
      if (next_c >= f) {
        const double frac = wp[std::size_t(k)] > 0 ? (f - c) / (wp[std::size_t(k)] / wsum) : 0.5;
        return (p0 + (k + frac) / np * (p1 - p0)) / units::deg;
      }
      c = next_c;
    }
    return p1 / units::deg;
  };
  r.pitch_deg = {quantile(0.5), quantile(0.16), quantile(0.84)};
  const std::complex<double> mean = phase_sum / wsum;
  r.arm_azimuth_deg = std::arg(mean) / m / units::deg;
  r.arm_azimuth_sigma_deg =
      std::sqrt(-2 * std::log(std::max(std::abs(mean), 1e-300))) / m / units::deg;
  for (std::size_t q = 0; q < J; ++q) {
    double norm = 0;
    for (double x : rel[q])
      norm += x;
    const auto it = std::max_element(rel[q].begin(), rel[q].end());
    r.arm.push_back(int(it - rel[q].begin()));
    r.arm_probability.push_back(*it / norm);
    r.same_arm_as_first.push_back(rel[q][0] / norm);
  }
  return r;
}

} // namespace undertow::arms

#include "undertow/arms/segment_likelihood.hpp"

#include <algorithm>
#include <cmath>
#include <functional>

#include "undertow/arms/spiral_geometry.hpp"
#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/fit/distance_prior.hpp"
#include "undertow/sky/galactic.hpp"
#include "undertow/units.hpp"

namespace undertow::arms {

void SightLines::validate() const {
  if (!(distance_min_kpc >= 0) || !std::isfinite(distance_min_kpc))
    throw detail::ParameterError("distance_min_kpc",
                                 "must be non-negative, got " + detail::num(distance_min_kpc));
  if (!(distance_max_kpc > distance_min_kpc) || !std::isfinite(distance_max_kpc))
    throw detail::ParameterError("distance_max_kpc", "must be finite and above distance_min_kpc");
  if (!(width_min_kpc > 0) || !std::isfinite(width_min_kpc))
    throw detail::ParameterError("width_min_kpc",
                                 "must be positive, got " + detail::num(width_min_kpc));
  if (!(scale_height_kpc >= 0) || !std::isfinite(scale_height_kpc))
    throw detail::ParameterError("scale_height_kpc",
                                 "must be non-negative, got " + detail::num(scale_height_kpc));
}

namespace {

constexpr std::size_t kMaxNodesPerGrid = 20000;
constexpr double kWindowEdge = 2 * units::pi / 180; // 2 deg
constexpr double kDistanceEdge = 0.1;               // kpc

// Σ_k w_k exp(−a (R_k (ln R_k − L + Δψ_k tan p))²): the arm profile on one grid. Vectorised; the
// exponent is held above −200 so that no term is subnormal (subnormal arithmetic costs a hundred
// times more); the held terms add at most 20 000 e^-200 < 1e-82, so a sum above kTrusted is exact
// to 1e-22, and a smaller one is redone in logarithms.
UNDERTOW_CLONES double profile_sum(const double* __restrict R, const double* __restrict lnR,
                                   const double* __restrict dpsi, const double* __restrict w,
                                   long n, double L, double t, double a) {
  const double x2_max = 200 / a;
  double s = 0;
#pragma omp simd reduction(+ : s)
  for (long k = 0; k < n; ++k) {
    const double x = R[k] * (lnR[k] - L + dpsi[k] * t);
    const double x2 = x * x; // held below 200 / a (written so that GCC clamps before the exp)
    s += w[k] * std::exp(-a * (x2 < x2_max ? x2 : x2_max));
  }
  return s;
}
constexpr double kTrusted = 1e-60;

// The same in logarithms (lnw = ln w), for when every term underflows (an arm far from the
// source). Vectorised.
UNDERTOW_CLONES double profile_log_sum(const double* __restrict R, const double* __restrict lnR,
                                       const double* __restrict dpsi, const double* __restrict lnw,
                                       long n, double L, double t, double a) {
  double m = -INFINITY;
#pragma omp simd reduction(max : m)
  for (long k = 0; k < n; ++k) {
    const double x = R[k] * (lnR[k] - L + dpsi[k] * t);
    const double e = lnw[k] - a * x * x;
    m = e > m ? e : m;
  }
  if (!std::isfinite(m)) return m;
  double s = 0;
#pragma omp simd reduction(+ : s)
  for (long k = 0; k < n; ++k) {
    const double x = R[k] * (lnR[k] - L + dpsi[k] * t);
    const double e = m - lnw[k] + a * x * x; // held below 700, as above
    s += std::exp(-(e < 700.0 ? e : 700.0));
  }
  return m + std::log(s);
}

} // namespace

SegmentLikelihood::SegmentLikelihood(const std::vector<residuals::Source>& sources,
                                     const fit::Geometry& g, double psi_ref, const SightLines& s,
                                     const std::string& file)
    : psi_ref_(psi_ref), window_lo_(s.window_lo), window_hi_(s.window_hi) {
  s.validate();
  const std::size_t n = sources.size();
  std::vector<double> nrm(3 * n); // unit vectors toward the sources
  for (std::size_t i = 0; i < n; ++i) {
    const auto v = sky::galactic_direction(sources[i].ra_deg, sources[i].dec_deg);
    std::copy(v.begin(), v.end(), nrm.begin() + long(3 * i));
  }
  const double dmin = s.distance_min_kpc, dmax = s.distance_max_kpc, wmin = s.width_min_kpc;
  // the distance range with its soft edges
  const double dedge = std::max(kDistanceEdge, wmin);
  const double dlo = std::max(0.05 * wmin, dmin - 6 * dedge), dhi = dmax + 6 * dedge;
  // One grid: nodes d = lo + (k + 1/2) h over [lo, hi] with h at most `step`, each weighted by
  // h d² exp(−|z|/h_z) exp(lnl(d)); the weights stored relative to the largest.
  const auto grid = [&](std::size_t i, double lo, double hi, double step, auto lnl,
                        std::vector<double>& lnscale) {
    const std::size_t count = std::min(
        kMaxNodesPerGrid, std::max<std::size_t>(16, std::size_t(std::ceil((hi - lo) / step))));
    const double h = (hi - lo) / double(count);
    const std::size_t first = R_.size();
    double top = -INFINITY;
    for (std::size_t k = 0; k < count; ++k) {
      const double d = lo + (double(k) + 0.5) * h;
      double x = 0, y = 0, z = 0;
      fit::galactocentric_xyz(d, &nrm[3 * i], g.r0_kpc, g.z_sun_kpc, x, y, z);
      const double R = std::hypot(x, y), dpsi = azimuth_from(std::atan2(y, -x), psi_ref);
      // the window's edges fall off as a Gaussian of kWindowEdge in ψ: a hard edge would cost
      // the grid its accuracy (an integrand that jumps), a soft one is resolved like the arm
      // so do the distance range's, over kDistanceEdge (or w_min if wider, to stay resolved)
      const double out = std::max({0.0, s.window_lo - dpsi, dpsi - s.window_hi}) / kWindowEdge;
      const double beyond = std::max({0.0, dmin - d, d - dmax}) / dedge;
      const double lnw = std::log(h * d * d) + lnl(d) - 0.5 * out * out - 0.5 * beyond * beyond -
                         (s.scale_height_kpc > 0 ? std::fabs(z) / s.scale_height_kpc : 0.0);
      R_.push_back(R), lnR_.push_back(std::log(R)), dpsi_.push_back(dpsi);
      w_.push_back(lnw), top = std::max(top, lnw);
    }
    // nodes below e^-100 of the largest weight are dropped: they add nothing a double can hold
    // beside it, and their products would turn subnormal
    std::size_t kept = first;
    for (std::size_t k = first; k < R_.size(); ++k)
      if (w_[k] - top > -100) {
        R_[kept] = R_[k], lnR_[kept] = lnR_[k], dpsi_[kept] = dpsi_[k];
        lnw_.push_back(w_[k] - top), w_[kept] = std::exp(w_[k] - top);
        ++kept;
      }
    for (auto* v : {&R_, &lnR_, &dpsi_, &w_})
      v->resize(kept);
    lnscale.push_back(top);
    return kept > first;
  };
  // the vertical density's scale along a line of sight: h_z / |sin b|
  const auto vertical_scale = [&](std::size_t i) {
    const double sb = std::fabs(nrm[3 * i + 2]);
    return s.scale_height_kpc > 0 && sb > 0 ? s.scale_height_kpc / sb : INFINITY;
  };
  for (std::size_t i = 0; i < n; ++i) {
    const auto& src = sources[i];
    num_begin_.push_back(R_.size());
    double lo = 0, hi = 0, sigma_d = 0;
    std::function<double(double)> lnl;
    if (src.has_distance()) {
      const double dm = src.distance_kpc, sd = src.distance_err_kpc;
      lo = std::max(dlo, dm - 7 * sd), hi = std::min(dhi, dm + 7 * sd), sigma_d = sd;
      lnl = [dm, sd](double d) { return -0.5 * (d - dm) * (d - dm) / (sd * sd); };
    } else {
      const double w = src.parallax_mas - src.parallax_offset_mas, sw = src.parallax_err_mas;
      const double u_hi = w + 7 * sw, u_lo = w - 7 * sw;
      lo = u_hi > 0 ? std::max(dlo, 1 / u_hi) : dhi;
      hi = u_lo > 0 ? std::min(dhi, 1 / u_lo) : dhi;
      sigma_d = sw * lo * lo; // the measurement's width in distance at the grid's near end
      lnl = [w, sw](double d) { return -0.5 * (w - 1 / d) * (w - 1 / d) / (sw * sw); };
    }
    const std::string what = src.has_distance() ? "distance" : "parallax";
    if (!(hi > lo))
      throw InputError(SourcePlace{file, src.line, 0, src.name},
                       "the measured " + what + " leaves no probability between " +
                           detail::num(dmin) + " and " + detail::num(dmax) + " kpc");
    if (!grid(i, lo, hi, std::min({wmin, sigma_d, vertical_scale(i)}) / 1.5, lnl, num_lnscale_))
      throw InputError(SourcePlace{file, src.line, 0, src.name},
                       "the measured " + what +
                           " places the source outside its segment's "
                           "azimuth window");
  }
  num_begin_.push_back(R_.size());
  for (std::size_t i = 0; i < n; ++i) {
    den_begin_.push_back(R_.size());
    grid(
        i, dlo, dhi, std::min(wmin, vertical_scale(i)), [](double) { return 0.0; }, den_lnscale_);
  }
  den_begin_.push_back(R_.size());
  // naive positions
  for (std::size_t i = 0; i < n; ++i) {
    const double d = sources[i].measured_distance_kpc();
    if (!(d > 0)) {
      naive_R_.push_back(NAN), naive_dpsi_.push_back(NAN);
      continue;
    }
    double x = 0, y = 0, z = 0;
    fit::galactocentric_xyz(d, &nrm[3 * i], g.r0_kpc, g.z_sun_kpc, x, y, z);
    naive_R_.push_back(std::hypot(x, y));
    naive_dpsi_.push_back(azimuth_from(std::atan2(y, -x), psi_ref));
  }
}

double SegmentLikelihood::operator()(double pitch_deg, double ln_r_ref, double width_kpc) const {
  const double p = pitch_deg * units::deg, t = std::tan(p), c = std::cos(p);
  const double a = c * c / (2 * width_kpc * width_kpc);
  const auto ln_sum = [&](std::size_t b, std::size_t e) {
    const long len = long(e - b);
    const double v = profile_sum(&R_[b], &lnR_[b], &dpsi_[b], &w_[b], len, ln_r_ref, t, a);
    return v > kTrusted
               ? std::log(v)
               : profile_log_sum(&R_[b], &lnR_[b], &dpsi_[b], &lnw_[b], len, ln_r_ref, t, a);
  };
  double total = 0;
  for (std::size_t i = 0; i + 1 < num_begin_.size(); ++i) {
    const double num = ln_sum(num_begin_[i], num_begin_[i + 1]);
    if (!std::isfinite(num)) return -INFINITY;
    total += num + num_lnscale_[i] - ln_sum(den_begin_[i], den_begin_[i + 1]) - den_lnscale_[i];
  }
  return total;
}

double SegmentLikelihood::naive(double pitch_deg, double ln_r_ref, double width_kpc) const {
  const double p = pitch_deg * units::deg, t = std::tan(p), c = std::cos(p);
  double total = 0;
  for (std::size_t i = 0; i < naive_R_.size(); ++i) {
    if (!(naive_R_[i] > 0)) continue;
    const double delta = distance_across_arm(naive_R_[i], naive_dpsi_[i], ln_r_ref, t, c);
    total += -0.5 * delta * delta / (width_kpc * width_kpc) - std::log(width_kpc);
  }
  return total;
}

} // namespace undertow::arms

#include "undertow/gas/circular_flow.hpp"

#include <algorithm>
#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/dynamics/frequencies.hpp"

namespace undertow::gas {

CircularFlow::CircularFlow(const potential::Model& m, double r_max_kpc, double dr_kpc)
    : dr_(dr_kpc) {
  const std::size_t n = std::size_t(std::ceil(r_max_kpc / dr_kpc)) + 2;
  vc_.resize(n);
  vc_[0] = 0;
  for (std::size_t k = 1; k < n; ++k) {
    const double v = dynamics::circular_speed(m, double(k) * dr_kpc);
    vc_[k] = std::isfinite(v) ? v : 0.0; // no circular orbit there: no flow to follow
  }
}

CircularFlow::CircularFlow(std::vector<double> vc_kms, double dr_kpc)
    : vc_(std::move(vc_kms)), dr_(dr_kpc) {}

namespace {
UNDERTOW_CLONES void flow_at(const double* __restrict vc, std::size_t size, double dr,
                             const double* __restrict x, const double* __restrict y, std::size_t n,
                             double* __restrict vx, double* __restrict vy,
                             std::uint32_t* __restrict bin) {
  const double top = double(size - 1);
#pragma omp simd
  for (std::size_t i = 0; i < n; ++i) {
    const double R = std::sqrt(x[i] * x[i] + y[i] * y[i] + detail::tiny2); // > 0: no branch
    double u = R / dr;
    u = u > 0 ? u : 0; // also for NaN
    u = u < top ? u : top;
    const std::int32_t k = std::int32_t(u);
    const std::int32_t k0 = k < std::int32_t(size - 2) ? k : std::int32_t(size - 2);
    const double f = u - double(k0); // 1 at and beyond the table's end: its last value
    const double v = vc[k0] * (1 - f) + vc[k0 + 1] * f;
    // Clockwise rotation seen from +z: the flow at (x, y) is (v_c / R) (y, -x).
    const double o = v / R;
    vx[i] = o * y[i], vy[i] = -o * x[i];
    bin[i] = std::uint32_t(k);
  }
}
} // namespace

void CircularFlow::at(const double* x, const double* y, std::size_t n, double* vx, double* vy,
                      std::uint32_t* bin) const {
  static const double none[2] = {0, 0};
  if (vc_.size() < 2)
    flow_at(none, 2, 1, x, y, n, vx, vy, bin);
  else
    flow_at(vc_.data(), vc_.size(), dr_, x, y, n, vx, vy, bin);
}

CircularFlow CircularFlow::capped(double k_max) const {
  CircularFlow c = *this;
  for (std::size_t k = 0; k < c.vc_.size(); ++k)
    c.vc_[k] = std::clamp(c.vc_[k], -k_max * double(k) * dr_, k_max * double(k) * dr_);
  return c;
}

std::vector<double> CircularFlow::lipschitz_within(double reach_kpc) const {
  const std::size_t n = vc_.size();
  if (n < 2) return std::vector<double>(2, 0.0); // no flow: at() gives bins 0 and 1
  // l[k]: the bound on the interval [R_(k-1), R_k] (k >= 1), where v_c is linear, so v_c / R
  // takes its extremes at the ends; l[n]: beyond the table, where v_c is constant.
  std::vector<double> l(n + 1, 0.0);
  for (std::size_t k = 1; k < n; ++k) {
    l[k] = std::max(std::fabs(vc_[k] - vc_[k - 1]) / dr_, std::fabs(vc_[k]) / (double(k) * dr_));
    if (k > 1) l[k] = std::max(l[k], std::fabs(vc_[k - 1]) / (double(k - 1) * dr_));
  }
  l[n] = std::fabs(vc_[n - 1]) / (double(n - 1) * dr_);
  // Entry k covers R in [k dr - reach, (k + 1) dr + reach]: the intervals k - w .. k + 1 + w.
  const std::size_t w = std::size_t(std::ceil(reach_kpc / dr_)) + 1;
  std::vector<double> out(n);
  for (std::size_t k = 0; k < n; ++k) {
    const std::size_t lo = k > w ? k - w : 1, hi = k + 1 + w;
    double m = 0;
    for (std::size_t j = lo; j <= std::min(hi, n - 1); ++j)
      m = std::max(m, l[j]);
    if (hi >= n - 1) m = std::max(m, l[n]);
    out[k] = m;
  }
  return out;
}

} // namespace undertow::gas

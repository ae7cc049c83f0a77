#include "undertow/gas/circular_flow.hpp"

#include <algorithm>
#include <cmath>

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

void CircularFlow::at(double x, double y, double& vx, double& vy) const {
  vx = vy = 0;
  if (vc_.empty()) return;
  const double R = std::sqrt(x * x + y * y);
  if (!(R > 0)) return;
  const double u = R / dr_;
  double vc;
  if (u >= double(vc_.size() - 1)) {
    vc = vc_.back();
  } else {
    const std::size_t k = std::size_t(u);
    const double f = u - double(k);
    vc = vc_[k] * (1 - f) + vc_[k + 1] * f;
  }
  // Clockwise rotation seen from +z: the flow at (x, y) is (v_c / R) (y, -x).
  vx = vc / R * y;
  vy = -vc / R * x;
}

CircularFlow CircularFlow::capped(double k_max) const {
  CircularFlow c = *this;
  for (std::size_t k = 0; k < c.vc_.size(); ++k)
    c.vc_[k] = std::clamp(c.vc_[k], -k_max * double(k) * dr_, k_max * double(k) * dr_);
  return c;
}

double CircularFlow::lipschitz() const {
  double L = 0;
  for (std::size_t k = 1; k < vc_.size(); ++k)
    L = std::max({L, std::fabs(vc_[k] - vc_[k - 1]) / dr_, std::fabs(vc_[k]) / (double(k) * dr_)});
  return L;
}

} // namespace undertow::gas

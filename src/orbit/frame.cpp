#include "undertow/orbit/frame.hpp"

#include <cmath>

#include "undertow/units.hpp"

namespace undertow::orbit {

double RotatingFrame::angle(double t_myr) const {
  return pattern_speed * t_myr * units::kms_per_kpc_times_myr;
}

// Galactic rotation is clockwise seen from the north pole, so a frame turning by theta in the
// sense of rotation sees the standard azimuth atan2(y, x) increased by theta. Its angular
// velocity is omega = -Omega_p z, and omega x r = (Omega_p y, -Omega_p x).
void RotatingFrame::to_rotating(PhaseSpace& p, double t_myr) const {
  const double th = angle(t_myr), c = std::cos(th), s = std::sin(th), w = pattern_speed;
  for (std::size_t i = 0; i < p.size(); ++i) {
    const double x = p.x[i], y = p.y[i];
    const double ux = p.vx[i] - w * y, uy = p.vy[i] + w * x;
    p.x[i] = c * x - s * y;
    p.y[i] = s * x + c * y;
    p.vx[i] = c * ux - s * uy;
    p.vy[i] = s * ux + c * uy;
  }
}

void RotatingFrame::to_inertial(PhaseSpace& p, double t_myr) const {
  const double th = angle(t_myr), c = std::cos(th), s = std::sin(th), w = pattern_speed;
  for (std::size_t i = 0; i < p.size(); ++i) {
    const double xr = p.x[i], yr = p.y[i], ur = p.vx[i], vr = p.vy[i];
    const double x = c * xr + s * yr, y = -s * xr + c * yr;
    p.x[i] = x;
    p.y[i] = y;
    p.vx[i] = c * ur + s * vr + w * y;
    p.vy[i] = -s * ur + c * vr - w * x;
  }
}

} // namespace undertow::orbit

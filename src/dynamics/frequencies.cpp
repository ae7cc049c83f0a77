#include "undertow/dynamics/frequencies.hpp"

#include <cmath>

namespace undertow::dynamics {
namespace {

// -dPhi/dR in the midplane at azimuth 0 (axisymmetric, so any azimuth will do).
double radial_pull(const Model& m, double R) {
  return -m.axisymmetric_acceleration({R, 0, 0})[0];
}

// Richardson-extrapolated central difference: error O(h^4).
template <class F> double derivative(F&& f, double x, double h) {
  const double d1 = (f(x + h) - f(x - h)) / (2 * h);
  const double d2 = (f(x + h / 2) - f(x - h / 2)) / h;
  return (4 * d2 - d1) / 3;
}

double step(double R) {
  return 2e-3 * std::fmax(R, 1e-2);
}

} // namespace

double circular_speed(const Model& m, double R) {
  const double v2 = R * radial_pull(m, R);
  return v2 >= 0 ? std::sqrt(v2) : std::nan("");
}

double circular_speed_component(const Model& m, std::size_t i, double R) {
  const double v2 = -R * m.component_acceleration(i, {R, 0, 0})[0];
  return v2 >= 0 ? std::sqrt(v2) : std::nan("");
}

double omega(const Model& m, double R) {
  return circular_speed(m, R) / R;
}

double kappa(const Model& m, double R) {
  // kappa^2 = d^2Phi/dR^2 + (3/R) dPhi/dR
  const double g = radial_pull(m, R);
  const double gp = derivative([&](double r) { return radial_pull(m, r); }, R, step(R));
  const double k2 = gp + 3 * g / R;
  return k2 >= 0 ? std::sqrt(k2) : std::nan("");
}

double nu(const Model& m, double R) {
  // nu^2 = d^2Phi/dz^2 at z = 0 = -d a_z / dz
  const double h = 1e-3 * std::fmax(std::fmin(R, 1.0), 1e-2);
  const double n2 = -derivative(
      [&](double z) {
        return m.axisymmetric_acceleration({R, 0, z})[2];
      },
      0.0, h);
  return n2 >= 0 ? std::sqrt(n2) : std::nan("");
}

double circular_speed_slope(const Model& m, double R) {
  // v^2 = R g  =>  dv/dR = (g + R g') / (2 v)
  const double g = radial_pull(m, R);
  const double gp = derivative([&](double r) { return radial_pull(m, r); }, R, step(R));
  return (g + R * gp) / (2 * circular_speed(m, R));
}

double oort_a(const Model& m, double R) {
  return 0.5 * (circular_speed(m, R) / R - circular_speed_slope(m, R));
}

double oort_b(const Model& m, double R) {
  return -0.5 * (circular_speed(m, R) / R + circular_speed_slope(m, R));
}

} // namespace undertow::dynamics

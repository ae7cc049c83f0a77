#include "undertow/dynamics/mass.hpp"

#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <cmath>

#include "undertow/error.hpp"
#include "undertow/units.hpp"

namespace undertow::dynamics {

double enclosed_mass(const potential::Model& m, double r) {
  // M = -(1 / 4 pi G) \oint a . dA = -(r^2 / 2G) \int_{-1}^{1} a_r(mu) dmu for an axisymmetric
  // model; the components are symmetric about the midplane, so twice the integral over [0, 1].
  const auto ar = [&](double mu) {
    const double s = std::sqrt(std::fmax(0.0, 1 - mu * mu));
    const auto a = m.axisymmetric_acceleration({r * s, 0, r * mu});
    return a[0] * s + a[2] * mu;
  };
  double err = 0;
  const double integral =
      boost::math::quadrature::gauss_kronrod<double, 31>::integrate(ar, 0.0, 1.0, 20, 1e-12, &err);
  return -r * r / units::G * integral;
}

double escape_speed(const potential::Model& m, double R, std::optional<double> r_far_kpc) {
  double phi_far = 0;
  if (r_far_kpc) {
    phi_far = m.axisymmetric_potential({*r_far_kpc, 0, 0});
  } else if (!m.vanishes_at_infinity()) {
    throw InputError("escape speed: the potential of this model does not vanish at infinity "
                     "(it has a logarithmic component); give a radius to escape to");
  }
  const double d = phi_far - m.axisymmetric_potential({R, 0, 0});
  return d > 0 ? std::sqrt(2 * d) : 0.0;
}

} // namespace undertow::dynamics

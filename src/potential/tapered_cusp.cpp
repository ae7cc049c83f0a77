#include "undertow/potential/tapered_cusp.hpp"

#include <boost/math/special_functions/gamma.hpp>

namespace undertow::potential {

TaperedCusp TaperedCusp::make(double rho1_msun_kpc3, double r1_kpc, double alpha, double rc_kpc) {
  TaperedCusp b;
  b.rho1 = detail::positive(rho1_msun_kpc3, "density_msun_kpc3");
  b.r1 = detail::positive(r1_kpc, "reference_radius_kpc");
  b.alpha = detail::non_negative(alpha, "slope");
  // Gamma(1 - alpha/2, x) needs a positive first argument in Boost.Math.
  if (!(b.alpha < 2))
    throw detail::ParameterError("slope", "must lie in [0, 2), got " + detail::num(alpha));
  b.rc = detail::positive(rc_kpc, "cutoff_kpc");
  return b;
}

double TaperedCusp::mass_at(double r) const {
  const double x = (r / rc) * (r / rc);
  return 2 * units::pi * rho1 * std::pow(r1, alpha) * std::pow(rc, 3 - alpha) *
         boost::math::tgamma_lower(1.5 - 0.5 * alpha, x);
}

double TaperedCusp::total_mass() const {
  return 2 * units::pi * rho1 * std::pow(r1, alpha) * std::pow(rc, 3 - alpha) *
         boost::math::tgamma(1.5 - 0.5 * alpha);
}

double TaperedCusp::potential_at_radius(double r) const {
  const double x = (r / rc) * (r / rc);
  const double outer = 2 * units::pi * units::G * rho1 * std::pow(r1, alpha) *
                       std::pow(rc, 2 - alpha) * boost::math::tgamma(1 - 0.5 * alpha, x);
  if (r == 0) return -outer; // M(r)/r -> 0
  return -units::G * mass_at(r) / r - outer;
}

} // namespace undertow::potential

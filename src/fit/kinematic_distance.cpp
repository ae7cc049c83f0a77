#include "undertow/fit/kinematic_distance.hpp"

#include <cmath>

#include "undertow/sky/lsr.hpp"
#include "undertow/sky/solar_frame.hpp"
#include "undertow/units.hpp"

namespace undertow::fit {

double circular_vlsr(double ra, double dec, double d, const KinematicModel& m,
                     const FullParams& p) {
  const auto sun = m.sun(p);
  // position of the source, then its circular velocity, then back to heliocentric observables
  sky::Observed o{ra, dec, 0, 0, 0};
  const auto g0 = sky::to_galactocentric(o, d, sun);
  const double x = g0.r[0], y = g0.r[1], R = std::hypot(x, y);
  // circular rotation plus the fitted mean motion (toward the centre, along rotation, up)
  const double vphi = m.theta(R, p) + p[std::size_t(Param::mean_v)];
  const double vin = p[std::size_t(Param::mean_u)];
  sky::Galactocentric g{
      g0.r, {(vphi * y - vin * x) / R, (-vphi * x - vin * y) / R, p[std::size_t(Param::mean_w)]}};
  sky::Observed out;
  sky::from_galactocentric(g, sun, out);
  return sky::helio_to_lsr(out.vhelio_kms, ra, dec, m.lsr);
}

KinematicDistance kinematic_distance(double ra, double dec, double v, const KinematicModel& m,
                                     const FullParams& p, double dmax) {
  KinematicDistance k;
  constexpr int n = 2500;
  const double h = dmax / n;
  double prev = circular_vlsr(ra, dec, h, m, p) - v;
  double dprev = h;
  double extreme = prev + v, dext = h;
  bool first = true;
  // inside the solar circle (cos l > 0) v_LSR peaks at the tangent point: a maximum for
  // sin l > 0, a minimum for sin l < 0
  double l, b;
  sky::icrs_to_galactic(ra * units::deg, dec * units::deg, l, b);
  const bool inner = std::cos(l) > 0, up = std::sin(l) > 0;
  for (int i = 2; i <= n; ++i) {
    const double d = i * h, f = circular_vlsr(ra, dec, d, m, p) - v;
    const double vl = f + v;
    // the extreme of v_LSR with the sign of the first values (the terminal velocity)
    if (inner && ((up && vl > extreme) || (!up && vl < extreme))) extreme = vl, dext = d;
    if ((prev < 0) != (f < 0)) {
      // bisection on the bracket
      double lo = dprev, hi = d, flo = prev;
      for (int it = 0; it < 60; ++it) {
        const double mid = 0.5 * (lo + hi), fm = circular_vlsr(ra, dec, mid, m, p) - v;
        if ((fm < 0) == (flo < 0))
          lo = mid, flo = fm;
        else
          hi = mid;
      }
      const double root = 0.5 * (lo + hi);
      if (first) k.near_kpc = root, first = false;
      k.far_kpc = root;
    }
    prev = f, dprev = d;
  }
  if (inner && dext < dmax - h) k.tangent_kpc = dext;
  if (first) {
    k.beyond_terminal = true;
    k.near_kpc = k.far_kpc = std::isfinite(k.tangent_kpc) ? k.tangent_kpc : NAN;
  }
  return k;
}

} // namespace undertow::fit

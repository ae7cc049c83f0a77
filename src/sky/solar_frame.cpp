#include "undertow/sky/solar_frame.hpp"

#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/units.hpp"

namespace undertow::sky {
namespace {

// The tilt about y: sin(theta) = z_sun / R0; H (-R0, 0, 0) = (-R0 cos theta, 0, z_sun).
struct Tilt {
  double c, s;
  explicit Tilt(const SolarFrame& f) : c(0), s(f.z_sun_kpc / f.r0_kpc) { c = std::sqrt(1 - s * s); }
  Vec3 apply(const Vec3& v) const { return {c * v[0] + s * v[2], v[1], -s * v[0] + c * v[2]}; }
  Vec3 undo(const Vec3& v) const { return {c * v[0] - s * v[2], v[1], s * v[0] + c * v[2]}; }
};

} // namespace

void SolarFrame::validate() const {
  const auto bad = [](const char* k, double v) {
    throw InputError(SourcePlace{{}, 0, 0, k}, "invalid value " + detail::num(v));
  };
  if (!(r0_kpc > 0) || !std::isfinite(r0_kpc)) bad("r0_kpc", r0_kpc);
  if (!std::isfinite(z_sun_kpc) || std::fabs(z_sun_kpc) >= r0_kpc) bad("z_sun_kpc", z_sun_kpc);
  if (!(theta0_kms > 0) || !std::isfinite(theta0_kms)) bad("theta0_kms", theta0_kms);
  for (double v : {u_sun_kms, v_sun_kms, w_sun_kms})
    if (!std::isfinite(v)) bad("solar_motion_kms", v);
}

Galactocentric sun(const SolarFrame& f) {
  const Tilt t(f);
  return {t.apply({-f.r0_kpc, 0, 0}), {f.u_sun_kms, f.theta0_kms + f.v_sun_kms, f.w_sun_kms}};
}

Galactocentric to_galactocentric(const Observed& o, double d, const SolarFrame& f) {
  const double ra = o.ra_deg * units::deg, dec = o.dec_deg * units::deg;
  double l, b, pl, pb;
  icrs_to_galactic_with_pm(ra, dec, o.pmra_masyr, o.pmdec_masyr, l, b, pl, pb);
  const Vec3 u = unit_vector(l, b);
  Vec3 el, eb;
  tangent_basis(l, b, el, eb);
  Vec3 rh, vh;
  for (int k = 0; k < 3; ++k) {
    rh[k] = d * u[k];
    vh[k] = o.vhelio_kms * u[k] + kKappa * d * (pl * el[k] + pb * eb[k]);
  }
  rh[0] -= f.r0_kpc; // now relative to the centre, Galactic axes
  const Tilt t(f);
  Galactocentric g{t.apply(rh), t.apply(vh)};
  const auto s = sun(f);
  for (int k = 0; k < 3; ++k)
    g.v[k] += s.v[k];
  return g;
}

double from_galactocentric(const Galactocentric& g, const SolarFrame& f, Observed& o) {
  const Tilt t(f);
  const auto s = sun(f);
  Vec3 rh = t.undo(g.r);
  rh[0] += f.r0_kpc;
  const Vec3 vh = t.undo({g.v[0] - s.v[0], g.v[1] - s.v[1], g.v[2] - s.v[2]});
  const double d = std::hypot(rh[0], rh[1], rh[2]);
  double l, b;
  to_angles(rh, l, b);
  const Vec3 u = unit_vector(l, b);
  Vec3 el, eb;
  tangent_basis(l, b, el, eb);
  o.vhelio_kms = dot(vh, u);
  const double pl = dot(vh, el) / (kKappa * d), pb = dot(vh, eb) / (kKappa * d);
  double ra, dec;
  galactic_to_icrs_with_pm(l, b, pl, pb, ra, dec, o.pmra_masyr, o.pmdec_masyr);
  o.ra_deg = ra / units::deg;
  o.dec_deg = dec / units::deg;
  return d;
}

} // namespace undertow::sky

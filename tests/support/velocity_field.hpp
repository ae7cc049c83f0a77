#pragma once
// Invented velocity fields for the verdict's tests (tests only): a flat rotation curve with a
// mean lag and a dispersion in the local (radial, azimuthal, vertical) axes, realised as
// simulated young sources, and measured catalogs drawn from it with maser-like errors.
#include <cmath>
#include <random>

#include "undertow/compare/verdict.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/sky/lsr.hpp"
#include "undertow/sky/solar_frame.hpp"

namespace undertow::test {

struct VelocityField {
  double theta_kms = 230, lag_kms = 0;
  double sigma_r = 10, sigma_phi = 8, sigma_z = 5;
};

inline sky::SolarFrame field_sun() {
  sky::SolarFrame f;
  f.r0_kpc = 8.1, f.theta0_kms = 230;
  return f;
}

// Sources spread uniformly over the plane within 8 kpc of the Sun (x from -16 to 0 kpc).
inline compare::SimulatedYoung realise(const VelocityField& m, std::size_t count,
                                       std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> ux(-16.1, -0.1), uy(-8, 8);
  std::normal_distribution<double> g(0, 1);
  compare::SimulatedYoung s;
  while (s.x.size() < count) {
    const double x = ux(rng), y = uy(rng), R = std::hypot(x, y);
    if (R < 3) continue;
    const double vr = m.sigma_r * g(rng), vp = m.theta_kms + m.lag_kms + m.sigma_phi * g(rng);
    s.x.push_back(x), s.y.push_back(y), s.z.push_back(0.03 * g(rng));
    // inward (U-like) component along -(x, y)/R, rotation along (y, -x)/R
    s.vx.push_back((-vr * x + vp * y) / R), s.vy.push_back((-vr * y - vp * x) / R);
    s.vz.push_back(m.sigma_z * g(rng));
  }
  return s;
}

// A measured catalog of the sources of one realisation between 0.5 and 6 kpc from the Sun:
// parallax error 0.02 mas + 5 %, proper motions 0.05 mas/yr, v_LSR 5 km/s.
inline residuals::Catalog measure(const compare::SimulatedYoung& s, std::size_t count,
                                  std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g(0, 1);
  residuals::Catalog c;
  c.file = "invented";
  const auto sun = field_sun();
  for (std::size_t i = 0; i < s.x.size() && c.sources.size() < count; ++i) {
    sky::Observed o;
    const double d =
        sky::from_galactocentric({{s.x[i], s.y[i], s.z[i]}, {s.vx[i], s.vy[i], s.vz[i]}}, sun, o);
    if (d < 0.5 || d > 6) continue;
    residuals::Source src;
    src.name = "S" + std::to_string(i);
    src.ra_deg = o.ra_deg, src.dec_deg = o.dec_deg;
    src.parallax_err_mas = 0.02 + 0.05 / d;
    src.parallax_mas = 1 / d + src.parallax_err_mas * g(rng);
    src.pmra_err_masyr = src.pmdec_err_masyr = 0.05;
    src.pmra_masyr = o.pmra_masyr + 0.05 * g(rng);
    src.pmdec_masyr = o.pmdec_masyr + 0.05 * g(rng);
    src.vlsr_err_kms = 5;
    src.vlsr_kms = sky::helio_to_lsr(o.vhelio_kms, o.ra_deg, o.dec_deg) + 5 * g(rng);
    c.sources.push_back(src);
  }
  return c;
}

inline compare::VerdictSettings field_settings() {
  compare::VerdictSettings v;
  v.prior.distance_min_kpc = 0.2, v.prior.distance_max_kpc = 12;
  const auto sun = field_sun();
  v.r0_kpc = sun.r0_kpc;
  v.sun_velocity_kms = {sun.u_sun_kms, sun.theta0_kms + sun.v_sun_kms, sun.w_sun_kms};
  return v;
}

} // namespace undertow::test

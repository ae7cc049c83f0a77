#include "undertow/fit/simulate.hpp"

#include <cmath>

#include "undertow/tracers/random.hpp"
#include "undertow/units.hpp"

namespace undertow::fit {

sky::SolarFrame truth_sun(const KinematicTruth& t) {
  const auto& p = t.params;
  sky::SolarFrame s;
  s.r0_kpc = p[std::size_t(Param::r0)];
  s.z_sun_kpc = p[std::size_t(Param::z_sun)];
  s.theta0_kms = t.model.theta0(p);
  s.u_sun_kms = p[std::size_t(Param::u_sun)];
  s.v_sun_kms = p[std::size_t(Param::v_sun)];
  s.w_sun_kms = p[std::size_t(Param::w_sun)];
  return s;
}

residuals::Catalog simulate_catalog(const KinematicTruth& t) {
  const auto& p = t.params;
  const auto at = [&](Param k) { return p[std::size_t(k)]; };
  const double r0 = at(Param::r0);
  io::Snapshot snap;
  const std::size_t n = 4 * t.sources + 100; // candidates; the observation picks t.sources
  snap.tracers.resize(n);
  std::vector<double> weights(n);
  const double tanp = std::tan(t.pitch_deg * units::deg);
  for (std::size_t i = 0; i < n; ++i) {
    tracers::TracerStream rng(t.seed, i, 0x517);
    // uniform in area within the annulus around the Sun
    const double d = std::sqrt(t.distance_min_kpc * t.distance_min_kpc +
                               rng.uniform() * (t.distance_max_kpc * t.distance_max_kpc -
                                                t.distance_min_kpc * t.distance_min_kpc));
    const double l = 2 * units::pi * rng.uniform();
    const double x = -r0 + d * std::cos(l), y = d * std::sin(l);
    const double z = t.scale_height_kpc * rng.normal();
    const double R = std::hypot(x, y), phi = std::atan2(y, x);
    double U = at(Param::mean_u), V = at(Param::mean_v), W = at(Param::mean_w);
    if (t.model.anisotropic) {
      U += at(Param::dispersion_u) * rng.normal();
      V += at(Param::dispersion_v) * rng.normal();
      W += at(Param::dispersion_w) * rng.normal();
    } else {
      const double s = at(Param::dispersion);
      U += s * rng.normal(), V += s * rng.normal(), W += s * rng.normal();
    }
    if (t.stream_kms != 0) {
      const double chi = t.arms * (phi - std::log(R / r0) / tanp);
      U += t.stream_kms * std::cos(chi);
      V += t.stream_kms * std::sin(chi);
    }
    const double vphi = t.model.theta(R, p) + V; // along the rotation (y, -x)/R
    auto& ps = snap.tracers;
    ps.id[i] = i + 1;
    ps.x[i] = x, ps.y[i] = y, ps.z[i] = z;
    ps.vx[i] = (-U * x + vphi * y) / R;
    ps.vy[i] = (-U * y - vphi * x) / R;
    ps.vz[i] = W;
    weights[i] = R < t.radius_min_kpc           ? 0.0
                 : t.disk_scale_length_kpc > 0 ? std::exp(-R / t.disk_scale_length_kpc)
                                               : 1.0;
  }
  observe::ObservationSettings s;
  s.sun = truth_sun(t);
  s.lsr = t.model.lsr;
  s.errors = t.errors;
  s.seed = t.seed;
  s.selection.max_sources = t.sources;
  s.selection.parallax_snr_min = t.parallax_snr_min;
  auto mock = observe::observe(snap, weights, s);
  mock.catalog.file = "simulated";
  return mock.catalog;
}

} // namespace undertow::fit

#include "undertow/fit/simulate.hpp"

#include <algorithm>
#include <cmath>

#include "undertow/arms/spiral_geometry.hpp"
#include "undertow/error.hpp"
#include "undertow/tracers/random.hpp"
#include "undertow/units.hpp"

namespace undertow::fit {

sky::SolarFrame truth_sun(const KinematicTruth& t) {
  return t.model.sun(t.params);
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
  const double dmin = t.distance_min_kpc, dmax = t.distance_max_kpc, hz = t.scale_height_kpc;
  const double zmax = std::min(dmax, 12 * hz), rmax = r0 + dmax;
  const double cos_lmin = std::cos(t.longitude_min_deg * units::deg);
  const auto& arm = t.placement;
  const double arm_tan = std::tan(arm.pitch_deg * units::deg),
               arm_cos = std::cos(arm.pitch_deg * units::deg);
  const double arm_gap = arm.arms > 0 ? arms::arm_spacing(arm.arms, arm.pitch_deg) : 0;
  std::vector<long> arm_of(n, 0);
  for (std::size_t i = 0; i < n; ++i) {
    tracers::TracerStream rng(t.seed, i, 0x517);
    // rejection from a uniform slab: volume density exp(-R/h_R - |z|/h_z) inside the range
    double x = 0, y = 0, z = 0;
    for (int attempt = 0;; ++attempt) {
      const double dp = dmax * std::sqrt(rng.uniform()), l = 2 * units::pi * rng.uniform();
      x = -r0 + dp * std::cos(l), y = dp * std::sin(l);
      z = zmax * (2 * rng.uniform() - 1);
      const double d = std::sqrt(dp * dp + z * z), R = std::hypot(x, y);
      double accept = std::exp(-std::fabs(z) / hz) *
                      (t.disk_scale_length_kpc > 0
                           ? std::exp(-(R - std::max(0.0, r0 - dmax)) / t.disk_scale_length_kpc)
                           : 1.0);
      if (arm.arms > 0 && R > 0) {
        // the nearest arm: ln R − ln R_arm0(ψ) reduced to within half a spacing
        const double psi = std::atan2(y, -x);
        const double off =
            std::log(R) - arms::arm_ln_radius(psi, 0, std::log(arm.radius_kpc), arm_tan);
        const long k = std::lround(-off / arm_gap);
        const double delta = arms::distance_across_arm(
            R, psi, std::log(arm.radius_kpc) - double(k) * arm_gap, arm_tan, arm_cos);
        const bool wanted = arm.only.empty() ||
                            std::find(arm.only.begin(), arm.only.end(), int(k)) != arm.only.end();
        const bool inside =
            psi >= arm.psi_min_deg * units::deg && psi <= arm.psi_max_deg * units::deg;
        accept *= wanted && inside
                      ? std::exp(-0.5 * delta * delta / (arm.width_kpc * arm.width_kpc))
                      : 0.0;
        arm_of[i] = k;
      }
      // direction cut: angle between the line of sight and the direction of the centre
      const double toward_centre = (dp * std::cos(l)) / std::max(d, 1e-12);
      if (d >= dmin && d <= dmax && R < rmax && toward_centre <= cos_lmin && rng.uniform() < accept)
        break;
      if (attempt > 100000) throw InputError("simulate: the truth's volume selects nothing");
    }
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
    weights[i] = 1.0;
  }
  observe::ObservationSettings s;
  s.sun = truth_sun(t);
  s.lsr = t.model.lsr;
  s.errors = t.errors;
  s.seed = t.seed;
  s.selection.max_sources = t.sources;
  s.selection.parallax_snr_min = t.parallax_snr_min;
  s.selection.dec_min_deg = t.dec_min_deg;
  auto mock = observe::observe(snap, weights, s);
  mock.catalog.file = "simulated";
  if (arm.arms > 0) // tracer i has id i + 1
    for (std::size_t k = 0; k < mock.catalog.sources.size(); ++k)
      mock.catalog.sources[k].group = "arm" + std::to_string(arm_of[mock.tracer_ids[k] - 1]);
  return mock.catalog;
}

} // namespace undertow::fit

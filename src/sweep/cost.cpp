#include "undertow/sweep/cost.hpp"

#include <cmath>

namespace undertow::sweep {

CostGuess guess_cost(const scenario::Scenario& s) {
  // docs/performance.md, one core of the development VM: leapfrog in a spiral model 88 million
  // orbit-steps/s (four-stage methods cost about four times that per step); the gas's work per
  // step (collisions, stirring, stars) 3 million clouds/s.
  constexpr double leapfrog_rate = 88e6, gas_rate = 3e6;
  CostGuess c;
  const double tracers = s.tracers.kind == scenario::TracerSource::Kind::disk
                             ? double(s.tracers.disk.count)
                             : 0; // a tracer file's size is known only when it is read
  const double span = std::fabs(s.end_myr - s.start_myr);
  const double steps = std::ceil(span / s.integration.step_myr);
  const double per_step = s.integration.method == orbit::Method::leapfrog ? 1.0 : 4.0;
  c.orbit_steps = tracers * steps;
  c.core_seconds = c.orbit_steps * per_step / leapfrog_rate;
  if (s.gas) {
    c.gas_cloud_passes = tracers * steps; // a collision pass every step
    c.core_seconds += c.gas_cloud_passes / gas_rate;
  }
  // Each snapshot holds position and velocity (6 doubles) and a few per-tracer columns.
  c.orbit_file_bytes = tracers * double(s.output.times_myr.size() + 1) * 64;
  // a whole run integrates each of its realisations
  const double k = s.comparison ? double(s.comparison->realisations) : 1.0;
  c.orbit_steps *= k, c.gas_cloud_passes *= k, c.core_seconds *= k, c.orbit_file_bytes *= k;
  return c;
}

} // namespace undertow::sweep

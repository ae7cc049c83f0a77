#include "undertow/gas/gas_orbits.hpp"

#include <algorithm>

namespace undertow::gas {

bool advance_gas_step(const potential::Model& m, GasState& g, const GasSettings& s,
                      const CircularFlow& flow, const orbit::IntegrationSettings& integration,
                      double ta_myr, double tb_myr, std::size_t j, std::size_t n,
                      std::uint64_t seed, StepReport& report, const std::atomic<bool>* stop) {
  const double t0 = ta_myr + (tb_myr - ta_myr) * double(j) / double(n);
  const double t1 = j + 1 == n ? tb_myr : ta_myr + (tb_myr - ta_myr) * double(j + 1) / double(n);
  report = gas_step(g, s, flow, t0, t1 - t0, seed);
  if (integration.method != orbit::Method::leapfrog)
    return orbit::advance_steps(m, g.p, ta_myr, tb_myr, j, 1, integration, stop);
  const std::size_t r = s.stars ? std::size_t(s.stars->step_ratio) : 1;
  const std::size_t all = g.p.size(), newborn = all - report.stars_formed;
  const auto leapfrog = [&](std::size_t begin, std::size_t end, std::size_t stride) {
    return orbit::advance_steps_strided(m, g.p, ta_myr, tb_myr, j, 1, stride, begin, end,
                                        integration, g.acc, stop);
  };
  if (j % r == 0) { // every star steps to the next star step (or the segment's end)
    const std::size_t stride = std::min(r, n - j);
    if (stride == 1) return leapfrog(0, all, 1); // one pass, the bits of a common step
    return leapfrog(0, g.clouds, 1) && leapfrog(g.clouds, all, stride);
  }
  // the stars born at this step catch up with the others, which are at the next star step
  const std::size_t next = std::min(j - j % r + r, n);
  return leapfrog(0, g.clouds, 1) && leapfrog(newborn, all, next - j);
}

} // namespace undertow::gas

#pragma once
// One step of a run's gas and the stars it formed: the collisions, stirring and star formation
// over the step (gas_step), then the orbits. With the leapfrog the clouds take the run's step
// and the stars, which are collisionless, one step per StarFormation::step_ratio of them: at
// steps j = 0, r, 2r, ... of a segment all stars step r of the gas's steps at once (fewer at the
// segment's end), and a star born between two such steps first catches up with the others in
// one step. Every star is at the segment's end time when the segment ends, so snapshots and
// resumed runs see the same state. Other fixed-step methods step everything together.
#include <atomic>
#include <cstdint>

#include "undertow/gas/cloud_gas.hpp"
#include "undertow/orbit/integrator.hpp"

namespace undertow::gas {

// Step j of the n steps from ta to tb (Myr). Returns false, with the report so far, when *stop
// became true.
bool advance_gas_step(const potential::Model& m, GasState& g, const GasSettings& s,
                      const CircularFlow& flow, const orbit::IntegrationSettings& integration,
                      double ta_myr, double tb_myr, std::size_t j, std::size_t n,
                      std::uint64_t seed, StepReport& report,
                      const std::atomic<bool>* stop = nullptr);

} // namespace undertow::gas

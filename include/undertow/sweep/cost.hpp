#pragma once
// A first guess at one point's cost, for sizing Slurm tasks before the first point has run
// (docs/cluster-guide.md). Rates are this project's benchmark figures (docs/performance.md); a
// real cluster differs, so the guide says to time one point and size from that.
#include "undertow/scenario/scenario.hpp"

namespace undertow::sweep {

// All realisations of the run ([comparison] realisations) together.
struct CostGuess {
  double orbit_steps = 0;      // tracers x steps
  double gas_cloud_passes = 0; // clouds x collision intervals
  double core_seconds = 0;     // at the benchmark rates, orbits and gas only
  double orbit_file_bytes = 0; // orbits.h5 (removed after the point unless keep_orbits)
};

CostGuess guess_cost(const scenario::Scenario& s);

} // namespace undertow::sweep

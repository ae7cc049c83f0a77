#pragma once
// Runs a scenario's orbit ensemble: makes or reads the tracers, integrates them from output
// time to output time, and writes the snapshot file. Each finished output time is kept as a
// part file beside the output (<output>.parts/), so a run that is interrupted (SIGINT, kill,
// a node that dies) is resumed by running the same command again: it restarts from the last
// whole part and gives the same bits as a run that never stopped.
#include <atomic>
#include <functional>
#include <ostream>
#include <string>

#include "undertow/io/snapshot.hpp"
#include "undertow/scenario/scenario.hpp"

namespace undertow::run {

struct EnsembleOptions {
  std::string output;                      // the snapshot file to write
  bool restart = false;                    // discard the parts of an earlier, unfinished run
  bool progress = false;                   // progress lines on stderr (for terminals)
  const std::atomic<bool>* stop = nullptr; // set from a signal handler to stop between batches
  std::ostream* log = nullptr;             // one-line notes (resuming, finished)
  std::function<void(double t_myr)> on_snapshot; // after each snapshot is safely on disk
};

struct EnsembleResult {
  bool complete = false;
  double reached_myr = 0; // last output time written
  std::size_t tracers = 0;
  double seconds = 0;
  double orbit_steps = 0; // fixed-step methods only
  // [gas] runs, over the segments integrated by this call (not those resumed from disk)
  std::size_t collisions = 0, stars_formed = 0;
  std::size_t stars = 0; // alive at the end
  io::Diagnostics diagnostics;
};

EnsembleResult run_ensemble(const scenario::Scenario& s, const EnsembleOptions& o);

} // namespace undertow::run

#pragma once
// Picks the snapshot an observation looks at and, for young-source weights, the snapshots of its
// age window: the shared first step of 'undertow observe' and of the whole run.
#include <string>
#include <vector>

#include "undertow/error.hpp"
#include "undertow/io/snapshot.hpp"
#include "undertow/observe/observation_file.hpp"

namespace undertow::observe {

struct Prepared {
  std::size_t index = 0; // of the observed snapshot in the file
  double time_myr = 0;
  std::vector<io::Snapshot> window; // the observed snapshot last
  std::vector<double> weights;      // empty without [young]
};

// where: the file and key path to name when time_myr matches no snapshot.
Prepared prepare(const io::SnapshotReader& rd, const ObservationSpec& spec,
                 const potential::Model& m, const SourcePlace& where);

} // namespace undertow::observe

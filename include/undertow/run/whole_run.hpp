#pragma once
// The whole job from one scenario into one folder: orbits (HDF5 snapshots), the mock
// observation (a catalog in the measured format), the residuals of the measured and the mock
// catalogs, the global and local comparison tables, a short text summary and a copy of the
// scenario. Stages whose inputs have not changed since the last run are reused (orbits and the
// mock catalog); --force redoes everything.
#include <array>
#include <atomic>
#include <ostream>
#include <string>
#include <vector>

#include "undertow/compare/global.hpp"
#include "undertow/io/table.hpp"
#include "undertow/scenario/scenario.hpp"

namespace undertow::run {

struct WholeRunOptions {
  std::string folder;
  bool force = false;
  bool progress = false;
  const std::atomic<bool>* stop = nullptr;
  std::ostream* log = nullptr;
};

struct WholeRunResult {
  bool complete = false;
  std::vector<std::string> reused;   // stage names
  double log_likelihood = 0;         // the verdict's, mean over realisations
  double log_likelihood_scatter = 0; // its scatter over realisations
  std::size_t realisations = 1;
  double chi2 = 0; // the local table's sum of Q
  std::size_t measured_sources = 0;
  std::vector<std::array<double, 3>> pulls; // (U, V, W) per measured source, local comparison
  std::size_t outliers = 0;                 // measured sources beyond 3 sigma
  compare::GlobalComparison comparison;     // the global comparison, as values
  io::Table global;                         // its table view (comparison-global.csv)
  std::string summary;                      // the text of summary.txt
};

WholeRunResult run_all(const scenario::Scenario& s, const WholeRunOptions& o);

// The files of the stages finished in a whole run's folder (relative paths, sorted; the stage keys
// in .keys/ left out): what a failed run keeps for a rerun and names. Empty for a missing folder.
std::vector<std::string> finished_stage_files(const std::string& folder);

// Model-vs-model: one row per run (labelled by its run name), differences against the first.
// Refuses runs that do not share the measured catalog (by content), the Sun and the selection.
io::Table compare_runs(const std::vector<std::string>& folders);

} // namespace undertow::run

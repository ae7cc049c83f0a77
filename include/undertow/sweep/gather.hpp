#pragma once
// Gather: every finished point of a plan in one table (CSV, Markdown, LaTeX), sorted by a chosen
// statistic, and one HDF5 file in plan order; missing and failed points listed. The outputs
// depend only on the points' results, so gathering twice gives identical files.
#include <string>
#include <vector>

#include "undertow/sweep/point_run.hpp"

namespace undertow::sweep {

struct GatherOptions {
  std::string sort;     // a statistic's column name; empty: delta_log_likelihood if the plan
                        // has a reference, else log_likelihood
  std::string order;    // "ascending", "descending", or empty for the statistic's own default
  bool partial = false; // write the tables even when points are missing or failed
  // The folder for <name>-results.csv/.ecsv/.fits/.md/.tex/.h5 (<name>: the sweep's); empty: the
  // plan folder.
  std::string folder;
  // The posterior over the swept parameters (sweep/posterior.hpp), written as
  // <name>-results-posterior.* and <name>-results-marginals.* whenever it can be; required: a posterior that
  // cannot be made (one point, a grid edge holding mass, a partial sweep) stops the gather with
  // nothing written.
  bool posterior_required = false;
  double edge_mass = 0.05;
};

struct GatherReport {
  std::size_t complete = 0;
  std::vector<std::string> missing, failed; // "point N (id): detail"
  std::vector<std::string> files;           // written; empty when nothing was written
  std::string posterior_refused;            // why no posterior was written, if none was
};

GatherReport gather(const Plan& p, const GatherOptions& o);
// The statistics gather sorts by (besides any numeric swept parameter), for help texts.
std::string sortable_statistics();

} // namespace undertow::sweep

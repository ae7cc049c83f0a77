#pragma once
// Running the points of a plan, each into its own folder, so that nothing is lost when a task
// dies. A point runs in points/<id>.partial/ (the whole run's own stage reuse resumes it there)
// and becomes points/<id>/ by one rename once finished.toml, which lists every file's size and
// digest, is written. A finished point is skipped only if all of that still checks out; a
// changed, truncated or half-written folder is redone. A point that fails leaves
// points/<id>.failed with its error and the others go on. A lock file per point (flock, freed
// by the kernel even on SIGKILL) keeps two tasks from running one point at once.
#include <atomic>
#include <map>
#include <ostream>
#include <string>
#include <vector>

#include "undertow/sweep/plan.hpp"

namespace undertow::sweep {

// What a finished point measured (from its whole run), as gathered.
struct PointResult {
  double log_likelihood = 0, chi2 = 0;
  double log_likelihood_scatter = 0; // over the point's realisations
  std::size_t realisations = 1;
  std::size_t measured_sources = 0, outliers = 0;
  // (U, V, W): measured mean and error, simulated mean and error, difference / sigma
  double mean_measured[3] = {}, mean_measured_err[3] = {}, mean_simulated[3] = {},
         mean_simulated_err[3] = {}, pull[3] = {};
};

struct PointStatus {
  // error: the folder could not be checked (a file exists but cannot be read, an input is
  // missing); nothing is redone or set aside until that is fixed.
  enum class State { missing, partial, failed, complete, corrupt, error } state = State::missing;
  std::string detail; // the error of a failed point, what is wrong with a corrupt one, the error
  PointResult result; // for complete points
};
const char* state_name(PointStatus::State s);

PointStatus point_status(const Plan& p, const Point& q); // never throws

struct PointRunOptions {
  bool progress = false;
  const std::atomic<bool>* stop = nullptr;
  std::ostream* log = nullptr; // one line per point, plus the whole run's stage notes
};

struct PointOutcome {
  enum class Kind { ran, skipped, failed, interrupted, busy } kind = Kind::ran;
  std::string message;        // the error of a failed point
  double seconds = 0;         // wall time of run_point
  double science_seconds = 0; // of that, the whole run itself
};

PointOutcome run_point(const Plan& p, const Point& q, const PointRunOptions& o);

// Records a point's failure from outside its run (a worker killed by a signal), under the
// point's lock. Returns false, recording nothing, when the point finished after all (killed on
// its way out) or another process holds the lock (it is running the point again).
bool record_failure_if_free(const Plan& p, const Point& q, const std::string& what);

struct ShardReport {
  std::size_t ran = 0, skipped = 0, failed = 0, busy = 0;
  bool interrupted = false;
  double science_seconds = 0, bookkeeping_seconds = 0;
};

// Runs the given points (by number) in order; stops between points when *o.stop turns true.
ShardReport run_points(const Plan& p, const std::vector<std::size_t>& numbers,
                       const PointRunOptions& o);

} // namespace undertow::sweep

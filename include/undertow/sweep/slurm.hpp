#pragma once
// The submit helper: an sbatch script that runs a plan as one Slurm job array, one shard per
// array task (docs/cluster-guide.md). Everything about the cluster (time, memory, partition,
// account, extra directives) comes from the caller; nothing is assumed.
#include <cstddef>
#include <string>
#include <vector>

#include "undertow/sweep/plan.hpp"

namespace undertow::sweep {

struct SlurmOptions {
  std::size_t tasks = 0;       // array tasks; 0: one per point
  std::string time, memory;    // --time and --mem per task, in Slurm's own notation
  int cpus_per_task = 1;       // OpenMP threads per point
  std::size_t max_running = 0; // at most this many tasks at once (--array=...%N); 0: no cap
  std::string partition, account, job_name;
  std::vector<std::string> directives; // more sbatch options, e.g. "--qos=short", verbatim
  std::string executable;              // the undertow program the tasks run
};

struct SlurmScript {
  std::string path, text;
  std::size_t tasks = 0;
  std::vector<std::string> warnings; // for the person submitting: read before submitting
};

// Writes <plan>/slurm-array.sh (and the logs/ folder Slurm writes into; Slurm does not make it).
SlurmScript write_slurm_script(const Plan& p, const SlurmOptions& o);

// Runs `sbatch --parsable [--wait] <script>` and returns the job id; sbatch's own error on
// failure. With wait, returns when every task has ended (non-zero exit if any task failed).
std::string submit_script(const std::string& script, bool wait);

} // namespace undertow::sweep

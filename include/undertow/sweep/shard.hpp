#pragma once
// Which points a task runs: shard k of n holds the points whose number is k modulo n, so that
// neighbouring points (often of similar cost) go to different tasks. Every point is in exactly
// one shard for any n; with more tasks than points the extra tasks have nothing to do.
#include <cstddef>
#include <optional>
#include <vector>

namespace undertow::sweep {

struct Shard {
  std::size_t index = 0, count = 1;
};

std::vector<std::size_t> shard_points(std::size_t points, Shard s);

// From a Slurm job array: SLURM_ARRAY_TASK_ID (less SLURM_ARRAY_TASK_MIN) of
// SLURM_ARRAY_TASK_COUNT; nullopt outside an array. Throws InputError when they are
// inconsistent.
std::optional<Shard> shard_from_environment();

// Threads per point: SLURM_CPUS_PER_TASK, else OMP_NUM_THREADS, else 0 (OpenMP's default).
int threads_from_environment();

} // namespace undertow::sweep

#pragma once
// Local mode: the points of a plan run by a pool of worker processes on one machine (a laptop,
// a workstation, CI). Each worker is `undertow sweep run <plan> --point N` in a process of its
// own, so a point that crashes or runs out of memory takes down only itself; workers die with
// the pool (PR_SET_PDEATHSIG), and their output goes to <plan>/logs/<id>.log.
#include <atomic>
#include <ostream>
#include <string>
#include <vector>

#include "undertow/sweep/point_run.hpp"

namespace undertow::sweep {

struct PoolOptions {
  std::size_t workers = 2;
  int threads = 1;        // OpenMP threads per worker
  std::string executable; // the undertow program
  const std::atomic<bool>* stop = nullptr;
  std::ostream* log = nullptr;
};

// Exit codes of `sweep run --point`, read by the pool.
namespace point_exit {
constexpr int finished = 0, failed = 1, interrupted = 130, busy = 75;
}

ShardReport run_pool(const Plan& p, const std::vector<std::size_t>& numbers, const PoolOptions& o);

} // namespace undertow::sweep

#pragma once
// What every long-running command shares: a stop flag set by Ctrl-C or SIGTERM (a run stops
// between batches and keeps its state), progress lines only on a terminal and never in CI.
#include <atomic>
#include <iostream>
#include <omp.h>

namespace undertow::cli {

const std::atomic<bool>& stop_flag();
void install_stop_handlers();
bool show_progress();

// Sets up a long run's options (progress, stop, log to stderr), the signal handlers, and the
// OpenMP threads when threads > 0.
template <class Options> void prepare_long_run(Options& o, int threads) {
  o.progress = show_progress();
  o.stop = &stop_flag();
  o.log = &std::cerr;
  if (threads > 0) omp_set_num_threads(threads);
  install_stop_handlers();
}

} // namespace undertow::cli

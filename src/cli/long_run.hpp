#pragma once
// What every long-running command shares: a stop flag set by Ctrl-C or SIGTERM (a run stops
// between batches and keeps its state), progress lines only on a terminal and never in CI.
#include <atomic>

namespace undertow::cli {

const std::atomic<bool>& stop_flag();
void install_stop_handlers();
bool show_progress();

} // namespace undertow::cli

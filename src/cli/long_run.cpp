#include "long_run.hpp"

#include <csignal>
#include <cstdlib>
#include <unistd.h>

namespace undertow::cli {
namespace {

std::atomic<bool> g_stop{false};
extern "C" void on_signal(int) {
  g_stop.store(true);
}

} // namespace

const std::atomic<bool>& stop_flag() {
  return g_stop;
}

void install_stop_handlers() {
  std::signal(SIGINT, on_signal);
  std::signal(SIGTERM, on_signal);
}

bool show_progress() {
  return ::isatty(2) && !std::getenv("CI");
}

} // namespace undertow::cli

#pragma once
// `undertow sweep ...`: plan, run, slurm, status, gather and show (docs/sweeps.md).
#include <CLI/CLI.hpp>
#include <optional>
#include <string>
#include <vector>

#include "draw_command.hpp"

namespace undertow::cli {

struct SweepArgs {
  CLI::App *plan = nullptr, *run = nullptr, *slurm = nullptr, *status = nullptr, *gather = nullptr,
           *show = nullptr;
  std::string file, folder, output;
  std::optional<std::size_t> shard, shards, point;
  std::size_t workers = 1;
  int threads = 0;
  // slurm
  std::size_t tasks = 0, max_running = 0;
  int cpus = 1;
  std::string time, memory, partition, account, job_name;
  std::vector<std::string> directives;
  bool submit = false, wait = false;
  // gather
  FigureArgs figures;
  std::string sort, order;
  bool partial = false, all = false;
  bool posterior = false;
  double edge_mass = 0.05;
};

void add_sweep_commands(CLI::App& app, SweepArgs& a);
// The exit code of the sweep command that was given, or nullopt if none was.
std::optional<int> run_sweep_command(const SweepArgs& a);

} // namespace undertow::cli

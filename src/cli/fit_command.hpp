#pragma once
// 'undertow fit': the kinematic fit of a catalog (declared here, run in the library).
#include <CLI/CLI.hpp>
#include <optional>
#include <string>

namespace undertow::cli {

struct FitArgs {
  std::string fit_file, output, catalog;
  int threads = 0;
  CLI::App* command = nullptr;
};

void add_fit_command(CLI::App& app, FitArgs& a);
// The exit code when 'fit' was the command given, otherwise nothing.
std::optional<int> run_fit_command(const FitArgs& a);

} // namespace undertow::cli

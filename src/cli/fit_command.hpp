#pragma once
// 'undertow fit': the kinematic fit of a catalog, and 'undertow mock-kinematics': a catalog
// simulated from a documented kinematic truth (declared here, run in the library).
#include <CLI/CLI.hpp>
#include <optional>
#include <string>

#include "draw_command.hpp"

namespace undertow::cli {

struct FitArgs {
  std::string fit_file, output, catalog, columns;
  int threads = 0;
  FigureArgs figures;
  CLI::App* command = nullptr;
};

struct MockArgs {
  std::string truth_file, output;
  CLI::App* command = nullptr;
};

void add_fit_command(CLI::App& app, FitArgs& a);
void add_mock_command(CLI::App& app, MockArgs& a);
std::optional<int> run_mock_command(const MockArgs& a);
// The exit code when 'fit' was the command given, otherwise nothing.
std::optional<int> run_fit_command(const FitArgs& a);

} // namespace undertow::cli

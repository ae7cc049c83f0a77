#pragma once
// 'undertow draw': redraws figures from a run's, a fit's or a gathered sweep's output folder;
// and the figure options that 'run', 'fit' and 'sweep gather' share.
#include <CLI/CLI.hpp>
#include <optional>
#include <string>
#include <vector>

namespace undertow::cli {

struct FigureArgs {
  bool none = false; // --no-figures
  std::string formats = "png,pdf";
};
// Adds --no-figures and --figure-formats to a command that writes figures.
void add_figure_options(CLI::App& cmd, FigureArgs& a);
// Draws the folder's figures into DIR/figures after a command finished; prints what it wrote.
void draw_after(const FigureArgs& a, const std::string& dir);

struct DrawArgs {
  std::string dir, output;
  std::vector<std::string> figures, axes;
  std::string formats = "png,pdf";
  double width_mm = 0, height_mm = 0, dpi = 300;
  bool list = false;
  CLI::App* command = nullptr;
};

void add_draw_command(CLI::App& app, DrawArgs& a);
// The exit code when 'draw' was the command given, otherwise nothing.
std::optional<int> run_draw_command(const DrawArgs& a);

} // namespace undertow::cli

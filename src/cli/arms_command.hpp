#pragma once
// 'undertow arms': the arm geometry of a catalog's groups (pitch angles, widths, the number of
// arms), run in the library (arms/arm_fit.hpp).
#include <CLI/CLI.hpp>
#include <optional>
#include <string>
#include <vector>

#include "draw_command.hpp"

namespace undertow::cli {

struct ArmsArgs {
  std::string catalog, output, columns, galactic_from;
  std::optional<double> r0, reference_azimuth;
  double z_sun = 0.0; // kpc, as residuals
  std::vector<std::string> groups;
  std::vector<double> pitch_range{1, 45}, width_range{0.05, 1.5}, distance_range{0.05, 20};
  double scale_height = 0.05;
  int max_arms = 8, draws = 5, threads = 0;
  std::uint64_t seed = 1;
  bool naive = false;
  FigureArgs figures;
  CLI::App* command = nullptr;
};

void add_arms_command(CLI::App& app, ArmsArgs& a);
// The exit code when 'arms' was the command given, otherwise nothing.
std::optional<int> run_arms_command(const ArmsArgs& a);

} // namespace undertow::cli

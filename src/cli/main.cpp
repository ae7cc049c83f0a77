// The undertow command line: declares subcommands and forwards to the library. No physics here.
#include <CLI/CLI.hpp>
#include <cmath>
#include <iostream>
#include <optional>
#include <sstream>

#include "undertow/dynamics/profile.hpp"
#include "undertow/dynamics/resonances.hpp"
#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/potential/model_file.hpp"

namespace {

struct TabulateArgs {
  std::string model_path;
  double from = 0.5, to = 20, step = 0.5;
  std::string format = "markdown";
  std::string output;
  std::optional<double> pattern_speed;
  int arms = 2;
  std::optional<double> escape_to;
  double search_min = 0.05, search_max = 50;
};

int run_tabulate(const TabulateArgs& a) {
  using namespace undertow;
  const potential::Model model = potential::load_model_file(a.model_path);
  const auto table =
      dynamics::model_profile(model, dynamics::radius_grid(a.from, a.to, a.step), a.escape_to);
  const auto fmt = io::table_format_from_name(a.format);
  std::string summary;
  const auto add = [&](double speed, int m, const std::string& label) {
    summary += dynamics::describe_resonances(
        dynamics::resonances(model, speed, m, a.search_min, a.search_max), speed, m, label);
  };
  if (a.pattern_speed) {
    add(*a.pattern_speed, a.arms, "the given pattern");
  } else {
    for (const auto& p : model.patterns)
      add(p.pattern_speed, p.arms(), "pattern '" + p.label + "' (" + p.kind() + ")");
  }
  if (a.output.empty()) {
    io::write_table(std::cout, table, fmt);
    if (!summary.empty()) {
      std::istringstream lines(summary);
      std::string l;
      std::cout << "\n";
      while (std::getline(lines, l))
        std::cout << (fmt == io::TableFormat::csv ? "# " : "") << l << "\n";
    }
  } else {
    io::AtomicFile f(a.output);
    io::write_table(f.stream(), table, fmt);
    f.commit();
    std::cout << "wrote " << a.output << " (" << table.rows.size() << " radii)\n" << summary;
  }
  return 0;
}

} // namespace

int main(int argc, char** argv) {
  CLI::App app{"undertow: galaxy models, tracer orbits and the peculiar motions of young sources"};
  app.set_version_flag("--version", std::string("undertow ") + UNDERTOW_VERSION + " (" +
                                        UNDERTOW_GIT_REVISION + ")");
  app.require_subcommand(1);

  TabulateArgs tab;
  auto* t = app.add_subcommand("tabulate", "Tabulate a galaxy model over radius (circular speed, "
                                           "frequencies, Oort constants, escape speed, mass) "
                                           "and list its resonance radii");
  t->add_option("model", tab.model_path, "Galaxy model file (TOML)")->required();
  t->add_option("--from", tab.from, "First radius, kpc")->capture_default_str();
  t->add_option("--to", tab.to, "Last radius, kpc")->capture_default_str();
  t->add_option("--step", tab.step, "Radius step, kpc")->capture_default_str();
  t->add_option("--format", tab.format, "Table format: csv, markdown or latex")
      ->check(CLI::IsMember({"csv", "markdown", "md", "latex", "tex"}))
      ->capture_default_str();
  t->add_option("-o,--output", tab.output, "Write the table to this file (default: stdout)");
  t->add_option("--pattern-speed", tab.pattern_speed,
                "Pattern speed for the resonance list, km/s/kpc (default: each pattern of the "
                "model with its own speed)");
  t->add_option("--arms", tab.arms, "Number of arms m for --pattern-speed")
      ->check(CLI::Range(1, 16))
      ->capture_default_str();
  t->add_option("--escape-to", tab.escape_to,
                "Escape speed to this radius, kpc (needed for models whose potential does not "
                "vanish at infinity)");
  t->add_option("--search-from", tab.search_min, "Inner radius of the resonance search, kpc")
      ->capture_default_str();
  t->add_option("--search-to", tab.search_max, "Outer radius of the resonance search, kpc")
      ->capture_default_str();

  CLI11_PARSE(app, argc, argv);
  try {
    if (t->parsed()) return run_tabulate(tab);
  } catch (const undertow::InputError& e) {
    std::cerr << "undertow: error: " << e.what() << "\n";
    return 2;
  } catch (const std::exception& e) {
    std::cerr << "undertow: internal error: " << e.what() << "\n";
    return 3;
  }
  return 0;
}

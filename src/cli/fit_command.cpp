#include "fit_command.hpp"

#include <cmath>
#include <filesystem>
#include <iostream>
#include <sstream>

#include "long_run.hpp"
#include "undertow/detail/kernel.hpp"
#include "undertow/fit/report.hpp"
#include "undertow/fit/truth_file.hpp"
#include "undertow/io/table.hpp"
#include "undertow/io/text_file.hpp"

namespace undertow::cli {

void add_fit_command(CLI::App& app, FitArgs& a) {
  a.command = app.add_subcommand(
      "fit", "Fit R0, Theta0, the solar motion, the rotation curve and the sources' mean motion "
             "to a catalog in the space of its measurements (distances marginalised), and "
             "sample the posterior");
  a.command->add_option("fitfile", a.fit_file, "Fit file (TOML, docs/fit.md)")->required();
  a.command->add_option("--catalog", a.catalog, "Catalog to fit instead of the fit file's");
  a.command->add_option("--columns", a.columns,
                        "Column map OURS=THEIRS,... instead of the fit file's catalog_columns");
  a.command->add_option("-o,--output", a.output, "Output folder (default: <fit file>-fit)");
  a.command->add_option("--threads", a.threads, "OpenMP threads")->check(CLI::Range(1, 4096));
  add_figure_options(*a.command, a.figures);
}

void add_mock_command(CLI::App& app, MockArgs& a) {
  a.command = app.add_subcommand(
      "mock-kinematics", "Simulate a catalog of young sources from a documented kinematic truth "
                         "(Galactic parameters, rotation curve, mean motion, dispersion, "
                         "streaming) through the mock observation, to test a fit set-up");
  a.command->add_option("truth", a.truth_file, "Truth file (TOML, docs/fit.md)")->required();
  a.command->add_option(
      "-o,--output", a.output,
      "Catalog to write: CSV, or ECSV or FITS by the extension .ecsv or .fits (default: "
      "<truth>-catalog.csv)");
}

std::optional<int> run_mock_command(const MockArgs& a) {
  if (!a.command || !a.command->parsed()) return std::nullopt;
  const auto t = fit::load_truth_file(a.truth_file);
  auto cat = fit::simulate_catalog(t);
  if (cat.sources.empty())
    throw InputError(SourcePlace{a.truth_file, 0, 0, {}},
                     "the truth's volume and errors leave no source; nothing written");
  const std::string out = a.output.empty()
                              ? std::filesystem::path(a.truth_file).stem().string() + "-catalog.csv"
                              : a.output;
  residuals::write_catalog(out, cat,
                           "invented catalog simulated by undertow mock-kinematics from " +
                               std::filesystem::path(a.truth_file).filename().string() +
                               " (no real survey)");
  std::cout << "wrote " << out << ": " << cat.sources.size() << " sources simulated from "
            << a.truth_file << "\n";
  return 0;
}

std::optional<int> run_fit_command(const FitArgs& a) {
  if (!a.command || !a.command->parsed()) return std::nullopt;
  using namespace undertow::fit;
  if (a.threads > 0) omp_set_num_threads(a.threads);
  install_stop_handlers();
  FitFile f = load_fit_file(a.fit_file);
  if (!a.catalog.empty()) f.spec.catalog_path = a.catalog;
  if (!a.columns.empty())
    f.spec.catalog_columns = residuals::parse_column_map(a.columns, "--columns");
  const std::string folder =
      a.output.empty() ? std::filesystem::path(a.fit_file).stem().string() + "-fit" : a.output;
  check_output_folder(folder); // before minutes of work, not after
  residuals::CatalogOptions read;
  read.columns = f.spec.catalog_columns;
  read.lsr = f.spec.model.lsr;
  const auto cat = residuals::read_catalog(f.spec.catalog_path, read);
  const auto sel = select_sources(f, cat);
  for (const auto& e : sel.excluded)
    std::cout << "left out: " << e << "\n";
  const auto off = offset_range(f.spec);
  const Likelihood L(sel.used, f.spec.model, off);
  std::vector<std::string> warnings = cat.warnings;
  {
    // the quadrature must have converged: ln L with twice the nodes at the start values
    KinematicModel m2 = f.spec.model;
    m2.nodes = std::min(1024, 2 * m2.nodes);
    const Likelihood L2(sel.used, m2, off);
    const auto p = start_values(f.spec);
    const double d = std::fabs(L(p) - L2(p));
    if (d > 0.1)
      warnings.push_back("ln L changes by " + detail::num(d) + " from " +
                         std::to_string(f.spec.model.nodes) + " to " + std::to_string(m2.nodes) +
                         " quadrature nodes at the start values: raise [distances] nodes");
  }
  const bool tty = show_progress();
  const auto progress = [&](const std::string& stage, long done, long total) {
    if (!tty) return;
    if (stage == "sampling" && done % 100 != 0) return;
    std::cerr << "\r" << stage << ": " << done << " / " << total << " (at most)   " << std::flush;
  };
  std::cout << "fitting " << sel.used.sources.size() << " sources of " << f.spec.catalog_path
            << " (" << free_params(f.spec).size() << " free parameters)\n";
  auto r = run_fit(f.spec, L, &stop_flag(), progress);
  if (tty) std::cerr << "\n";
  if (r.interrupted) {
    std::cerr << "undertow: interrupted after " << r.steps << " steps; nothing written (a fit "
              << "takes seconds to minutes: run it again)\n";
    return 130;
  }
  r.warnings.insert(r.warnings.begin(), warnings.begin(), warnings.end());
  if (!r.converged && !f.spec.sampler.accept_unconverged)
    throw InputError(SourcePlace{f.spec.file, 0, 0, "sampler"},
                     "the chain has not converged after " + std::to_string(r.steps) +
                         " steps (largest autocorrelation time " + detail::num(r.diag.tau_max) +
                         " steps, split-R̂ " + detail::num(r.diag.r_hat_max) + "); about " +
                         std::to_string(r.more_steps_needed) +
                         " more steps are needed: raise steps_max, or set accept_unconverged = "
                         "true to write it anyway (marked NOT CONVERGED); nothing written");
  const auto src = source_results(f.spec, sel.used, L, r);
  const auto files = write_fit_outputs(folder, f, sel, r, src);
  {
    // the summary without its warnings, which go to stderr
    std::istringstream in(io::read_file_bytes(folder + "/summary.txt"));
    std::string line;
    while (std::getline(in, line))
      if (line.rfind("warning: ", 0) != 0) std::cout << line << "\n";
  }
  for (const auto& w : r.warnings)
    std::cerr << "warning: " << w << "\n";
  std::cout << "wrote " << folder << "/ (parameters, correlations, sources, kinematic-distances as "
            << "CSV, Markdown and LaTeX; fit.h5; summary.txt) in " << detail::num(r.seconds)
            << " s\n";
  draw_after(a.figures, folder);
  return 0;
}

} // namespace undertow::cli

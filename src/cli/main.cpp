// The undertow command line: declares subcommands and forwards to the library. No physics here.
#include <CLI/CLI.hpp>
#include <algorithm>
#include <cmath>
#include <iostream>
#include <memory>
#include <optional>
#include <sstream>
#include <vector>

#include "undertow/detail/kernel.hpp"
#include "undertow/dynamics/frequencies.hpp"
#include "undertow/dynamics/profile.hpp"
#include "undertow/dynamics/resonances.hpp"
#include "undertow/error.hpp"
#include "undertow/fit/report.hpp"
#include "undertow/gas/spiral_shock.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/snapshot.hpp"
#include "undertow/io/staged_folder.hpp"
#include "undertow/io/table_fits.hpp"
#include "undertow/io/table_hdf5.hpp"
#include "undertow/observe/observation_file.hpp"
#include "undertow/observe/prepare.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/residuals/report.hpp"
#include "undertow/run/arm_crossing.hpp"
#include "undertow/run/ensemble.hpp"
#include "undertow/run/whole_run.hpp"
#include "undertow/scenario/provenance_model.hpp"
#include "undertow/scenario/scenario.hpp"

#include "arms_command.hpp"
#include "draw_command.hpp"
#include "fit_command.hpp"
#include "long_run.hpp"
#include "renamed_options.hpp"
#include "sweep_commands.hpp"

#include <cstdlib>
#include <filesystem>
#include <unistd.h>

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
  auto table =
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
        std::cout << (fmt == io::TableFormat::csv || fmt == io::TableFormat::ecsv ? "# " : "") << l
                  << "\n";
    }
  } else { // the resonances go into the file too, as its notes
    std::istringstream lines(summary);
    for (std::string l; std::getline(lines, l);)
      if (!l.empty()) table.notes.push_back(l);
    io::write_table_file(a.output, table, fmt);
    std::cout << "wrote " << a.output << " (" << table.rows.size() << " radii)\n" << summary;
  }
  return 0;
}

struct IntegrateArgs {
  std::string scenario;
  std::string output;
  bool from_scratch = false;
  int threads = 0;
};

int run_integrate(const IntegrateArgs& a) {
  using namespace undertow;
  const auto sc = scenario::load_scenario(a.scenario);
  for (const auto& w : sc.warnings)
    std::cerr << "warning: " << w << "\n";
  run::EnsembleOptions o;
  o.output =
      a.output.empty() ? std::filesystem::path(a.scenario).stem().string() + ".h5" : a.output;
  o.restart = a.from_scratch;
  undertow::cli::prepare_long_run(o, a.threads);
  run::EnsembleResult r;
  try {
    r = run::run_ensemble(sc, o);
  } catch (const InputError& e) {
    // whole parts stay for the rerun to resume from (docs/snapshot-format.md): say so
    std::size_t parts = 0;
    std::error_code ec;
    for (const auto& f : std::filesystem::directory_iterator(o.output + ".parts", ec)) {
      const std::string name = f.path().filename().string();
      parts += name.starts_with("part_") && name.ends_with(".h5");
    }
    if (parts == 0) throw;
    throw InputError(std::string(e.what()) + "; the " + std::to_string(parts) +
                     (parts == 1 ? " part" : " parts") + " finished before it are kept in " +
                     o.output + ".parts/ for the same command to resume from");
  }
  if (!r.complete) {
    std::cerr << "undertow: interrupted; snapshots up to t = " << r.reached_myr
              << " Myr are kept in " << o.output
              << ".parts/; run the same command again to resume\n";
    return 130;
  }
  std::cout << "wrote " << o.output << ": " << r.tracers << " tracers, "
            << sc.output.times_myr.size() + 1 << " snapshots, " << r.seconds << " s";
  if (r.orbit_steps > 0)
    std::cout << " (" << r.orbit_steps / r.seconds / 1e6 << " million orbit-steps/s)";
  std::cout << "\n";
  const auto& d = r.diagnostics;
  if (d.invariant == "none") {
    std::cout << "no conserved quantity to check: " << d.note << "\n";
  } else {
    std::cout << d.invariant << " error (relative, end vs start): median " << d.median << ", max "
              << d.max << "\n";
    if (d.max > 1e-6) {
      std::cout << "  worst tracers (id: error):";
      for (std::size_t i = 0; i < d.worst_ids.size(); ++i)
        std::cout << " " << d.worst_ids[i] << ": " << d.worst_errors[i];
      std::cout << "\n  warning: errors above 1e-6 — use a smaller step or a higher-order method\n";
    }
  }
  return 0;
}

struct ResidualArgs {
  std::string catalog, model, folder, columns;
  std::optional<double> flat_theta0;
  std::vector<double> linear; // THETA0, SLOPE
  std::optional<double> r0;
  double z_sun = 0.0;
  std::optional<double> theta0;
  std::vector<double> solar{11.1, 12.24, 7.25};
  std::string distance = "inverse", lsr = "apex";
  double edsd_length = 1.35, min_snr = 0;
  std::string distance_prior = "uniform";
  std::vector<double> distance_range{0.0, 20.0}, disk_scales{3.0, 0.1};
  double parallax_offset = 0;
  std::string galactic_from;
  bool marginalise = false;
  int draws = undertow::residuals::kDefaultDraws,
      resamples = undertow::residuals::kDefaultBootstrap;
  std::uint64_t seed = 1;
  CLI::App* cmd = nullptr;
};

// The Sun and rotation curve of one parameter vector of a kinematic fit.
undertow::residuals::GalacticDraw
galactic_of(const std::shared_ptr<const undertow::fit::KinematicModel>& mp,
            const undertow::fit::FullParams& p) {
  const auto& m = *mp;
  undertow::residuals::GalacticDraw g;
  g.sun = m.sun(p);
  g.rotation.kind = undertow::residuals::RotationCurve::Kind::model;
  g.rotation.model = [mp, p](double R) { return mp->theta(R, p); }; // shares the model's table
  return g;
}

int run_residuals(const ResidualArgs& a) {
  using namespace undertow;
  // -o names a folder, as for every command that writes several files; checked before any work
  const std::string folder =
      a.folder.empty() ? std::filesystem::path(a.catalog).stem().string() + "-residuals" : a.folder;
  if (std::filesystem::exists(folder) && !std::filesystem::is_directory(folder))
    throw InputError(folder + ": not a folder (residuals -o names the folder to write into)");
  residuals::ResidualSettings s;
  s.sun.z_sun_kpc = a.z_sun;
  s.sun.u_sun_kms = a.solar[0], s.sun.v_sun_kms = a.solar[1], s.sun.w_sun_kms = a.solar[2];
  std::string rot;
  std::string lsr_name = a.lsr;
  double parallax_offset = a.parallax_offset;
  std::optional<potential::Model> model;
  if (!a.galactic_from.empty()) {
    for (const char* o :
         {"--model", "--flat", "--linear", "--r0", "--z-sun", "--theta0", "--solar-motion"})
      if (a.cmd->count(o))
        throw InputError(std::string(o) + " cannot be combined with --galactic-from (the fit "
                                          "gives the Galactic parameters)");
    const auto g = fit::read_galactic_parameters(a.galactic_from);
    // the fit's LSR and parallax zero point come with it
    const std::string fit_lsr = g.model.lsr == sky::LsrForm::apex ? "apex" : "components";
    if (a.cmd->count("--lsr") && a.lsr != fit_lsr)
      throw InputError("--lsr " + a.lsr + " contradicts the fit's LSR (" + fit_lsr + ") in " +
                       a.galactic_from);
    lsr_name = fit_lsr;
    if (!a.cmd->count("--parallax-offset"))
      parallax_offset = g.median[std::size_t(fit::Param::parallax_offset)];
    if (!g.converged)
      std::cerr << "warning: " << a.galactic_from
                << " holds a fit that had NOT CONVERGED; its Galactic parameters are not a "
                   "posterior\n";
    const auto model = std::make_shared<const fit::KinematicModel>(g.model);
    const auto nominal = galactic_of(model, g.median);
    s.sun = nominal.sun;
    s.rotation = nominal.rotation;
    if (a.marginalise)
      for (const auto& p : g.samples)
        s.galactic_draws.push_back(galactic_of(model, p));
    rot = "Galactic parameters from the " + std::string(g.converged ? "" : "NOT CONVERGED ") +
          "kinematic fit " + a.galactic_from + " (" +
          (a.marginalise ? "marginalised over " + std::to_string(g.samples.size()) +
                               " posterior samples; nominal values at the median"
                         : std::string("posterior median")) +
          "; rotation curve " + fit::rotation_form_name(g.model.rotation) + ")";
  } else if (a.marginalise) {
    throw InputError("--marginalise needs --galactic-from FIT.h5");
  } else {
    if (!a.r0)
      throw InputError("give --r0 KPC, the Sun's distance from the centre (no default: a galaxy "
                       "model is built for its own R0, and the peculiar motions depend on it)");
    s.sun.r0_kpc = *a.r0;
    const int curves = int(!a.model.empty()) + int(bool(a.flat_theta0)) + int(!a.linear.empty());
    if (curves != 1)
      throw InputError("give one rotation curve: --model FILE, --flat THETA0 or --linear "
                       "THETA0,SLOPE");
    if (!a.model.empty()) {
      model = potential::load_model_file(a.model);
      s.rotation.kind = residuals::RotationCurve::Kind::model;
      s.rotation.model = [&](double R) { return dynamics::circular_speed(*model, R); };
      s.sun.theta0_kms = a.theta0 ? *a.theta0 : dynamics::circular_speed(*model, *a.r0);
      rot = "model " + a.model + (a.theta0 ? ", Theta0 given" : ", Theta0 = v_c(R0)") +
            ", fixed Galactic parameters";
    } else {
      if (a.theta0)
        throw InputError("--theta0 goes with --model; with --flat or --linear the curve's value "
                         "at R0 is Theta0");
      const bool lin = !a.linear.empty();
      const double theta0 = lin ? a.linear[0] : *a.flat_theta0, slope = lin ? a.linear[1] : 0.0;
      s.rotation.kind =
          lin ? residuals::RotationCurve::Kind::linear : residuals::RotationCurve::Kind::flat;
      s.rotation.theta0_kms = theta0;
      s.rotation.r0_kpc = *a.r0;
      s.rotation.slope_kms_kpc = slope;
      s.sun.theta0_kms = theta0;
      rot = lin ? "Theta(R) = " + detail::num(theta0) + " + " + detail::num(slope) +
                      " (R - R0) km/s, fixed Galactic parameters"
                : "Theta(R) = " + detail::num(theta0) + " km/s (flat), fixed Galactic parameters";
    }
  }
  s.distance = residuals::distance_from_name(a.distance);
  s.edsd_length_kpc = a.edsd_length;
  s.prior.kind = fit::distance_prior_from_name(a.distance_prior);
  s.prior.distance_min_kpc = a.distance_range[0];
  s.prior.distance_max_kpc = a.distance_range[1];
  s.prior.disk_scale_length_kpc = a.disk_scales[0];
  s.prior.disk_scale_height_kpc = a.disk_scales[1];
  if (s.prior.kind == fit::DistancePrior::Kind::table)
    throw InputError("--distance-prior table is for fit files (docs/fit.md)");
  s.parallax_offset_mas = parallax_offset;
  s.parallax_snr_min = a.min_snr;
  s.lsr = sky::lsr_form_from_name(lsr_name);
  s.draws = a.draws;
  s.seed = a.seed;
  residuals::CatalogOptions read;
  read.columns = residuals::parse_column_map(a.columns, "--columns");
  read.lsr = s.lsr;
  const auto cat = residuals::read_catalog(a.catalog, read);
  const auto res = residuals::compute_residuals(cat, s);
  if (res.sources.empty())
    throw InputError(SourcePlace{a.catalog, 0, 0, {}},
                     "no source is left after the selection; nothing written");
  const auto sum = residuals::summarise(res, a.resamples, a.seed);
  char settings[1024];
  std::snprintf(
      settings, sizeof settings,
      "R0 = %g kpc, z_sun = %g kpc, Theta0 = %g km/s, solar motion (%g, %g, %g) km/s, %s, "
      "distance %s%s, parallax zero point %g mas, LSR %s, %d draws, seed %llu",
      s.sun.r0_kpc, s.sun.z_sun_kpc, s.sun.theta0_kms, s.sun.u_sun_kms, s.sun.v_sun_kms,
      s.sun.w_sun_kms, rot.c_str(), a.distance.c_str(),
      a.distance == "posterior-median"
          ? (" (" + a.distance_prior + " prior on [" + detail::num(a.distance_range[0]) + ", " +
             detail::num(a.distance_range[1]) + "] kpc)")
                .c_str()
          : "",
      parallax_offset, lsr_name.c_str(), s.draws, static_cast<unsigned long long>(s.seed));
  const std::string prefix = (std::filesystem::path(folder) / "residuals").string();
  const auto files = io::write_files_together(folder, [&](const std::string& tmp) {
    return residuals::write_report((std::filesystem::path(tmp) / "residuals").string(), res, sum,
                                   settings);
  });
  std::cout << "with " << settings << "\n\n";
  io::write_table(std::cout, residuals::summary_table(sum), io::TableFormat::markdown);
  for (const auto& e : res.excluded)
    std::cout << "left out: " << e << "\n";
  for (std::size_t i = 0; i < res.warnings.size() && i < 5; ++i)
    std::cerr << "warning: " << res.warnings[i] << "\n";
  if (res.warnings.size() > 5)
    std::cerr << "warning: ... and " << res.warnings.size() - 5 << " more, all listed in " << prefix
              << "-summary.md\n";
  std::cout << "wrote";
  for (const auto& f : files)
    std::cout << " " << f;
  std::cout << "\n";
  return 0;
}

struct ObserveArgs {
  std::string snapshot, observation, output;
};

int run_observe(const ObserveArgs& a) {
  using namespace undertow;
  const std::string out =
      a.output.empty() ? std::filesystem::path(a.snapshot).stem().string() + "-mock.csv" : a.output;
  io::check_output_file(out); // before any work
  const io::SnapshotReader rd(a.snapshot);
  const auto model = scenario::model_of(rd.provenance(), a.snapshot);
  const auto spec = observe::load_observation_file(a.observation, model);
  const auto prep = observe::prepare(rd, spec, model, SourcePlace{a.observation, 0, 0, "time_myr"});
  const auto mock = observe::observe(prep.window.back(), prep.weights, spec.settings);
  if (mock.catalog.sources.empty())
    throw InputError(SourcePlace{a.observation, 0, 0, "selection"},
                     "no tracer passes the selection (" + std::to_string(mock.candidates) +
                         " inside the volume, " + std::to_string(mock.rejected_snr) +
                         " below the parallax signal-to-noise limit); nothing written");
  residuals::write_catalog(out, mock.catalog);
  std::cout << "wrote " << out << ": " << mock.catalog.sources.size()
            << " sources observed at t = " << prep.time_myr << " Myr (" << mock.candidates
            << " tracers inside the selection volume, " << mock.rejected_snr
            << " below the parallax signal-to-noise limit, " << mock.rejected_parallax
            << " outside the observed-parallax range"
            << (!spec.settings.young ? std::string()
                : spec.settings.young->star_age_myr
                    ? ", stars " + undertow::detail::num((*spec.settings.young->star_age_myr)[0]) +
                          " to " + undertow::detail::num((*spec.settings.young->star_age_myr)[1]) +
                          " Myr old"
                    : ", weighted as young sources over " +
                          undertow::detail::num(spec.settings.young->age_window_myr) + " Myr")
            << ")\n"
            << "the Sun: " << observe::describe_sun(spec.settings) << "\n";
  return 0;
}

struct RunArgs {
  std::string scenario, folder;
  bool from_scratch = false;
  int threads = 0;
  undertow::cli::FigureArgs figures;
};

int run_whole(const RunArgs& a) {
  using namespace undertow;
  const auto sc = scenario::load_scenario(a.scenario);
  for (const auto& w : sc.warnings)
    std::cerr << "warning: " << w << "\n";
  run::WholeRunOptions o;
  o.folder = a.folder.empty() ? std::filesystem::path(a.scenario).stem().string() : a.folder;
  o.force = a.from_scratch;
  undertow::cli::prepare_long_run(o, a.threads);
  namespace fs = std::filesystem;
  const bool existed = fs::exists(o.folder);
  run::WholeRunResult r;
  try {
    r = run::run_all(sc, o);
  } catch (const InputError& e) {
    // say what a failed run leaves: a new folder with no finished stage is removed; finished
    // stages stay, named, for a rerun to reuse
    const auto kept = run::finished_stage_files(o.folder);
    if (kept.empty()) {
      std::error_code ec;
      if (!existed) fs::remove_all(o.folder, ec);
      throw;
    }
    std::string list;
    for (const auto& k : kept)
      list += (list.empty() ? "" : ", ") + k;
    throw InputError(std::string(e.what()) + "; the stages finished before it are kept in " +
                     o.folder + "/ (" + list + ") for a rerun to reuse");
  }
  if (!r.complete) {
    std::cerr << "undertow: interrupted; run the same command again to resume\n";
    return 130;
  }
  std::cout << r.summary << "wrote " << o.folder
            << "/ (summary.txt, comparison-*, *-residuals-*, mock-catalog.csv, orbits.h5)\n";
  undertow::cli::draw_after(a.figures, o.folder);
  return 0;
}

} // namespace

struct ArmFlowArgs {
  std::string model_path;
  double radius = 8, sound_speed = 8;
  int pattern = 1, cells = 2048;
  std::string format = "markdown";
  std::string output;
  bool sound_speed_given = false;
  std::string clouds;         // a gas run's snapshot file
  std::optional<double> time; // Myr, default its last snapshot
  double ring_width = 1.0;    // kpc
  int bins = 20;
  std::string crossing_output;
};

int run_arm_flow(const ArmFlowArgs& a) {
  using namespace undertow;
  for (const auto& out : {a.output, a.crossing_output}) // before any work
    if (!out.empty()) io::check_output_file(out);
  const potential::Model model = potential::load_model_file(a.model_path);
  auto problem =
      gas::shock_problem(model, static_cast<std::size_t>(a.pattern - 1), a.radius, a.sound_speed);
  std::optional<io::Snapshot> snap;
  run::CrossingBins cloud_side;
  double dispersion = 0;
  std::size_t used = 0;
  if (!a.clouds.empty()) {
    const io::SnapshotReader rd(a.clouds);
    const auto k = rd.index_at(a.time);
    if (!k) throw InputError(rd.missing_time(a.time.value_or(NAN)));
    snap = rd.read(*k);
    cloud_side = run::cloud_bins(*snap, model, problem, a.ring_width / 2, a.bins, dispersion, used);
    // The clouds' own dispersion plays the sound speed unless one is given.
    if (!a.sound_speed_given) problem.sound_speed = dispersion;
  }
  gas::ShockSettings set;
  set.cells = a.cells;
  const auto flow = gas::solve_spiral_shock(problem, set);
  const std::string summary = gas::describe_shock(problem, flow);
  std::cerr << summary;
  if (!flow.converged) return 1;
  std::optional<io::Table> crossing; // the clouds' crossing of the arm, when given clouds
  if (snap) {
    run::CloudCrossing c;
    c.time_myr = snap->time_myr;
    c.clouds = cloud_side;
    c.dispersion = dispersion;
    c.used = used;
    c.steady = run::steady_bins(problem, flow, cloud_side.edges);
    std::cerr << run::describe_crossing(problem, c);
    crossing = run::crossing_table(problem, c);
    if (a.crossing_output.empty()) io::write_table(std::cerr, *crossing, io::TableFormat::markdown);
  }
  const auto table = gas::shock_profile_table(problem, flow);
  const auto fmt = io::table_format_from_name(a.format);
  // The files given appear together or not at all; a FITS table is named after its file.
  const auto staged = [&](const std::string& target, const io::Table& t) {
    return io::StagedWrite{target, [&, target](const std::string& tmp) {
                             if (fmt == io::TableFormat::fits)
                               io::write_table_fits(tmp, t, std::filesystem::path(target).stem());
                             else
                               io::write_table_file(tmp, t, fmt);
                           }};
  };
  std::vector<io::StagedWrite> files;
  if (crossing && !a.crossing_output.empty()) files.push_back(staged(a.crossing_output, *crossing));
  if (!a.output.empty()) files.push_back(staged(a.output, table));
  io::write_files_atomically(files);
  if (crossing && !a.crossing_output.empty()) std::cerr << "wrote " << a.crossing_output << "\n";
  if (a.output.empty())
    io::write_table(std::cout, table, fmt);
  else
    std::cout << "wrote " << a.output << " (" << table.rows.size() << " points across the arm)\n";
  return 0;
}

int main(int argc, char** argv) {
  CLI::App app{"undertow: galaxy models, tracer orbits and the peculiar motions of young sources"};
  undertow::cli::RenamedOptions renamed;
  app.set_version_flag("--version", std::string("undertow ") + UNDERTOW_VERSION + " (" +
                                        UNDERTOW_GIT_REVISION + "), vector kernels " +
                                        undertow::detail::vector_kernels());
  app.require_subcommand(1);

  TabulateArgs tab;
  auto* t = app.add_subcommand("tabulate", "Tabulate a galaxy model over radius (circular speed, "
                                           "frequencies, Oort constants, escape speed, mass) "
                                           "and list its resonance radii");
  t->add_option("model", tab.model_path, "Galaxy model file (TOML)")->required();
  t->add_option("--from", tab.from, "First radius, kpc")->capture_default_str();
  t->add_option("--to", tab.to, "Last radius, kpc")->capture_default_str();
  t->add_option("--step", tab.step, "Radius step, kpc")->capture_default_str();
  t->add_option("--format", tab.format,
                "Table format: csv, ecsv, fits (needs -o), markdown or latex")
      ->check(CLI::IsMember(undertow::io::table_format_names()))
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

  IntegrateArgs integ;
  auto* ig = app.add_subcommand("integrate", "Integrate a scenario's tracer orbits and write its "
                                             "HDF5 snapshot file (resumes an interrupted run)");
  ig->add_option("scenario", integ.scenario, "Scenario file (TOML)")->required();
  ig->add_option("-o,--output", integ.output, "Snapshot file to write (default: <scenario>.h5)");
  ig->add_flag("--from-scratch", integ.from_scratch,
               "Discard the snapshots kept by an unfinished run and integrate from the start");
  renamed.flag(*ig, "--restart", "use --from-scratch");
  ig->add_option("--threads", integ.threads,
                 "OpenMP threads (default: OMP_NUM_THREADS or all cores)")
      ->check(CLI::Range(1, 4096));

  ResidualArgs ra;
  auto* rs =
      app.add_subcommand("residuals", "Peculiar motions (U_s, V_s, W_s) of a measured catalog's "
                                      "sources, with Monte Carlo and first-order errors, and "
                                      "their mean and dispersion with bootstrap errors");
  rs->add_option("catalog", ra.catalog, "Catalog: CSV, ECSV or FITS (docs/catalog-format.md)")
      ->required();
  rs->add_option("--model", ra.model, "Galaxy model file: Theta(R) is its circular speed");
  rs->add_option("--flat", ra.flat_theta0, "Flat rotation curve Theta(R) = THETA0, km/s");
  rs->add_option("--linear", ra.linear,
                 "Linear rotation curve Theta(R) = THETA0 + SLOPE (R - R0): THETA0,SLOPE in "
                 "km/s and km/s/kpc")
      ->delimiter(',')
      ->expected(2);
  renamed.option(*rs, "--slope",
                 "give a linear curve as --linear THETA0,SLOPE (km/s, km/s/kpc); --flat THETA0 "
                 "is flat");
  rs->add_option("--r0", ra.r0,
                 "Sun's distance from the centre R0, kpc (required unless --galactic-from)");
  rs->add_option("--z-sun", ra.z_sun, "Sun's height above the plane, kpc")->capture_default_str();
  rs->add_option("--theta0", ra.theta0,
                 "Circular speed at the Sun, km/s (default: from the rotation curve)");
  rs->add_option("--solar-motion", ra.solar, "U, V, W of the Sun, km/s")
      ->expected(3)
      ->delimiter(',')
      ->capture_default_str();
  ra.cmd = rs;
  rs->add_option("--distance", ra.distance,
                 "inverse (1/parallax), posterior-median (with --distance-prior), edsd-median or "
                 "edsd-mode (exponentially decreasing space density prior, Bailer-Jones 2015, "
                 "for nearby stars); every posterior-based estimator draws its Monte Carlo "
                 "distances from the posterior")
      ->check(CLI::IsMember({"inverse", "posterior-median", "edsd-median", "edsd-mode"}))
      ->capture_default_str();
  rs->add_option("--distance-prior", ra.distance_prior,
                 "Prior of posterior-median: uniform (space density) or disk (exponential in R "
                 "and z)")
      ->check(CLI::IsMember({"uniform", "disk"}))
      ->capture_default_str();
  rs->add_option("--distance-range", ra.distance_range,
                 "MIN,MAX: the prior's distance range, kpc (set it to the survey's reach)")
      ->expected(2)
      ->delimiter(',')
      ->capture_default_str();
  rs->add_option("--disk-scales", ra.disk_scales,
                 "HR,HZ: scale length and height of the disk "
                 "prior, kpc")
      ->expected(2)
      ->delimiter(',')
      ->capture_default_str();
  rs->add_option("--parallax-offset", ra.parallax_offset,
                 "Parallax zero point, mas: measured = true + offset (a catalog column "
                 "parallax_offset_mas adds to it)")
      ->capture_default_str();
  rs->add_option("--galactic-from", ra.galactic_from,
                 "Take R0, z_sun, Theta0, the solar motion and the rotation curve from a finished "
                 "kinematic fit (its fit.h5): the posterior median");
  rs->add_flag("--marginalise", ra.marginalise,
               "With --galactic-from: each Monte Carlo draw takes its own posterior sample, so the "
               "errors include the Galactic parameters' uncertainty");
  rs->add_option("--edsd-length", ra.edsd_length, "Length scale of the edsd prior, kpc")
      ->capture_default_str();
  renamed.option(*rs, "--min-parallax-snr",
                 "use --parallax-snr-min (bounds are spelled *_min, *_max)");
  rs->add_option("--parallax-snr-min", ra.min_snr,
                 "Leave out sources with parallax/error below this")
      ->capture_default_str();
  rs->add_option("--columns", ra.columns,
                 "Column map OURS=THEIRS,... (e.g. parallax_mas=plx); see docs/catalog-format.md");
  rs->add_option("--lsr", ra.lsr, "LSR definition: apex (exact, default) or components")
      ->check(CLI::IsMember({"apex", "components"}))
      ->capture_default_str();
  rs->add_option("--draws", ra.draws, "Monte Carlo draws per source")
      ->check(CLI::Range(2, 10000000))
      ->capture_default_str();
  rs->add_option("--bootstrap", ra.resamples, "Bootstrap resamples")
      ->check(CLI::Range(2, 10000000))
      ->capture_default_str();
  rs->add_option("--seed", ra.seed, "Random seed")->capture_default_str();
  rs->add_option("-o,--output", ra.folder,
                 "Output folder for residuals-sources.*, residuals-summary.* and residuals.h5 "
                 "(default: <catalog>-residuals)");

  ObserveArgs ob;
  auto* os = app.add_subcommand("observe", "Observe a snapshot from the Sun as a survey would: "
                                           "select (young) sources, add measurement errors, and "
                                           "write a mock catalog in the measured-catalog format");
  os->add_option("snapshot", ob.snapshot, "Snapshot file written by 'undertow integrate'")
      ->required();
  os->add_option("observation", ob.observation, "Observation file (TOML, docs/observation.md)")
      ->required();
  os->add_option("-o,--output", ob.output,
                 "Mock catalog to write: CSV, or ECSV or FITS by the extension .ecsv or .fits "
                 "(default: <snapshot>-mock.csv)");

  RunArgs wr;
  auto* rn = app.add_subcommand("run", "The whole job from one scenario: orbits, mock observation, "
                                       "residuals of the measured and mock catalogs, comparison "
                                       "tables, into one folder (finished stages are reused)");
  rn->add_option("scenario", wr.scenario,
                 "Scenario file (TOML) with [observation] and [comparison]")
      ->required();
  rn->add_option("-o,--output", wr.folder, "Output folder (default: the scenario's name)");
  rn->add_flag("--from-scratch", wr.from_scratch,
               "Discard the finished stages and do every stage again");
  renamed.flag(*rn, "--force", "use --from-scratch");
  rn->add_option("--threads", wr.threads, "OpenMP threads")->check(CLI::Range(1, 4096));
  undertow::cli::add_figure_options(*rn, wr.figures);

  std::vector<std::string> versus;
  auto* vs =
      app.add_subcommand("versus", "Set finished runs of several models against one catalog "
                                   "side by side: ln L, chi^2 and mean V_s, with differences "
                                   "against the first");
  vs->add_option("folders", versus, "Run folders written by 'undertow run'")
      ->required()
      ->expected(2, 1000);
  std::string versus_out;
  vs->add_option("-o,--output", versus_out,
                 "Also write the table into this folder as versus.csv, .ecsv, .fits, .md, .tex "
                 "and .h5 (always to stdout as Markdown)");

  ArmFlowArgs af;
  auto* afc = app.add_subcommand(
      "arm-flow", "The steady flow of an isothermal gas across a model's spiral arms at one "
                  "radius (Roberts 1969): density, speeds across and along the arms, the shock");
  afc->add_option("model", af.model_path, "Galaxy model file (TOML)")->required();
  afc->add_option("--radius", af.radius, "Galactocentric radius, kpc")->capture_default_str();
  afc->add_option("--sound-speed", af.sound_speed,
                  "Effective isothermal sound speed of the gas, km/s (the clouds' dispersion)")
      ->capture_default_str();
  afc->add_option("--pattern", af.pattern, "Which of the model's patterns (1 = the first)")
      ->check(CLI::PositiveNumber)
      ->capture_default_str();
  afc->add_option("--cells", af.cells, "Integration steps across one arm spacing")
      ->check(CLI::Range(64, 1 << 20))
      ->capture_default_str();
  afc->add_option("--format", af.format,
                  "Table format: csv, ecsv, fits (needs -o), markdown or latex")
      ->check(CLI::IsMember(undertow::io::table_format_names()))
      ->capture_default_str();
  afc->add_option("-o,--output", af.output, "Write the table to this file (default: stdout)");
  afc->add_option("--clouds", af.clouds,
                  "A gas run's snapshot file (HDF5): compare its clouds in a ring about the "
                  "radius, binned across the arms, with the steady flow");
  afc->add_option("--time", af.time, "Snapshot time of --clouds, Myr (default: its last)");
  afc->add_option("--ring-width", af.ring_width, "Width of the ring of clouds, kpc")
      ->check(CLI::PositiveNumber)
      ->capture_default_str();
  afc->add_option("--bins", af.bins, "Bins across one arm spacing for --clouds")
      ->check(CLI::Range(2, 1000))
      ->capture_default_str();
  afc->add_option("--crossing-output", af.crossing_output,
                  "Write the clouds-against-steady table here (default: Markdown on stderr)");

  undertow::cli::FitArgs fit;
  undertow::cli::add_fit_command(app, fit);
  undertow::cli::ArmsArgs arms_args;
  undertow::cli::add_arms_command(app, arms_args);
  undertow::cli::MockArgs mock;
  undertow::cli::add_mock_command(app, mock);

  undertow::cli::SweepArgs sweep;
  undertow::cli::add_sweep_commands(app, sweep);
  undertow::cli::DrawArgs draw;
  undertow::cli::add_draw_command(app, draw);

  CLI11_PARSE(app, argc, argv);
  if (const auto refused = renamed.refusal(); !refused.empty()) {
    std::cerr << "undertow: error: " << refused << "\n";
    return 2;
  }
  try {
    if (const auto code = undertow::cli::run_sweep_command(sweep)) return *code;
    if (const auto code = undertow::cli::run_draw_command(draw)) return *code;
    if (const auto code = undertow::cli::run_fit_command(fit)) return *code;
    if (const auto code = undertow::cli::run_arms_command(arms_args)) return *code;
    if (const auto code = undertow::cli::run_mock_command(mock)) return *code;
    if (t->parsed()) return run_tabulate(tab);
    if (afc->parsed()) {
      af.sound_speed_given = afc->count("--sound-speed") > 0;
      return run_arm_flow(af);
    }
    if (ig->parsed()) return run_integrate(integ);
    if (rs->parsed()) return run_residuals(ra);
    if (os->parsed()) return run_observe(ob);
    if (rn->parsed()) return run_whole(wr);
    if (vs->parsed()) {
      const auto table = undertow::run::compare_runs(versus);
      undertow::io::write_table(std::cout, table, undertow::io::TableFormat::markdown);
      if (!versus_out.empty()) {
        // the six files join the folder together or none does
        const auto files =
            undertow::io::write_files_together(versus_out, [&](const std::string& tmp) {
              const std::string stem = (std::filesystem::path(tmp) / "versus").string();
              auto written = undertow::io::write_table_files(stem, table);
              undertow::io::h5::File::write_atomically(
                  stem + ".h5", [&](const undertow::io::h5::File& f) {
                    undertow::io::write_table_group(f, "versus", table);
                  });
              written.push_back(stem + ".h5");
              return written;
            });
        std::cout << "wrote";
        for (const auto& f : files)
          std::cout << " " << f;
        std::cout << "\n";
      }
      return 0;
    }
  } catch (const undertow::InputError& e) {
    std::cerr << "undertow: error: " << e.what() << "\n";
    return 2;
  } catch (const std::filesystem::filesystem_error& e) {
    // A folder that cannot be read, created or renamed: the system's reason and the path.
    std::cerr << "undertow: error: " << e.code().message() << ": " << e.path1().string()
              << (e.path2().empty() ? "" : " -> " + e.path2().string()) << "\n";
    return 2;
  } catch (const std::exception& e) {
    std::cerr << "undertow: internal error: " << e.what() << "\n";
    return 3;
  }
  return 0;
}

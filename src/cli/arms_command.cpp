#include "arms_command.hpp"

#include <algorithm>
#include <filesystem>
#include <iostream>
#include <omp.h>

#include "long_run.hpp"
#include "undertow/arms/arm_fit.hpp"
#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/fit/report.hpp"
#include "undertow/io/staged_folder.hpp"

namespace undertow::cli {

void add_arms_command(CLI::App& app, ArmsArgs& a) {
  auto* c = app.add_subcommand(
      "arms", "Fit each group of a catalog as a logarithmic arm segment (pitch angle, radius and "
              "width, distances marginalised) and say how many arms the segments imply");
  c->add_option("catalog", a.catalog, "Catalog (CSV, ECSV or FITS) with a group column")
      ->required();
  c->add_option("--r0", a.r0, "Sun's distance from the centre R0, kpc (or --galactic-from)");
  c->add_option("--z-sun", a.z_sun, "Sun's height above the plane, kpc")->capture_default_str();
  c->add_option("--galactic-from", a.galactic_from,
                "A kinematic fit's fit.h5: R0 and z_sun from its posterior (--draws of them)");
  c->add_option("--draws", a.draws, "Posterior draws of R0 and z_sun with --galactic-from")
      ->check(CLI::Range(1, 64))
      ->capture_default_str();
  c->add_option("--groups", a.groups, "Groups to fit, comma-separated (default: all)")
      ->delimiter(',');
  c->add_option("--pitch-range", a.pitch_range, "Prior range of the pitch angle, deg: MIN,MAX")
      ->delimiter(',')
      ->expected(2)
      ->capture_default_str();
  c->add_option("--width-range", a.width_range, "Prior range of the arm width, kpc: MIN,MAX")
      ->delimiter(',')
      ->expected(2)
      ->capture_default_str();
  c->add_option("--distance-range", a.distance_range,
                "Heliocentric distances where sources can lie, kpc: MIN,MAX")
      ->delimiter(',')
      ->expected(2)
      ->capture_default_str();
  c->add_option("--scale-height", a.scale_height,
                "Scale height of the sources' vertical density exp(-|z|/h), kpc (0: none)")
      ->capture_default_str();
  c->add_option("--reference-azimuth", a.reference_azimuth,
                "One reference azimuth psi_ref for every segment, deg (default: each segment's "
                "mean)");
  c->add_option("--max-arms", a.max_arms, "Largest number of arms compared")
      ->check(CLI::Range(1, 16))
      ->capture_default_str();
  c->add_flag("--naive", a.naive,
              "Also fit each segment at 1/parallax, errors ignored (biased; for comparison)");
  c->add_option("--seed", a.seed, "Seed of the sampler")->capture_default_str();
  c->add_option("--columns", a.columns, "Column map OURS=THEIRS,...");
  c->add_option("-o,--output", a.output, "Output folder (default: <catalog>-arms)");
  c->add_option("--threads", a.threads, "OpenMP threads")->check(CLI::Range(1, 4096));
  add_figure_options(*c, a.figures);
  a.command = c;
}

std::optional<int> run_arms_command(const ArmsArgs& a) {
  if (!a.command || !a.command->parsed()) return std::nullopt;
  if (a.threads > 0) omp_set_num_threads(a.threads);
  install_stop_handlers();
  arms::ArmFitSettings s;
  if (!a.galactic_from.empty()) {
    for (const char* o : {"--r0", "--z-sun"})
      if (a.command->count(o))
        throw InputError(std::string(o) + " cannot be combined with --galactic-from (the fit "
                                          "gives R0 and z_sun)");
    const auto g = fit::read_galactic_parameters(a.galactic_from);
    if (!g.converged)
      std::cerr << "warning: " << a.galactic_from
                << " holds a fit that had NOT CONVERGED; its R0 is not a posterior\n";
    // draws at evenly spaced quantiles of R0, each with its own z_sun (keeping their correlation)
    auto samples = g.samples;
    const auto r0_of = [](const fit::FullParams& p) { return p[std::size_t(fit::Param::r0)]; };
    std::sort(samples.begin(), samples.end(),
              [&](const auto& x, const auto& y) { return r0_of(x) < r0_of(y); });
    for (int k = 0; k < a.draws && !samples.empty(); ++k) {
      const auto& p = samples[std::size_t((k + 0.5) / a.draws * double(samples.size()))];
      s.geometries.push_back({r0_of(p), p[std::size_t(fit::Param::z_sun)]});
    }
    s.geometry_source = "kinematic fit " + a.galactic_from + " (" +
                        std::to_string(s.geometries.size()) + " draws of R0 and z_sun)";
  } else {
    if (!a.r0)
      throw InputError("give --r0 KPC, the Sun's distance from the centre, or --galactic-from "
                       "FIT.h5 (no default: the arms' radii scale with it)");
    if (!(*a.r0 > 0)) throw InputError("--r0 must be positive, got " + detail::num(*a.r0));
    s.geometries.push_back({*a.r0, a.z_sun});
  }
  s.groups = a.groups;
  if (a.reference_azimuth) s.reference_azimuth_deg = *a.reference_azimuth;
  s.lines.distance_min_kpc = a.distance_range[0], s.lines.distance_max_kpc = a.distance_range[1];
  s.lines.scale_height_kpc = a.scale_height;
  s.priors.pitch_min_deg = a.pitch_range[0], s.priors.pitch_max_deg = a.pitch_range[1];
  s.priors.width_min_kpc = a.width_range[0], s.priors.width_max_kpc = a.width_range[1];
  s.lines.width_min_kpc = std::max(1e-3, a.width_range[0]);
  s.sampling.seed = a.seed;
  s.naive = a.naive;
  s.max_arms = a.max_arms;
  // option values are checked before the catalog is read
  try {
    s.priors.validate();
    s.lines.validate();
  } catch (const detail::ParameterError& e) {
    const std::string opt = e.key == "pitch range"        ? "--pitch-range"
                            : e.key == "width range"      ? "--width-range"
                            : e.key == "width_min_kpc"    ? "--width-range"
                            : e.key == "scale_height_kpc" ? "--scale-height"
                                                          : "--distance-range";
    throw InputError(opt + ": " + e.what());
  }
  const std::string folder =
      a.output.empty() ? std::filesystem::path(a.catalog).stem().string() + "-arms" : a.output;
  io::check_replaceable_folder(folder, "arms.h5", "arm fit"); // before any work
  residuals::CatalogOptions read;
  if (!a.columns.empty()) read.columns = residuals::parse_column_map(a.columns, "--columns");
  const auto cat = residuals::read_catalog(a.catalog, read);
  residuals::print_catalog_warnings(cat, std::cerr);
  arms::ArmFit f;
  try {
    f = arms::run_arm_fit(cat, s, &stop_flag());
  } catch (const detail::ParameterError& e) {
    throw InputError(e.key + ": " + e.what());
  }
  for (const auto& r : f.segments)
    if (r.interrupted) {
      std::cerr << "undertow: interrupted; nothing written (an arm fit takes seconds: run it "
                   "again)\n";
      return 130;
    }
  const auto files = arms::write_arm_outputs(folder, f, s);
  std::cout << arms::arm_summary(f, s);
  std::cout << "wrote " << folder << "/ (arm-segments"
            << (f.naive.empty() ? "" : ", arm-segments-naive")
            << (f.count ? ", arm-count, arm-membership" : "")
            << " as CSV, ECSV, FITS, Markdown and LaTeX; arms.h5; summary.txt) in "
            << detail::num(f.seconds) << " s\n";
  draw_after(a.figures, folder);
  return 0;
}

} // namespace undertow::cli

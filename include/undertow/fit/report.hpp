#pragma once
// What a finished kinematic fit hands on: per-source results at the posterior, the catalog
// selection it fitted, and the output folder (docs/fit.md): parameters, correlations, sources and
// kinematic distances as CSV, Markdown and LaTeX; fit.h5 with the chain, the posterior samples,
// the tables and the Galactic parameters for other commands; summary.txt.
#include <array>
#include <string>
#include <vector>

#include "undertow/fit/fit_file.hpp"
#include "undertow/fit/kinematic_distance.hpp"

namespace undertow::fit {

// The sources a fit uses: those seen at least longitude_min_deg from the Galactic centre's
// direction (a cut on direction alone, which leaves the distance prior exact), whose parallax is
// within 7 sigma of the prior's range (the likelihood's own test). Every other source is listed
// with the reason.
struct Selection {
  residuals::Catalog used;
  std::vector<std::string> excluded;
};
Selection select_sources(const FitFile& f, const residuals::Catalog& c);

struct SourceResult {
  std::string name, group;
  double distance_kpc = 0, distance_lo_kpc = 0, distance_hi_kpc = 0; // parallax posterior
  double R_kpc = 0, psi_deg = 0;
  std::array<double, 3> uvw{}, uvw_lo{}, uvw_hi{}; // U_s, V_s, W_s median and 16/84 %
  double outlier_probability = 0;
  KinematicDistance kinematic;
  double kinematic_kpc = NAN;   // of near/far, the one closer to the parallax distance
  double kinematic_ratio = NAN; // kinematic / parallax distance
  bool factor_two = false;      // ratio >= 2 or <= 1/2
};

// draws: posterior samples (each with a distance and measurement draw) per source.
std::vector<SourceResult> source_results(const FitSpec& s, const residuals::Catalog& used,
                                         const Likelihood& L, const FitResult& r, int draws = 400);

// Refuses an output that is a file, or a non-empty folder that holds no earlier fit (InputError).
void check_output_folder(const std::string& folder);
// Writes everything into a temporary folder beside `folder` and then puts it in its place (an
// earlier fit there is replaced only when the new one is complete); returns the files.
std::vector<std::string> write_fit_outputs(const std::string& folder, const FitFile& f,
                                           const Selection& sel, const FitResult& r,
                                           const std::vector<SourceResult>& src);

// The Galactic parameters of a finished fit (fit.h5): the median, and the posterior samples.
struct GalacticFromFit {
  std::string file;
  bool converged = false;
  KinematicModel model; // the rotation form and, for the model form, its curve
  FullParams median{};
  std::vector<FullParams> samples;
};
GalacticFromFit read_galactic_parameters(const std::string& fit_h5);

} // namespace undertow::fit

#pragma once
// Every figure undertow draws, by name: what folder it is drawn from (a run's, a fit's or a sweep
// gather's), what it shows, and how. A figure is drawn from the output files alone, so the
// figures written by `run`, `fit` and `sweep gather` and those redrawn by `undertow draw` are the
// same files.
#include <functional>
#include <string>
#include <vector>

#include "undertow/plot/figure.hpp"

namespace undertow::plot {

enum class Source { run, fit, sweep, arms };
std::string source_name(Source s);

struct DrawOptions {
  std::vector<Format> formats{Format::png, Format::pdf};
  double width_mm = 0, height_mm = 0; // 0: the figure's own size
  double dpi = 300;
  // The sweep map's axes: two swept parameters' key paths, or their last parts; empty: the
  // first two numeric ones.
  std::vector<std::string> sweep_axes;
};

struct FigureKind {
  std::string name; // file fig-<name>.<ext>
  Source source;
  std::string summary; // one line, for --help and the docs
  Page page;           // default size
  // Whether the folder has what the figure needs (an optional figure is skipped when not).
  std::function<bool(const std::string& dir)> available;
  // Reads what the figure needs (InputError naming file and dataset when something is missing)
  // and returns the drawing, so that nothing is written unless every input was read.
  std::function<std::function<void(Figure&)>(const std::string& dir, const DrawOptions& o)> load;
};

const std::vector<FigureKind>& catalogue();
const FigureKind& figure_kind(const std::string& name); // InputError listing the names

// Draws the named figures (all available ones of the folder's kind when `names` is empty) from
// `dir` into `out_dir` as fig-<name>.<ext>; returns the files written.
std::vector<std::string> draw_figures(Source source, const std::string& dir,
                                      const std::string& out_dir,
                                      const std::vector<std::string>& names,
                                      const DrawOptions& options);

// Where a folder's figures go by default: FOLDER/figures, or figures/ beside a sweep's
// *-results.h5 file.
std::string figures_folder(const std::string& where);

// What kind of output folder `dir` is, from the files in it; InputError when none.
Source detect_source(const std::string& dir);

// The figures, one file each.
FigureKind residual_distributions_figure();
FigureKind pulls_figure();
FigureKind lag_by_age_figure();
FigureKind lag_by_phase_figure();
FigureKind face_on_figure();
FigureKind rotation_curve_figure();
FigureKind fit_rotation_figure();
FigureKind posterior_figure();
FigureKind traces_figure();
FigureKind sweep_map_figure();
FigureKind sweep_profiles_figure();
FigureKind arm_segments_figure();

} // namespace undertow::plot

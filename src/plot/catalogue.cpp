#include "undertow/plot/catalogue.hpp"

#include <filesystem>

#include "undertow/error.hpp"
#include "undertow/io/staged_folder.hpp"

namespace undertow::plot {

std::string source_name(Source s) {
  switch (s) {
  case Source::run:
    return "run";
  case Source::fit:
    return "fit";
  case Source::sweep:
    return "sweep";
  case Source::arms:
    return "arm fit";
  }
  return "";
}

const std::vector<FigureKind>& catalogue() {
  static const std::vector<FigureKind> all = {
      residual_distributions_figure(),
      face_on_figure(),
      rotation_curve_figure(),
      pulls_figure(),
      lag_by_age_figure(),
      lag_by_phase_figure(),
      posterior_figure(),
      fit_rotation_figure(),
      traces_figure(),
      sweep_map_figure(),
      sweep_profiles_figure(),
      arm_segments_figure(),
  };
  return all;
}

const FigureKind& figure_kind(const std::string& name) {
  std::string names;
  for (const auto& k : catalogue()) {
    if (k.name == name) return k;
    names += (names.empty() ? "" : ", ") + k.name;
  }
  throw InputError("no figure '" + name + "' (figures: " + names + ")");
}

std::string figures_folder(const std::string& where) {
  const std::filesystem::path p(where);
  return ((std::filesystem::is_directory(p) ? p : p.parent_path()) / "figures").string();
}

Source detect_source(const std::string& dir) {
  namespace fs = std::filesystem;
  if (fs::is_regular_file(dir) && dir.ends_with("-results.h5")) return Source::sweep;
  if (!fs::is_directory(dir)) throw InputError(dir + ": not a folder (nor a sweep's *-results.h5)");
  if (fs::exists(dir + "/fit.h5")) return Source::fit;
  if (fs::exists(dir + "/arms.h5")) return Source::arms;
  if (fs::exists(dir + "/orbits.h5") || fs::exists(dir + "/measured-residuals.h5"))
    return Source::run;
  for (const auto& e : fs::directory_iterator(dir))
    if (e.path().filename().string().ends_with("-results.h5")) return Source::sweep;
  throw InputError(dir + ": neither a run's, a fit's, an arm fit's nor a gathered sweep's folder "
                         "(no orbits.h5, fit.h5, arms.h5 or *-results.h5)");
}

std::vector<std::string> draw_figures(Source source, const std::string& dir,
                                      const std::string& out_dir,
                                      const std::vector<std::string>& names,
                                      const DrawOptions& options) {
  std::vector<const FigureKind*> chosen;
  if (names.empty()) {
    for (const auto& k : catalogue())
      if (k.source == source && k.available(dir)) chosen.push_back(&k);
  } else {
    for (const auto& n : names) {
      const FigureKind& k = figure_kind(n);
      if (k.source != source)
        throw InputError("figure '" + n + "' is drawn from a " + source_name(k.source) +
                         " folder, and " + dir + " is a " + source_name(source) + " folder");
      chosen.push_back(&k);
    }
  }
  require_drawing(options.formats);
  // Every figure's inputs are read before any file is written.
  std::vector<std::function<void(Figure&)>> drawings;
  for (const FigureKind* k : chosen)
    drawings.push_back(k->load(dir, options));
  // The figures join the folder together or none does.
  return io::write_files_together(out_dir, [&](const std::string& tmp) {
    std::vector<std::string> written;
    for (std::size_t i = 0; i < chosen.size(); ++i) {
      Page page = chosen[i]->page;
      if (options.width_mm > 0) page.width_mm = options.width_mm;
      if (options.height_mm > 0) page.height_mm = options.height_mm;
      page.dpi = options.dpi;
      for (Format f : options.formats) {
        const std::string path = tmp + "/fig-" + chosen[i]->name + "." + extension(f);
        Figure fig(path, f, page);
        drawings[i](fig);
        fig.commit();
        written.push_back(path);
      }
    }
    return written;
  });
}

} // namespace undertow::plot

#include "draw_command.hpp"

#include <filesystem>
#include <iostream>

#include "undertow/error.hpp"

#include "undertow/plot/catalogue.hpp"

namespace undertow::cli {

void add_figure_options(CLI::App& cmd, FigureArgs& a) {
  cmd.add_flag("--no-figures", a.none, "Write no figures");
  cmd.add_option(
         "--figure-formats", a.formats,
         "Formats of the figures written into OUTPUT/figures: png, svg, pdf, comma-separated")
      ->capture_default_str();
}

void draw_after(const FigureArgs& a, const std::string& where) {
  if (a.none) return;
  const std::string out = plot::figures_folder(where);
  try {
    plot::DrawOptions o;
    o.formats = plot::formats_from_list(a.formats);
    const auto files = plot::draw_figures(plot::detect_source(where), where, out, {}, o);
    std::cout << "figures: " << files.size() << " files in " << out << "/\n";
  } catch (const InputError& e) {
    // where: a run's or a fit's folder, or a gathered sweep's HDF5 file among its tables
    const std::filesystem::path w(where);
    const std::string place =
        std::filesystem::is_directory(w) || !w.has_parent_path() ? where : w.parent_path().string();
    throw InputError(std::string(e.what()) + " (the other outputs in " + place +
                     " are complete and kept; redraw with 'undertow draw')");
  }
}

void add_draw_command(CLI::App& app, DrawArgs& a) {
  std::string names;
  for (const auto& k : plot::catalogue())
    names += "\n  " + k.name + " (" + plot::source_name(k.source) + "): " + k.summary;
  a.command = app.add_subcommand(
      "draw", "Redraw figures from a run's, a fit's or a gathered sweep's output folder, from its "
              "files alone. Figures:" +
                  names);
  auto* c = a.command;
  c->add_option("folder", a.dir, "The output folder of run, fit or sweep gather")->required();
  c->add_option("--figure", a.figures,
                "Which figure (repeat for several; default: all the "
                "folder's files allow)");
  c->add_option("--format", a.formats, "png, svg, pdf, comma-separated")->capture_default_str();
  c->add_option("--width-mm", a.width_mm, "Page width, mm (default: the figure's own)")
      ->check(CLI::Range(10.0, 2000.0));
  c->add_option("--height-mm", a.height_mm, "Page height, mm (default: the figure's own)")
      ->check(CLI::Range(10.0, 2000.0));
  c->add_option("--dpi", a.dpi, "PNG resolution, pixels per inch")
      ->check(CLI::Range(30.0, 2400.0))
      ->capture_default_str();
  c->add_option("-o,--output", a.output, "Folder for the figures (default: FOLDER/figures)");
  c->add_option("--axes", a.axes,
                "sweep-map: the two swept parameters on its axes (key paths or their last "
                "parts, e.g. --axes pattern_speed_kms_kpc force_ratio)")
      ->expected(2);
  c->add_flag("--list", a.list, "List the figures the folder's files allow, and stop");
}

std::optional<int> run_draw_command(const DrawArgs& a) {
  if (!a.command || !a.command->parsed()) return std::nullopt;
  const plot::Source src = plot::detect_source(a.dir);
  if (a.list) {
    for (const auto& k : plot::catalogue())
      if (k.source == src)
        std::cout << k.name << (k.available(a.dir) ? "" : " (not available: inputs missing)")
                  << ": " << k.summary << "\n";
    return 0;
  }
  plot::DrawOptions o;
  o.formats = plot::formats_from_list(a.formats);
  o.width_mm = a.width_mm, o.height_mm = a.height_mm, o.dpi = a.dpi;
  o.sweep_axes = a.axes;
  const std::string out = a.output.empty() ? plot::figures_folder(a.dir) : a.output;
  for (const auto& f : plot::draw_figures(src, a.dir, out, a.figures, o))
    std::cout << "wrote " << f << "\n";
  return 0;
}

} // namespace undertow::cli

// The walkers of a kinematic fit, step by step, for each parameter: whether the chain forgot its
// start and mixes; the burn-in that the fit discarded is shaded.
#include <algorithm>
#include <cmath>
#include <filesystem>

#include "chain_input.hpp"
#include "undertow/plot/catalogue.hpp"
#include "undertow/plot/labels.hpp"
#include "undertow/plot/scales.hpp"

namespace undertow::plot {
namespace {

void draw(const Chain& c, Figure& fig) {
  const std::size_t n = c.names.size();
  const double top = 0.98, bottom = 0.07, gap = 0.008;
  const double h = (top - bottom - gap * double(n - 1)) / double(n);
  // At most about 400 points per walker line: every k-th step.
  const std::size_t k = std::max<std::size_t>(1, c.steps / 400);
  fig.text_scale(0.8);
  for (std::size_t p = 0; p < n; ++p) {
    std::vector<double> all;
    for (std::size_t s = 0; s < c.steps; s += k)
      for (std::size_t w = 0; w < c.walkers; ++w)
        all.push_back(c.at(s, w, p));
    const auto [lo, hi] = range_of({{quantile(all, 0.001), quantile(all, 0.999)}}, 0.05);
    const double y1 = top - double(p) * (h + gap);
    fig.panel({0.3, 0.97, y1 - h, y1, 0, double(c.steps), lo, hi});
    fig.colour(series(Series::band), 0.2);
    fig.fill({0, double(c.burn), double(c.burn), 0}, {lo, lo, hi, hi});
    fig.colour(series(Series::simulated), 0.25);
    fig.line_width(0.3);
    for (std::size_t w = 0; w < c.walkers; ++w) {
      std::vector<double> x, y;
      for (std::size_t s = 0; s < c.steps; s += k)
        x.push_back(double(s)), y.push_back(std::clamp(c.at(s, w, p), lo, hi));
      fig.line(x, y);
    }
    fig.line_width(0.6);
    fig.axes(p + 1 == n ? "step" : "", "", p + 1 == n, true, false, false, 0,
             round_step((hi - lo) / 2.2));
    fig.colour(kInk);
    fig.side_text("lv", 4.0, 0.5, 1.0,
                  parameter_label(c.names[p])); // horizontal: the panels are low
    if (p == 0) fig.note(0, "burn-in (discarded)", 0.9);
    fig.text_scale(0.8); // note() leaves the default size
  }
  fig.text_scale(1.0);
}

} // namespace

FigureKind traces_figure() {
  FigureKind k;
  k.name = "traces";
  k.source = Source::fit;
  k.summary = "every walker of the fit's sampler, step by step, for each parameter, the "
              "discarded burn-in shaded";
  k.page = {120, 180, 200};
  k.available = [](const std::string& dir) { return std::filesystem::exists(dir + "/fit.h5"); };
  k.load = [](const std::string& dir, const DrawOptions&) {
    const Chain c = read_chain(H5Input(dir + "/fit.h5", "traces"));
    return std::function<void(Figure&)>([c](Figure& f) { draw(c, f); });
  };
  return k;
}

} // namespace undertow::plot

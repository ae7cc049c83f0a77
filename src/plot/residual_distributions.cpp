// Measured against simulated peculiar motions: U_s, V_s and W_s as histograms with Poisson error
// bars and kernel density estimates, the comparison's statistics in each panel.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>

#include "undertow/error.hpp"
#include "undertow/plot/catalogue.hpp"
#include "undertow/plot/density_estimate.hpp"
#include "undertow/plot/inputs.hpp"
#include "undertow/plot/scales.hpp"

namespace undertow::plot {
namespace {

struct Component {
  std::string label;
  std::vector<double> meas, sim;
  std::string stats; // from the comparison table, when it is there
};

std::string format_stats(const H5Input& cmp, std::size_t row) {
  const auto get = [&](const std::string& d) { return cmp.doubles("global/" + d).at(row); };
  char buf[160];
  std::snprintf(buf, sizeof buf, "#gD = %+.1f km/s (%.1f#gs), p#dKS#u %.2g, p#dAD#u %.2g",
                get("difference_kms"), std::fabs(get("pull")), get("ks_p"), get("ad_p"));
  return buf;
}

void draw(const std::vector<Component>& comps, Figure& fig) {
  const std::size_t n = comps.size();
  const double top = 0.955, bottom = 0.075, gap = 0.018;
  const double h = (top - bottom - gap * double(n - 1)) / double(n);
  for (std::size_t k = 0; k < n; ++k) {
    const Component& c = comps[k];
    const double lo_q = std::min(quantile(c.meas, 0.005), quantile(c.sim, 0.005));
    const double hi_q = std::max(quantile(c.meas, 0.995), quantile(c.sim, 0.995));
    const auto [lo0, hi0] = range_of({{lo_q, hi_q}}, 0.04);
    // About sqrt(n) bins of a round width (1, 2 or 5 times a power of ten) on round edges.
    const int want = std::clamp(int(std::lround(std::sqrt(double(c.meas.size())))), 8, 30);
    const double step = round_step((hi0 - lo0) / want);
    const double lo = std::floor(lo0 / step) * step, hi = std::ceil(hi0 / step) * step;
    const int bins = int(std::lround((hi - lo) / step));
    const Histogram hm = histogram(c.meas, lo, hi, bins), hs = histogram(c.sim, lo, hi, bins);
    // Sources per bin: the measured counts as they are, the simulated scaled to the measured
    // number, so the two read on one axis.
    const double width = (hi - lo) / bins, to_counts = double(c.meas.size()) * width;
    std::vector<double> grid(241);
    for (std::size_t i = 0; i < grid.size(); ++i)
      grid[i] = lo + (hi - lo) * double(i) / double(grid.size() - 1);
    const double bm = silverman_bandwidth(c.meas), bs = silverman_bandwidth(c.sim);
    auto km = kernel_density(c.meas, grid, bm);
    auto ks = kernel_density(c.sim, grid, bs);
    for (auto* v : {&km, &ks})
      for (double& y : *v)
        y *= to_counts;
    double ymax = 0;
    for (std::size_t i = 0; i < hm.density.size(); ++i)
      ymax = std::max({ymax, (hm.density[i] + hm.error[i]) * to_counts,
                       (hs.density[i] + hs.error[i]) * to_counts});
    for (const auto* v : {&km, &ks})
      for (double y : *v)
        ymax = std::max(ymax, y);
    const double y1 = top - double(k) * (h + gap);
    fig.panel({0.14, 0.97, y1 - h, y1, lo, hi, 0, 1.45 * ymax});
    // Simulated: shaded bars and a solid curve; measured: points with Poisson error bars and a
    // dashed curve.
    fig.colour(series(Series::simulated), 0.25);
    for (std::size_t i = 0; i < hs.density.size(); ++i) {
      const double a = hs.edges[i], b = hs.edges[i + 1], y = hs.density[i] * to_counts;
      fig.fill({a, b, b, a}, {0, 0, y, y});
    }
    // A kernel estimate needs two distinct values (a zero bandwidth draws nothing).
    fig.line_width(1.0);
    if (bs > 0) {
      fig.colour(series(Series::simulated));
      fig.line(grid, ks);
    }
    if (bm > 0) {
      fig.colour(series(Series::measured));
      fig.dashed(grid, km);
    }
    std::vector<double> mid, y, lo_e, hi_e;
    for (std::size_t i = 0; i < hm.density.size(); ++i) {
      mid.push_back(0.5 * (hm.edges[i] + hm.edges[i + 1]));
      y.push_back(hm.density[i] * to_counts);
      lo_e.push_back((hm.density[i] - hm.error[i]) * to_counts);
      hi_e.push_back((hm.density[i] + hm.error[i]) * to_counts);
    }
    fig.line_width(0.7);
    fig.error_bars_y(mid, lo_e, hi_e);
    fig.points(mid, y, 1.1);
    fig.line_width(0.6);
    char ylab[64];
    std::snprintf(ylab, sizeof ylab, "sources per %.3g km s#u-1#d", width);
    fig.axes(k + 1 == n ? "peculiar motion [km s#u-1#d]" : "", ylab, k + 1 == n, true);
    fig.note(0, c.label, 1.2);
    if (!c.stats.empty()) fig.note(1, c.stats, 0.85);
    std::size_t outside = 0;
    for (const auto* v : {&c.meas, &c.sim})
      for (double x : *v)
        outside += x < lo || x > hi ? 1 : 0;
    if (outside > 0)
      fig.note(0, std::to_string(outside) + " beyond the axis (both samples)", 0.8, true);
    if (k == 0)
      fig.legend_above(
          {{series(Series::measured), "measured (" + std::to_string(c.meas.size()) + ")", 'p'},
           {series(Series::simulated), "simulated (" + std::to_string(c.sim.size()) + ", scaled)",
            'b'}});
  }
}

} // namespace

FigureKind residual_distributions_figure() {
  FigureKind k;
  k.name = "residuals";
  k.source = Source::run;
  k.summary = "U_s, V_s, W_s of the measured and the simulated young sources: histograms with "
              "Poisson errors, kernel density estimates, the comparison's statistics";
  k.page = {88, 150, 300};
  k.available = [](const std::string& dir) {
    return std::filesystem::exists(dir + "/measured-residuals.h5") &&
           std::filesystem::exists(dir + "/mock-residuals.h5");
  };
  k.load = [](const std::string& dir, const DrawOptions&) {
    const H5Input meas(dir + "/measured-residuals.h5", "residuals");
    const H5Input sim(dir + "/mock-residuals.h5", "residuals");
    std::vector<Component> comps;
    for (const char* c : {"U", "V", "W"}) {
      auto m = meas.doubles(std::string("sources/") + c + "_kms");
      auto s = sim.doubles(std::string("sources/") + c + "_kms");
      for (auto* v : {&m, &s})
        std::erase_if(*v, [](double x) { return !std::isfinite(x); });
      if (m.empty() || s.empty())
        throw InputError((m.empty() ? meas.path() : sim.path()) + ": no finite value in /sources/" +
                         c + "_kms (figure 'residuals')");
      comps.push_back({std::string(c) + "#ds#u", m, s, {}});
    }
    // The comparison's statistics for the whole sample ("all U_s", ...), when it was made.
    if (std::filesystem::exists(dir + "/comparison.h5")) {
      const H5Input cmp(dir + "/comparison.h5", "residuals");
      if (!cmp.has("global/subset") || !cmp.has("global/component"))
        return std::function<void(Figure&)>([comps](Figure& f) { draw(comps, f); });
      const auto subsets = cmp.strings("global/subset"),
                 components = cmp.strings("global/component");
      for (std::size_t i = 0; i < std::min(subsets.size(), components.size()); ++i)
        for (std::size_t k = 0; k < 3; ++k)
          if (subsets[i] == "all" && components[i] == std::string(1, "UVW"[k]) + "_s")
            comps[k].stats = format_stats(cmp, i);
    }
    return std::function<void(Figure&)>([comps](Figure& f) { draw(comps, f); });
  };
  return k;
}

} // namespace undertow::plot

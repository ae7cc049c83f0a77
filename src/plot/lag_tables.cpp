// The young stars' mean U_s and V_s by age and by arm phase (the lag tables of a gas run): the
// stars themselves and through the mock survey, with the bootstrap errors of the means.
#include <cmath>
#include <filesystem>

#include "undertow/plot/catalogue.hpp"
#include "undertow/plot/inputs.hpp"
#include "undertow/plot/scales.hpp"

namespace undertow::plot {
namespace {

struct LagTable {
  std::string x_label;
  bool log_x = false;
  std::vector<double> lo, hi;
  // [u, v] x [sim, mock]: means and errors
  std::array<std::array<std::vector<double>, 2>, 2> mean, err;
};

LagTable read(const H5Input& in, const std::string& group, const std::string& lo,
              const std::string& hi) {
  LagTable t;
  t.lo = in.doubles(group + "/" + lo);
  t.hi = in.doubles_n(group + "/" + hi, t.lo.size());
  const char* comp[2] = {"u", "v"};
  const char* kind[2] = {"sim", "mock"};
  for (int c = 0; c < 2; ++c)
    for (int k = 0; k < 2; ++k) {
      const std::string base = group + "/mean_" + comp[c] + "_" + kind[k];
      t.mean[c][k] = in.doubles_n(base + "_kms", t.lo.size());
      t.err[c][k] = in.doubles_n(base + "_err_kms", t.lo.size());
    }
  return t;
}

void draw(const LagTable& t, Figure& fig) {
  const std::size_t n = t.lo.size();
  // Bin centres: geometric on a log axis (ages from 0: the first bin's centre at half its top).
  std::vector<double> x(n), xl(n), xh(n);
  for (std::size_t i = 0; i < n; ++i) {
    xl[i] = t.log_x ? std::log10(std::max(t.lo[i], 0.5 * t.hi[i])) : t.lo[i];
    xh[i] = t.log_x ? std::log10(t.hi[i]) : t.hi[i];
    x[i] = 0.5 * (xl[i] + xh[i]);
  }
  const auto [x0, x1] = range_of({xl, xh}, 0.03);
  const double dx = 0.012 * (x1 - x0); // the two series side by side
  const char* names[2] = {"mean U#ds#u [km s#u-1#d]", "mean V#ds#u [km s#u-1#d]"};
  for (int c = 0; c < 2; ++c) {
    std::vector<std::vector<double>> ys;
    for (int k = 0; k < 2; ++k) {
      std::vector<double> lo(n), hi(n);
      for (std::size_t i = 0; i < n; ++i)
        lo[i] = t.mean[c][k][i] - t.err[c][k][i], hi[i] = t.mean[c][k][i] + t.err[c][k][i];
      ys.push_back(lo), ys.push_back(hi);
    }
    ys.push_back({0.0});
    const auto [y0, y1] = range_of(ys, 0.12);
    const double top = 0.86, h = 0.345, gap = 0.045;
    const double py1 = top - c * (h + gap);
    fig.panel({0.17, 0.96, py1 - h, py1, x0, x1, y0, y1});
    fig.colour(series(Series::mute));
    fig.line({x0, x1}, {0, 0});
    for (std::size_t i = 0; i + 1 < n; ++i) // bin boundaries
      if (xh[i] == xl[i + 1]) {
        fig.colour(kGrid);
        fig.line({xh[i], xh[i]}, {y0, y1});
      }
    for (int k = 0; k < 2; ++k) {
      const Rgb col = series(k == 0 ? Series::simulated : Series::band);
      std::vector<double> xs(n), lo(n), hi(n);
      for (std::size_t i = 0; i < n; ++i) {
        xs[i] = x[i] + (k == 0 ? -dx : dx);
        lo[i] = t.mean[c][k][i] - t.err[c][k][i], hi[i] = t.mean[c][k][i] + t.err[c][k][i];
      }
      fig.colour(col);
      fig.line_width(0.8);
      fig.error_bars_y(xs, lo, hi);
      fig.points(xs, t.mean[c][k], 1.3, k == 0);
      fig.line_width(0.6);
    }
    fig.axes(c == 1 ? t.x_label : "", names[c], c == 1, true, t.log_x, false);
  }
  fig.panel({0.17, 0.96, 0.86 - 0.345, 0.86, 0, 1, 0, 1});
  fig.legend_above({{series(Series::simulated), "young stars (true motions)", 'p'},
                    {series(Series::band), "through the mock survey", 'o'}});
}

FigureKind lag_figure(const std::string& name, const std::string& group, const std::string& lo,
                      const std::string& hi, const std::string& x_label, bool log_x,
                      const std::string& summary) {
  FigureKind k;
  k.name = name;
  k.source = Source::run;
  k.summary = summary;
  k.page = {88, 95, 300};
  k.available = [group](const std::string& dir) {
    if (!std::filesystem::exists(dir + "/comparison.h5")) return false;
    return H5Input(dir + "/comparison.h5", "").has(group);
  };
  k.load = [=](const std::string& dir, const DrawOptions&) {
    LagTable t = read(H5Input(dir + "/comparison.h5", name), group, lo, hi);
    t.x_label = x_label, t.log_x = log_x;
    return std::function<void(Figure&)>([t](Figure& f) { draw(t, f); });
  };
  return k;
}

} // namespace

FigureKind lag_by_age_figure() {
  return lag_figure("lag-age", "lag_by_age", "age_lo_myr", "age_hi_myr", "age [Myr]", true,
                    "the young stars' mean U_s and V_s by age (gas runs with star formation), "
                    "true and through the mock survey");
}

FigureKind lag_by_phase_figure() {
  return lag_figure("lag-phase", "lag_by_phase", "phase_lo", "phase_hi",
                    "arm phase [arm spacings from the crest, + ahead]", false,
                    "the young stars' mean U_s and V_s by arm phase (gas runs with spirals), "
                    "true and through the mock survey");
}

} // namespace undertow::plot

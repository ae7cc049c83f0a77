// The posterior of a kinematic fit: every parameter's marginal and every pair's joint
// distribution from the kept chain, with the regions holding 68 % and 95 % of the samples.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>

#include "chain_input.hpp"
#include "undertow/plot/catalogue.hpp"
#include "undertow/plot/labels.hpp"
#include "undertow/plot/scales.hpp"

namespace undertow::plot {
namespace {

struct Corner {
  std::vector<std::string> names;
  std::vector<std::vector<double>> samples; // per parameter, the kept chain
};

// The density level above which a share `mass` of the total lies (the highest-density region
// of a binned distribution; common practice for plots of posterior samples).
double level_for(std::vector<double> z, double mass) {
  std::sort(z.begin(), z.end(), std::greater<>());
  double total = 0;
  for (double v : z)
    total += v;
  double acc = 0;
  for (double v : z) {
    acc += v;
    if (acc >= mass * total) return v;
  }
  return z.empty() ? 0 : z.back();
}

// 2-D histogram smoothed by the 3 x 3 binomial kernel (1 2 1) x (1 2 1) / 16.
std::vector<double> density2d(const std::vector<double>& x, const std::vector<double>& y, double x0,
                              double x1, double y0, double y1, int n) {
  std::vector<double> h(std::size_t(n * n), 0.0), s(h.size(), 0.0);
  for (std::size_t i = 0; i < x.size(); ++i) {
    const double fx = std::floor((x[i] - x0) / (x1 - x0) * n);
    const double fy = std::floor((y[i] - y0) / (y1 - y0) * n);
    if (!(fx >= 0 && fx < n && fy >= 0 && fy < n)) continue; // NaN fails too
    h[std::size_t(fy) * std::size_t(n) + std::size_t(fx)] += 1;
  }
  const double w[3] = {1, 2, 1};
  for (int iy = 0; iy < n; ++iy)
    for (int ix = 0; ix < n; ++ix) {
      double acc = 0, norm = 0;
      for (int dy = -1; dy <= 1; ++dy)
        for (int dx = -1; dx <= 1; ++dx) {
          const int jx = ix + dx, jy = iy + dy;
          if (jx < 0 || jx >= n || jy < 0 || jy >= n) continue;
          acc += w[dx + 1] * w[dy + 1] * h[std::size_t(jy * n + jx)];
          norm += w[dx + 1] * w[dy + 1];
        }
      s[std::size_t(iy * n + ix)] = acc / norm;
    }
  return s;
}

void draw(const Corner& c, Figure& fig) {
  const std::size_t n = c.names.size();
  const double left = 0.1, right = 0.98, bottom = 0.09, top = 0.97;
  const double cw = (right - left) / double(n), ch = (top - bottom) / double(n);
  std::vector<std::pair<double, double>> range(n);
  std::vector<double> tick(n);
  for (std::size_t p = 0; p < n; ++p) {
    const double lo = quantile(c.samples[p], 0.002), hi = quantile(c.samples[p], 0.998);
    range[p] = range_of({{lo, hi}}, 0.06);
    // Two or three labelled ticks: a cell is too narrow for more.
    const double w = range[p].second - range[p].first;
    tick[p] = round_step(w / 2);
    if (w / tick[p] > 3.2) tick[p] = round_step(w / 1.2);
  }
  const std::size_t stride = std::max<std::size_t>(1, c.samples[0].size() / 1000);
  fig.text_scale(0.75);
  fig.label_offsets(3.2, 4.6);
  for (std::size_t row = 0; row < n; ++row)
    for (std::size_t col = 0; col <= row; ++col) {
      const double x0 = left + double(col) * cw, y1 = top - double(row) * ch;
      const auto [xa, xb] = range[col];
      const bool bottom_row = row + 1 == n, left_col = col == 0;
      const std::string xl = bottom_row ? parameter_label(c.names[col]) : "";
      if (row == col) { // the marginal: a step histogram, the median and the 16/84 % quantiles
        const int bins = 40;
        std::vector<double> h(bins, 0.0);
        for (double v : c.samples[col]) {
          const double f = std::floor((v - xa) / (xb - xa) * bins);
          if (f >= 0 && f < bins) h[std::size_t(f)] += 1;
        }
        const double hmax = *std::max_element(h.begin(), h.end());
        fig.panel(
            {x0 + 0.004, x0 + cw - 0.004, y1 - ch + 0.004, y1 - 0.004, xa, xb, 0, 1.15 * hmax});
        std::vector<double> sx, sy;
        for (int i = 0; i < bins; ++i) {
          const double a = xa + (xb - xa) * i / bins, b = xa + (xb - xa) * (i + 1) / bins;
          sx.insert(sx.end(), {a, b}), sy.insert(sy.end(), {h[std::size_t(i)], h[std::size_t(i)]});
        }
        fig.colour(series(Series::simulated));
        fig.line_width(0.8);
        fig.line(sx, sy);
        const double q16 = quantile(c.samples[col], 0.16), q50 = quantile(c.samples[col], 0.5),
                     q84 = quantile(c.samples[col], 0.84);
        fig.colour(kInk);
        fig.line({q50, q50}, {0, 1.15 * hmax});
        fig.dashed({q16, q16}, {0, 1.15 * hmax});
        fig.dashed({q84, q84}, {0, 1.15 * hmax});
        fig.line_width(0.6);
        fig.axes(xl, "", bottom_row, false, false, false, tick[col], 0);
        char title[96];
        std::snprintf(title, sizeof title, "%.4g +%.2g/−%.2g", q50, q84 - q50, q50 - q16);
        fig.text_scale(0.65);
        fig.side_text("t", 0.5, 0.5, 0.5, title);
        fig.text_scale(0.75);
        continue;
      }
      const auto [ya, yb] = range[row];
      fig.panel({x0 + 0.004, x0 + cw - 0.004, y1 - ch + 0.004, y1 - 0.004, xa, xb, ya, yb});
      std::vector<double> px, py;
      for (std::size_t i = 0; i < c.samples[col].size(); i += stride)
        px.push_back(c.samples[col][i]), py.push_back(c.samples[row][i]);
      fig.colour(series(Series::mute), 0.35);
      fig.points(px, py, 0.35);
      constexpr int kBins = 28;
      const auto z = density2d(c.samples[col], c.samples[row], xa, xb, ya, yb, kBins);
      fig.colour(series(Series::simulated));
      fig.line_width(0.6);
      fig.contours(z, kBins, kBins, {level_for(z, 0.95)});
      fig.line_width(1.0);
      fig.contours(z, kBins, kBins, {level_for(z, 0.68)});
      fig.line_width(0.6);
      fig.axes(xl, left_col ? parameter_label(c.names[row]) : "", bottom_row, left_col, false,
               false, tick[col], tick[row]);
    }
  // The key, in the empty upper right.
  fig.panel({0.5, 0.97, 0.8, 0.96, 0, 1, 0, 1});
  fig.note(0, std::to_string(c.samples[0].size()) + " samples of the kept chain (after burn-in)",
           0.9);
  fig.note(1, "pairs: thinned samples, contours holding 68 % (thick) and 95 % (thin)", 0.9);
  fig.note(2, "diagonal: the marginal, its median (solid) and 16 and 84 % (dashed)", 0.9);
  fig.text_scale(1.0);
}

} // namespace

FigureKind posterior_figure() {
  FigureKind k;
  k.name = "posterior";
  k.source = Source::fit;
  k.summary = "the fit's posterior: each parameter's marginal (median, 16 and 84 %) and each "
              "pair's joint distribution with its 68 % and 95 % regions";
  k.page = {180, 180, 200};
  k.available = [](const std::string& dir) { return std::filesystem::exists(dir + "/fit.h5"); };
  k.load = [](const std::string& dir, const DrawOptions&) {
    const Chain ch = read_chain(H5Input(dir + "/fit.h5", "posterior"));
    Corner c;
    c.names = ch.names;
    c.samples.resize(ch.names.size());
    for (std::size_t s = ch.burn; s < ch.steps; ++s)
      for (std::size_t w = 0; w < ch.walkers; ++w)
        for (std::size_t p = 0; p < ch.names.size(); ++p)
          c.samples[p].push_back(ch.at(s, w, p));
    return std::function<void(Figure&)>([c](Figure& f) { draw(c, f); });
  };
  return k;
}

} // namespace undertow::plot

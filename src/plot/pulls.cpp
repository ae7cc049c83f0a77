// Each measured source's pull against the model's local prediction (the normal equivalent of
// (measured - predicted) / sigma from the local comparison), against Galactocentric azimuth and
// radius, with the +-1 sigma band and the +-3 sigma lines.
#include <cmath>
#include <cstdio>
#include <filesystem>

#include "undertow/plot/catalogue.hpp"
#include "undertow/plot/inputs.hpp"
#include "undertow/plot/scales.hpp"

namespace undertow::plot {
namespace {

struct Pulls {
  std::vector<double> psi, R;
  std::array<std::vector<double>, 3> pull;
};

std::string moments(const std::vector<double>& v) {
  double s = 0, s2 = 0, n = 0;
  for (double x : v)
    if (std::isfinite(x)) s += x, s2 += x * x, n += 1;
  if (n < 2) return "";
  const double m = s / n, sd = std::sqrt(std::max(0.0, (s2 - n * m * m) / (n - 1)));
  char buf[96];
  std::snprintf(buf, sizeof buf, "mean %+.2f ± %.2f, dispersion %.2f", m, sd / std::sqrt(n), sd);
  return buf;
}

void draw(const Pulls& d, Figure& fig) {
  const auto [plo, phi] = range_of({d.psi}, 0.05);
  const auto [rlo, rhi] = range_of({d.R}, 0.05);
  double big = 4.6;
  for (const auto& p : d.pull)
    for (double x : p)
      if (std::isfinite(x)) big = std::max(big, std::min(8.0, std::fabs(x) * 1.1));
  const char* names[3] = {"U", "V", "W"};
  const double top = 0.93, bottom = 0.1, gap = 0.02, h = (top - bottom - 2 * gap) / 3;
  for (int row = 0; row < 3; ++row) {
    const double y1 = top - row * (h + gap);
    for (int col = 0; col < 2; ++col) {
      const auto& x = col == 0 ? d.psi : d.R;
      const double xlo = col == 0 ? plo : rlo, xhi = col == 0 ? phi : rhi;
      const double x0 = col == 0 ? 0.08 : 0.56;
      fig.panel({x0, x0 + 0.42, y1 - h, y1, xlo, xhi, -big, big});
      fig.colour(series(Series::band), 0.25);
      fig.fill({xlo, xhi, xhi, xlo}, {-1, -1, 1, 1});
      fig.colour(series(Series::mute));
      fig.line_width(0.6);
      fig.line({xlo, xhi}, {0, 0});
      fig.dashed({xlo, xhi}, {3, 3});
      fig.dashed({xlo, xhi}, {-3, -3});
      std::vector<double> xin, yin, xout, yout;
      for (std::size_t i = 0; i < x.size(); ++i) {
        const double p = std::clamp(d.pull[row][i], -big, big);
        (std::fabs(d.pull[row][i]) > 3 ? xout : xin).push_back(x[i]);
        (std::fabs(d.pull[row][i]) > 3 ? yout : yin).push_back(p);
      }
      fig.colour(series(Series::measured), 0.8);
      fig.points(xin, yin, 0.9);
      fig.colour(series(Series::accent));
      fig.points(xout, yout, 1.3);
      fig.axes(row == 2 ? (col == 0 ? "Galactocentric azimuth #gq [deg]" : "R [kpc]") : "",
               col == 0 ? std::string("pull ") + names[row] + "#ds#u [#gs]" : "", row == 2,
               col == 0);
      if (col == 0) fig.note(0, moments(d.pull[row]), 0.85);
      std::size_t clipped = 0;
      for (double v : d.pull[row])
        clipped += std::fabs(v) > big ? 1 : 0;
      if (col == 1 && clipped > 0)
        fig.note(0,
                 std::to_string(clipped) + " beyond ±" + std::to_string(int(big)) +
                     "#gs drawn at the edge",
                 0.85, true);
    }
  }
  fig.panel({0.08, 0.5, bottom, top, 0, 1, 0, 1});
  fig.legend_above({{series(Series::measured), "measured source", 'p'},
                    {series(Series::accent), "|pull| > 3", 'p'},
                    {series(Series::band), "±1#gs", 'b'},
                    {series(Series::mute), "±3#gs", 'd'}});
}

} // namespace

FigureKind pulls_figure() {
  FigureKind k;
  k.name = "pulls";
  k.source = Source::run;
  k.summary = "each measured source's pull in U_s, V_s, W_s against the model's local "
              "prediction, against azimuth and radius, with 1 and 3 sigma marked";
  k.page = {180, 130, 300};
  k.available = [](const std::string& dir) {
    return std::filesystem::exists(dir + "/comparison.h5");
  };
  k.load = [](const std::string& dir, const DrawOptions&) {
    // the local table carries each source's R and psi beside its pulls
    const H5Input cmp(dir + "/comparison.h5", "pulls");
    const auto n = cmp.strings("local/name").size();
    Pulls d;
    d.R = cmp.doubles_n("local/R_kpc", n), d.psi = cmp.doubles_n("local/psi_deg", n);
    d.pull = {cmp.doubles_n("local/pull_U", n), cmp.doubles_n("local/pull_V", n),
              cmp.doubles_n("local/pull_W", n)};
    return std::function<void(Figure&)>([d](Figure& f) { draw(d, f); });
  };
  return k;
}

} // namespace undertow::plot

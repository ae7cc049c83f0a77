// The arm fit seen from the north Galactic pole: each segment's posterior-median logarithmic
// spiral across its azimuth window with the 68 % band of its posterior samples, the sources at
// their measured distances with their ±1σ reach along the line of sight, the Sun and the centre.
#include <algorithm>
#include <cmath>
#include <filesystem>
#include <numbers>

#include "markers.hpp"
#include "undertow/plot/catalogue.hpp"
#include "undertow/plot/colours.hpp"
#include "undertow/plot/inputs.hpp"
#include "undertow/plot/scales.hpp"

namespace undertow::plot {
namespace {

constexpr double kDeg = std::numbers::pi / 180;

struct Segment {
  std::string group;
  std::vector<double> x, y, lo_x, lo_y, hi_x, hi_y; // median line, band edges
  std::vector<double> sx, sy, nx, ny, fx, fy;       // sources: measured, near, far
};

struct ArmsPlot {
  double r0 = 8.1;
  std::vector<Segment> segments;
};

// Galactocentric x, y of (R, ψ) (docs/conventions.md: the Sun on the negative x axis).
std::pair<double, double> place(double R, double psi) {
  return {-R * std::cos(psi), R * std::sin(psi)};
}

Rgb segment_colour(std::size_t k) {
  static const Series order[] = {Series::measured, Series::simulated, Series::model,
                                 Series::accent,   Series::fit,       Series::mute};
  return series(order[k % std::size(order)]);
}

void draw(const ArmsPlot& d, Figure& fig) {
  double x0 = -d.r0, x1 = -d.r0, y0 = 0, y1 = 0;
  for (const auto& s : d.segments)
    for (const auto* v : {&s.sx, &s.nx, &s.fx, &s.x})
      for (double x : *v)
        if (std::isfinite(x)) x0 = std::min(x0, x), x1 = std::max(x1, x);
  for (const auto& s : d.segments)
    for (const auto* v : {&s.sy, &s.ny, &s.fy, &s.y})
      for (double y : *v)
        if (std::isfinite(y)) y0 = std::min(y0, y), y1 = std::max(y1, y);
  const double pad = 1.0;
  Panel p{0.13, 0.96, 0.1, 0.86, x0 - pad, x1 + pad, y0 - pad, y1 + pad};
  fig.equal_panel(p);
  std::vector<Figure::Key> keys;
  for (std::size_t k = 0; k < d.segments.size(); ++k) {
    const auto& s = d.segments[k];
    const Rgb c = segment_colour(k);
    // the band: the upper edge out, the lower edge back
    std::vector<double> bx = s.hi_x, by = s.hi_y;
    bx.insert(bx.end(), s.lo_x.rbegin(), s.lo_x.rend());
    by.insert(by.end(), s.lo_y.rbegin(), s.lo_y.rend());
    fig.colour(c, 0.25);
    fig.fill(bx, by);
    fig.colour(c);
    fig.line_width(1.0);
    fig.line(s.x, s.y);
    fig.line_width(0.5);
    fig.colour(c, 0.6);
    for (std::size_t i = 0; i < s.sx.size(); ++i)
      if (std::isfinite(s.nx[i]) && std::isfinite(s.fx[i]))
        fig.line({s.nx[i], s.fx[i]}, {s.ny[i], s.fy[i]});
    fig.colour(c);
    fig.points(s.sx, s.sy, 1.0);
    keys.push_back({c, s.group, 'l'});
  }
  centre_and_sun(fig, d.r0, 0.02 * (p.xmax - p.xmin));
  fig.axes("x [kpc]", "y [kpc]");
  fig.note(0, "median spiral, 68 % band", 0.85);
  fig.note(1, "bars: distance ±1#gs", 0.85);
  fig.legend_above(keys);
}

} // namespace

FigureKind arm_segments_figure() {
  FigureKind k;
  k.name = "arm-segments";
  k.source = Source::arms;
  k.summary = "the arm segments from the north Galactic pole: each fitted spiral with its 68 % "
              "band over its azimuth window, the sources with their distance errors";
  k.page = {100, 130, 300};
  k.available = [](const std::string& dir) { return std::filesystem::exists(dir + "/arms.h5"); };
  k.load = [](const std::string& dir, const DrawOptions&) {
    const H5Input in(dir + "/arms.h5", "arm-segments");
    ArmsPlot d;
    d.r0 = io::h5::get_attr_double(in.file(), io::h5::open_group(in.file(), "/").id(), "r0_kpc");
    const auto groups = in.strings("segments/group");
    const std::size_t ns = groups.size();
    const auto psi_ref = in.doubles_n("segments/psi_ref_deg", ns);
    const auto wlo = in.doubles_n("segments/window_min_deg", ns),
               whi = in.doubles_n("segments/window_max_deg", ns);
    const auto names = in.strings("sources/name"), of = in.strings("sources/group");
    const std::size_t nsrc = names.size();
    const auto sx = in.doubles_n("sources/x_kpc", nsrc), sy = in.doubles_n("sources/y_kpc", nsrc);
    const auto nx = in.doubles_n("sources/x_near_kpc", nsrc),
               ny = in.doubles_n("sources/y_near_kpc", nsrc);
    const auto fx = in.doubles_n("sources/x_far_kpc", nsrc),
               fy = in.doubles_n("sources/y_far_kpc", nsrc);
    for (std::size_t g = 0; g < ns; ++g) {
      Segment s;
      s.group = groups[g];
      std::size_t rows = 0;
      const auto samples = in.doubles("samples/" + s.group, 3, &rows);
      const std::size_t stride = std::max<std::size_t>(1, rows / 400);
      const int steps = 60;
      for (int j = 0; j <= steps; ++j) {
        const double psi = (wlo[g] + (whi[g] - wlo[g]) * j / steps) * kDeg;
        std::vector<double> R;
        for (std::size_t r = 0; r < rows; r += stride)
          R.push_back(std::exp(samples[3 * r + 1] -
                               (psi - psi_ref[g] * kDeg) * std::tan(samples[3 * r] * kDeg)));
        const auto [xm, ym] = place(quantile(R, 0.5), psi);
        const auto [xl, yl] = place(quantile(R, 0.16), psi);
        const auto [xh, yh] = place(quantile(R, 0.84), psi);
        s.x.push_back(xm), s.y.push_back(ym);
        s.lo_x.push_back(xl), s.lo_y.push_back(yl), s.hi_x.push_back(xh), s.hi_y.push_back(yh);
      }
      for (std::size_t i = 0; i < nsrc; ++i)
        if (of[i] == s.group) {
          s.sx.push_back(sx[i]), s.sy.push_back(sy[i]);
          s.nx.push_back(nx[i]), s.ny.push_back(ny[i]);
          s.fx.push_back(fx[i]), s.fy.push_back(fy[i]);
        }
      d.segments.push_back(std::move(s));
    }
    return [d](Figure& fig) { draw(d, fig); };
  };
  return k;
}

} // namespace undertow::plot

// Rotation curves. From a run: the model's circular speed, total and per component, the
// measured sources' rotation speeds Θ(R) = v_c(R) + V_s (the run's residuals are taken about the
// model's curve), and the resonance radii of each pattern. From a fit: the fitted curve with
// its 68 % and 95 % bands from the posterior samples, and the sources about it.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>

#include "run_input.hpp"
#include "undertow/dynamics/frequencies.hpp"
#include "undertow/dynamics/resonances.hpp"
#include "undertow/fit/report.hpp"
#include "undertow/plot/catalogue.hpp"
#include "undertow/plot/inputs.hpp"
#include "undertow/plot/scales.hpp"

namespace undertow::plot {
namespace {

struct Curve {
  std::string label;
  std::vector<double> v;
};
struct Marker {
  double R;
  std::string label;
};

struct RotationData {
  std::vector<double> R;                      // grid, kpc
  Curve total;                                // model or fit median
  std::vector<Curve> parts;                   // per component (run)
  std::vector<double> lo68, hi68, lo95, hi95; // bands (fit)
  std::vector<double> src_R, src_theta, src_lo, src_hi;
  std::vector<Marker> resonances;
  double r0 = 0;
  bool fit = false;
};

void draw(const RotationData& d, Figure& fig) {
  std::vector<std::vector<double>> ys{d.total.v, d.src_lo, d.src_hi};
  if (!d.fit) ys.push_back({0.0});
  for (const auto& p : d.parts)
    ys.push_back(p.v);
  auto [y0, y1] = range_of(ys, 0.04);
  if (!d.fit)
    y0 = std::max(0.0, y0); // a run's components start at zero
  else
    y0 = std::max(y0, quantile(d.src_lo, 0.01) - 10);
  y1 = std::min(y1, 1.35 * *std::max_element(d.total.v.begin(), d.total.v.end()) + 20);
  const double x1 = d.R.back();
  fig.panel({0.13, 0.97, 0.12, 0.86, 0, x1, y0, y1});
  if (d.fit) {
    std::vector<double> bx(d.R), by(d.lo95);
    bx.insert(bx.end(), d.R.rbegin(), d.R.rend());
    by.insert(by.end(), d.hi95.rbegin(), d.hi95.rend());
    fig.colour(series(Series::fit), 0.18);
    fig.fill(bx, by);
    by = d.lo68;
    by.insert(by.end(), d.hi68.rbegin(), d.hi68.rend());
    fig.colour(series(Series::fit), 0.35);
    fig.fill(bx, by);
  }
  // Resonances: thin vertical lines, labelled at the top.
  fig.text_scale(0.7);
  double last = -1e9;
  int stack = 0;
  for (const auto& m : d.resonances) {
    if (m.R <= 0 || m.R >= x1) continue;
    fig.colour(series(Series::accent));
    fig.line_width(0.5);
    fig.dashed({m.R, m.R}, {y0, y1});
    // Labels of radii closer than 3 % of the axis climb one above the other.
    stack = m.R - last < 0.03 * x1 ? stack + 1 : 0;
    last = m.R;
    fig.colour(kInk);
    fig.text(m.R + 0.008 * x1, y0 + (0.03 + 0.2 * stack) * (y1 - y0), m.label, 0, 90);
  }
  fig.text_scale(1.0);
  // The sources.
  fig.colour(series(Series::measured), 0.55);
  fig.line_width(0.4);
  fig.error_bars_y(d.src_R, d.src_lo, d.src_hi);
  fig.colour(series(Series::measured), 0.85);
  fig.points(d.src_R, d.src_theta, 0.8);
  // The curves.
  const Series part_colours[] = {Series::simulated, Series::band, Series::model, Series::mute};
  for (std::size_t i = 0; i < d.parts.size(); ++i) {
    fig.colour(series(part_colours[i % 4]));
    fig.line_width(0.8);
    fig.dashed(d.R, d.parts[i].v);
  }
  fig.colour(d.fit ? series(Series::fit) : kInk);
  fig.line_width(1.2);
  fig.line(d.R, d.total.v);
  fig.line_width(0.6);
  fig.colour(kInk);
  fig.line({d.r0, d.r0}, {y0, y0 + 0.025 * (y1 - y0)});
  fig.text_scale(0.8);
  fig.text(d.r0, y0 + 0.04 * (y1 - y0), "R#d0#u", 0.5);
  fig.text_scale(1.0);
  fig.axes("R [kpc]", "circular speed [km s#u-1#d]");
  std::vector<Figure::Key> keys{{d.fit ? series(Series::fit) : kInk, d.total.label, 'l'}};
  for (std::size_t i = 0; i < d.parts.size(); ++i)
    keys.push_back({series(part_colours[i % 4]), d.parts[i].label, 'd'});
  keys.push_back({series(Series::measured),
                  d.fit ? "sources: Θ(R) + V#ds#u" : "sources: v#dc#u + V#ds#u", 'p'});
  if (d.fit) keys.push_back({series(Series::fit), "68 %, 95 % bands", 'b'});
  if (!d.resonances.empty()) keys.push_back({series(Series::accent), "resonances", 'd'});
  fig.legend_above(keys);
}

std::vector<double> radius_grid(double top) {
  std::vector<double> R;
  for (int i = 1; i <= 240; ++i)
    R.push_back(top * i / 240.0);
  return R;
}

} // namespace

FigureKind rotation_curve_figure() {
  FigureKind k;
  k.name = "rotation";
  k.source = Source::run;
  k.summary = "the model's circular speed, total and per component, the measured sources' "
              "v_c + V_s, and each pattern's resonance radii";
  k.page = {88, 80, 300};
  k.available = [](const std::string& dir) {
    return std::filesystem::exists(dir + "/orbits.h5") &&
           std::filesystem::exists(dir + "/measured-residuals.h5");
  };
  k.load = [](const std::string& dir, const DrawOptions&) {
    const RunModel rm = read_run_model(dir, "rotation");
    const H5Input meas(dir + "/measured-residuals.h5", "rotation");
    RotationData d;
    d.r0 = rm.r0_kpc;
    const auto R = meas.doubles("sources/R_kpc");
    const auto V = meas.doubles_n("sources/V_kms", R.size()),
               Ve = meas.doubles_n("sources/V_err_kms", R.size());
    double top = 1.6 * rm.r0_kpc;
    for (double r : R)
      if (std::isfinite(r)) top = std::max(top, 1.1 * r);
    d.R = radius_grid(std::ceil(top));
    d.total.label = "model, total";
    for (double r : d.R)
      d.total.v.push_back(dynamics::circular_speed(rm.model, r));
    if (rm.model.components.size() > 1)
      for (std::size_t c = 0; c < rm.model.components.size(); ++c) {
        Curve part{rm.model.components[c].label, {}};
        for (double r : d.R)
          part.v.push_back(dynamics::circular_speed_component(rm.model, c, r));
        d.parts.push_back(part);
      }
    for (std::size_t i = 0; i < R.size(); ++i) {
      const double th = dynamics::circular_speed(rm.model, R[i]) + V[i];
      d.src_R.push_back(R[i]), d.src_theta.push_back(th);
      d.src_lo.push_back(th - Ve[i]), d.src_hi.push_back(th + Ve[i]);
    }
    const auto shorten = [](const std::string& n) {
      if (n == "corotation") return std::string("CR");
      if (n == "inner Lindblad") return std::string("ILR");
      if (n == "outer Lindblad") return std::string("OLR");
      if (n == "inner 4:1") return std::string("I4:1");
      if (n == "outer 4:1") return std::string("O4:1");
      return n;
    };
    for (const auto& p : rm.model.patterns)
      for (const auto& res :
           dynamics::resonances(rm.model, p.pattern_speed, p.arms(), 0.05, d.R.back()))
        for (double r : res.radii) {
          // Resonances that coincide (for four arms the inner Lindblad is the inner 4:1) share
          // one label.
          auto same = std::find_if(d.resonances.begin(), d.resonances.end(),
                                   [&](const Marker& m) { return std::fabs(m.R - r) < 1e-3; });
          if (same != d.resonances.end())
            same->label = shorten(res.name) + " " + p.label + " = " + same->label;
          else
            d.resonances.push_back({r, shorten(res.name) + " " + p.label});
        }
    std::sort(d.resonances.begin(), d.resonances.end(),
              [](const Marker& a, const Marker& b) { return a.R < b.R; });
    return std::function<void(Figure&)>([d](Figure& f) { draw(d, f); });
  };
  return k;
}

FigureKind fit_rotation_figure() {
  FigureKind k;
  k.name = "fit-rotation";
  k.source = Source::fit;
  k.summary = "the fitted rotation curve with its 68 % and 95 % bands and the sources' "
              "Θ(R) + V_s about it";
  k.page = {88, 75, 300};
  k.available = [](const std::string& dir) { return std::filesystem::exists(dir + "/fit.h5"); };
  k.load = [](const std::string& dir, const DrawOptions&) {
    const std::string path = dir + "/fit.h5";
    const H5Input in(path, "fit-rotation");
    const auto g = fit::read_galactic_parameters(path);
    const auto R = in.doubles("sources/R_kpc");
    const auto V = in.doubles_n("sources/V_s_kms", R.size()),
               Vlo = in.doubles_n("sources/V_s_lo_kms", R.size()),
               Vhi = in.doubles_n("sources/V_s_hi_kms", R.size());
    RotationData d;
    d.fit = true;
    d.r0 = g.median[std::size_t(fit::Param::r0)];
    double top = 1.6 * d.r0;
    for (double r : R)
      if (std::isfinite(r)) top = std::max(top, 1.1 * r);
    d.R = radius_grid(std::ceil(top));
    d.total.label = "fitted curve (median)";
    for (double r : d.R) {
      std::vector<double> th;
      for (const auto& s : g.samples)
        th.push_back(g.model.theta(r, s));
      d.total.v.push_back(quantile(th, 0.5));
      d.lo68.push_back(quantile(th, 0.16)), d.hi68.push_back(quantile(th, 0.84));
      d.lo95.push_back(quantile(th, 0.025)), d.hi95.push_back(quantile(th, 0.975));
    }
    for (std::size_t i = 0; i < R.size(); ++i) {
      const double c = g.model.theta(R[i], g.median);
      d.src_R.push_back(R[i]), d.src_theta.push_back(c + V[i]);
      d.src_lo.push_back(c + Vlo[i]), d.src_hi.push_back(c + Vhi[i]);
    }
    return std::function<void(Figure&)>([d](Figure& f) { draw(d, f); });
  };
  return k;
}

} // namespace undertow::plot

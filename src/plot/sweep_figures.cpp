// A gathered sweep: the likelihood over two swept parameters as a map (the profile over the
// others), with the regions Δ ln L = 1.15 and 3.09 below the best point (68.3 % and 95.4 % for
// two parameters, common practice: half the chi-square quantiles with 2 degrees of freedom), and
// one profile per parameter with its realisation error bars and the 1- and 2-sigma lines for one
// parameter (Δ ln L = 0.5 and 2).
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <map>

#include "undertow/error.hpp"
#include "undertow/plot/catalogue.hpp"
#include "undertow/plot/inputs.hpp"
#include "undertow/plot/labels.hpp"
#include "undertow/plot/scales.hpp"

namespace undertow::plot {
namespace {

struct SweepData {
  std::string file, statistic;
  std::vector<std::string> keys;           // numeric swept parameters
  std::vector<std::vector<double>> values; // per key, per point
  std::vector<double> lnl, err;            // per point: ln L (relative) and its error
  std::size_t best = 0;
  std::string noise_note;
};

// The one *-results.h5 of a gathered sweep's folder.
std::string results_file(const std::string& dir) {
  if (std::filesystem::is_regular_file(dir)) return dir;
  std::vector<std::string> found;
  if (std::filesystem::is_directory(dir))
    for (const auto& e : std::filesystem::directory_iterator(dir))
      if (e.path().filename().string().ends_with("-results.h5")) found.push_back(e.path().string());
  if (found.size() != 1)
    throw InputError(dir + ": " +
                     (found.empty() ? std::string("no *-results.h5 (run 'undertow sweep gather')")
                                    : "more than one *-results.h5; give the folder of one"));
  return found[0];
}

std::string short_key(const std::string& key) {
  const auto dot = key.rfind('.');
  return parameter_label(dot == std::string::npos ? key : key.substr(dot + 1));
}

SweepData read(const std::string& dir, const std::string& figure) {
  SweepData d;
  d.file = results_file(dir);
  const H5Input in(d.file, figure);
  d.statistic =
      in.has("statistics/delta_log_likelihood") ? "delta_log_likelihood" : "log_likelihood";
  const auto lnl = in.doubles("statistics/" + d.statistic);
  const auto scatter = in.doubles_n("statistics/log_likelihood_scatter", lnl.size());
  const auto k = in.doubles_n("statistics/realisations", lnl.size());
  std::vector<std::vector<double>> vals;
  for (const auto& key : io::h5::children(in.file(), "parameters")) {
    if (key == "replicate") continue;
    try {
      vals.push_back(in.doubles_n("parameters/" + key, lnl.size()));
      d.keys.push_back(key);
    } catch (const InputError&) { // a parameter that is not a number: not on an axis
    }
  }
  // The points with a result and every numeric parameter (the reference has none).
  std::vector<double> errs;
  d.values.resize(d.keys.size());
  for (std::size_t i = 0; i < lnl.size(); ++i) {
    bool ok = std::isfinite(lnl[i]);
    for (const auto& v : vals)
      ok = ok && std::isfinite(v[i]);
    if (!ok) continue;
    for (std::size_t p = 0; p < vals.size(); ++p)
      d.values[p].push_back(vals[p][i]);
    d.lnl.push_back(lnl[i]);
    const double e = k[i] > 1 ? scatter[i] / std::sqrt(k[i]) : NAN;
    d.err.push_back(e);
    if (std::isfinite(e)) errs.push_back(e);
  }
  if (d.lnl.empty() || d.keys.empty())
    throw InputError(d.file + ": no finished point with numeric swept values (figure '" + figure +
                     "' needs them)");
  d.best = std::size_t(std::max_element(d.lnl.begin(), d.lnl.end()) - d.lnl.begin());
  const double top = d.lnl[d.best];
  for (double& v : d.lnl)
    v -= top;
  if (!errs.empty()) {
    char buf[160];
    std::snprintf(buf, sizeof buf, "realisation noise of ln L: median %.2g per point",
                  quantile(errs, 0.5));
    d.noise_note = buf;
  }
  return d;
}

// The distinct values of a parameter, ascending, and each point's index among them.
std::vector<double> levels_of(const std::vector<double>& v) {
  std::vector<double> u(v);
  std::sort(u.begin(), u.end());
  u.erase(std::unique(u.begin(), u.end()), u.end());
  return u;
}
std::vector<double> edges_of(const std::vector<double>& u) {
  std::vector<double> e;
  if (u.size() == 1) { // one value: a cell of 10 % of it (or of 1 at 0)
    const double w = u[0] != 0 ? 0.05 * std::fabs(u[0]) : 0.5;
    return {u[0] - w, u[0] + w};
  }
  e.push_back(u[0] - 0.5 * (u[1] - u[0]));
  for (std::size_t i = 0; i + 1 < u.size(); ++i)
    e.push_back(0.5 * (u[i] + u[i + 1]));
  e.push_back(u.back() + 0.5 * (u.back() - u[u.size() - 2]));
  return e;
}

void draw_map(const SweepData& d, Figure& fig) {
  const auto& xv = d.values[0];
  const auto& yv = d.values[1];
  const auto xs = levels_of(xv), ys = levels_of(yv);
  const bool grid = xs.size() * ys.size() <= 4 * d.lnl.size(); // else scattered (hypercube)
  const bool contoured = grid && xs.size() >= 2 && ys.size() >= 2;
  const auto xe = edges_of(xs), ye = edges_of(ys);
  double lo = -10;
  for (double v : d.lnl)
    lo = std::min(lo, v);
  const bool clipped = lo < -30;
  lo = std::max(lo, -30.0);
  const auto [xa, xb] = grid ? std::pair{xe.front(), xe.back()} : range_of({xv}, 0.05);
  const auto [ya, yb] = grid ? std::pair{ye.front(), ye.back()} : range_of({yv}, 0.05);
  fig.panel({0.15, 0.8, 0.13, 0.86, xa, xb, ya, yb});
  if (grid) {
    // The profile over any further parameters: the largest ln L at each (x, y).
    std::vector<double> z(xs.size() * ys.size(), NAN);
    for (std::size_t i = 0; i < d.lnl.size(); ++i) {
      const std::size_t ix =
          std::size_t(std::lower_bound(xs.begin(), xs.end(), xv[i]) - xs.begin());
      const std::size_t iy =
          std::size_t(std::lower_bound(ys.begin(), ys.end(), yv[i]) - ys.begin());
      double& c = z[iy * xs.size() + ix];
      c = std::isfinite(c) ? std::max(c, d.lnl[i]) : d.lnl[i];
    }
    fig.cells(z, xe, ye, lo, 0);
    if (contoured) {
      // Cells without a result lie below every level, so no contour runs through them unseen.
      std::vector<double> zc(z);
      for (double& v : zc)
        if (!std::isfinite(v)) v = lo - 100;
      fig.colour(series(Series::measured));
      fig.line_width(1.2);
      fig.contours(zc, xs, ys, {-1.15});
      fig.line_width(0.7);
      fig.contours(zc, xs, ys, {-3.09});
    }
  } else {
    for (std::size_t i = 0; i < d.lnl.size(); ++i) {
      fig.colour(sequential((std::max(d.lnl[i], lo) - lo) / -lo));
      fig.points({xv[i]}, {yv[i]}, 1.6);
    }
  }
  fig.colour(series(Series::measured));
  fig.line_width(1.0);
  fig.points({xv[d.best]}, {yv[d.best]}, 2.2, false);
  fig.line_width(0.6);
  fig.axes(short_key(d.keys[0]), short_key(d.keys[1]));
  fig.colour_bar(lo, 0,
                 clipped ? "ln L − ln L#dbest#u (below −30: as −30)" : "ln L − ln L#dbest#u");
  std::vector<Figure::Key> keys{{series(Series::measured), "best point", 'o'}};
  if (contoured)
    keys.push_back({series(Series::measured), "Δ ln L = −1.15, −3.09 (68.3, 95.4 %)", 'l'});
  fig.legend_above(keys);
  if (!d.noise_note.empty()) fig.side_text("b", 5.2, 0, 0, d.noise_note);
}

void draw_profiles(const SweepData& d, Figure& fig) {
  const std::size_t n = d.keys.size();
  const double top = 0.9, bottom = 0.1, gap = std::min(0.1, 0.3 / double(n));
  const double h = (top - bottom - gap * double(n - 1)) / double(n);
  for (std::size_t p = 0; p < n; ++p) {
    const auto xs = levels_of(d.values[p]);
    std::vector<double> prof(xs.size(), -1e300), perr(xs.size(), NAN);
    for (std::size_t i = 0; i < d.lnl.size(); ++i) {
      const std::size_t k =
          std::size_t(std::lower_bound(xs.begin(), xs.end(), d.values[p][i]) - xs.begin());
      if (d.lnl[i] > prof[k]) prof[k] = d.lnl[i], perr[k] = d.err[i];
    }
    std::vector<double> lo(xs.size()), hi(xs.size());
    for (std::size_t k = 0; k < xs.size(); ++k)
      lo[k] = prof[k] - (std::isfinite(perr[k]) ? perr[k] : 0),
      hi[k] = prof[k] + (std::isfinite(perr[k]) ? perr[k] : 0);
    auto [ya, yb] = range_of({lo, hi, {0.0, -2.6}}, 0.08);
    const auto [xa, xb] = range_of({xs}, 0.06);
    const double y1 = top - double(p) * (h + gap);
    fig.panel({0.17, 0.96, y1 - h, y1, xa, xb, ya, yb});
    fig.colour(series(Series::mute));
    fig.dashed({xa, xb}, {-0.5, -0.5});
    fig.dashed({xa, xb}, {-2.0, -2.0});
    fig.colour(series(Series::simulated));
    fig.line_width(0.9);
    fig.line(xs, prof);
    fig.error_bars_y(xs, lo, hi);
    fig.points(xs, prof, 1.3);
    fig.line_width(0.6);
    fig.axes(short_key(d.keys[p]), "ln L − ln L#dbest#u");
  }
  fig.panel({0.17, 0.96, top - h, top, 0, 1, 0, 1});
  fig.legend_above({{series(Series::simulated), "profile (best over the others) ± noise", 'p'},
                    {series(Series::mute), "Δ ln L = −0.5, −2 (68.3, 95.4 %)", 'd'}});
}

bool is_sweep(const std::string& dir) {
  if (std::filesystem::is_regular_file(dir)) return dir.ends_with("-results.h5");
  if (!std::filesystem::is_directory(dir)) return false;
  for (const auto& e : std::filesystem::directory_iterator(dir))
    if (e.path().filename().string().ends_with("-results.h5")) return true;
  return false;
}

} // namespace

FigureKind sweep_map_figure() {
  FigureKind k;
  k.name = "sweep-map";
  k.source = Source::sweep;
  k.summary = "ln L over two swept parameters (the first two, or --axes; the best over any "
              "others), the 68.3 % and 95.4 % regions and the best point";
  k.page = {88, 80, 300};
  k.available = [](const std::string& dir) {
    if (!is_sweep(dir)) return false;
    try {
      return read(dir, "sweep-map").keys.size() >= 2;
    } catch (const InputError&) {
      return false;
    }
  };
  k.load = [](const std::string& dir, const DrawOptions& o) {
    SweepData d = read(dir, "sweep-map");
    if (d.keys.size() < 2)
      throw InputError(d.file + ": one numeric swept parameter; figure 'sweep-map' needs two "
                                "(see 'sweep-profiles')");
    if (!o.sweep_axes.empty()) {
      if (o.sweep_axes.size() != 2)
        throw InputError("--axes takes two swept parameters, got " +
                         std::to_string(o.sweep_axes.size()));
      // Each axis by its key path or the path's last part; the chosen pair goes first.
      std::vector<std::size_t> pick;
      for (const auto& want : o.sweep_axes) {
        std::size_t found = d.keys.size();
        std::string names;
        for (std::size_t i = 0; i < d.keys.size(); ++i) {
          const auto dot = d.keys[i].rfind('.');
          if (d.keys[i] == want || (dot != std::string::npos && d.keys[i].substr(dot + 1) == want))
            found = i;
          names += (names.empty() ? "" : ", ") + d.keys[i];
        }
        if (found == d.keys.size())
          throw InputError(d.file + ": '" + want + "' is not a numeric swept parameter (" + names +
                           ")");
        pick.push_back(found);
      }
      if (pick[0] == pick[1]) throw InputError("--axes names the same parameter twice");
      std::swap(d.keys[0], d.keys[pick[0]]), std::swap(d.values[0], d.values[pick[0]]);
      const std::size_t second = pick[1] == 0 ? pick[0] : pick[1];
      std::swap(d.keys[1], d.keys[second]), std::swap(d.values[1], d.values[second]);
    }
    return std::function<void(Figure&)>([d](Figure& f) { draw_map(d, f); });
  };
  return k;
}

FigureKind sweep_profiles_figure() {
  FigureKind k;
  k.name = "sweep-profiles";
  k.source = Source::sweep;
  k.summary = "for each swept parameter, the best ln L at each value with its realisation "
              "noise, and the 68.3 % and 95.4 % lines";
  k.page = {88, 110, 300};
  k.available = [](const std::string& dir) {
    if (!is_sweep(dir)) return false;
    try {
      return !read(dir, "sweep-profiles").keys.empty();
    } catch (const InputError&) {
      return false;
    }
  };
  k.load = [](const std::string& dir, const DrawOptions&) {
    const SweepData d = read(dir, "sweep-profiles");
    return std::function<void(Figure&)>([d](Figure& f) { draw_profiles(d, f); });
  };
  return k;
}

} // namespace undertow::plot

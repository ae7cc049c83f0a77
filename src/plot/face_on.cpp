// The survey seen from the north Galactic pole at the observation time: the spiral and bar
// patterns' density (contours of the arm crests), the simulated young sources as a density
// image, the measured sources' peculiar motions (U_s, V_s) as arrows with error ellipses, and
// beside it the model's predicted motions at the same places.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <map>
#include <numbers>

#include "run_input.hpp"
#include "undertow/error.hpp"
#include "markers.hpp"
#include "undertow/plot/catalogue.hpp"
#include "undertow/plot/inputs.hpp"
#include "undertow/plot/scales.hpp"

namespace undertow::plot {
namespace {

constexpr double kDeg = std::numbers::pi / 180;

struct FaceOn {
  double r0 = 8.1, time = 0;
  bool has_patterns = false;
  double x0 = 0, x1 = 1, y0 = 0, y1 = 1; // kpc
  int nx = 0, ny = 0;
  std::vector<double> sim_density; // young sources per kpc^2, smoothed
  std::vector<double> arms;        // the patterns' density at z = 0, Msun/pc^3
  std::vector<double> x, y, psi;   // measured sources
  std::vector<double> u, v, u_err, v_err, u_pred, v_pred;
};

// Galactocentric x, y of (R, psi) (docs/conventions.md: the Sun on the negative x axis).
std::pair<double, double> place(double R, double psi_deg) {
  return {-R * std::cos(psi_deg * kDeg), R * std::sin(psi_deg * kDeg)};
}
// (U_s, V_s) at azimuth psi as a Galactocentric (vx, vy): U toward the centre, V along rotation.
std::pair<double, double> motion(double U, double V, double psi_deg) {
  const double c = std::cos(psi_deg * kDeg), s = std::sin(psi_deg * kDeg);
  return {U * c + V * s, -U * s + V * c};
}

void draw_panel(const FaceOn& d, Figure& fig, const Panel& where, bool predicted, double scale,
                double ref_kms) {
  Panel p = where;
  p.xmin = d.x0, p.xmax = d.x1, p.ymin = d.y0, p.ymax = d.y1;
  fig.equal_panel(p);
  // The simulated young sources: darker where denser (square-root stretch).
  double top = 0;
  for (double z : d.sim_density)
    top = std::max(top, z);
  std::vector<double> img(d.sim_density.size());
  for (std::size_t i = 0; i < img.size(); ++i)
    img[i] = top > 0 ? 1 - 0.75 * std::sqrt(d.sim_density[i] / top) : 1;
  fig.image(img, d.nx, d.ny, 0, 1);
  // The arm crests: where the patterns' density is 85 % of its peak on the ring.
  fig.colour(series(Series::model), 0.9);
  fig.line_width(0.9);
  fig.contours(d.arms, d.nx, d.ny, {0.85});
  // Arrows and, on the measured side, error ellipses at their tips.
  fig.line_width(0.6);
  for (std::size_t i = 0; i < d.x.size(); ++i) {
    const double U = predicted ? d.u_pred[i] : d.u[i], V = predicted ? d.v_pred[i] : d.v[i];
    if (!std::isfinite(U) || !std::isfinite(V)) continue;
    const auto [vx, vy] = motion(U, V, d.psi[i]);
    fig.colour(predicted ? series(Series::simulated) : series(Series::measured));
    fig.arrow(d.x[i], d.y[i], vx * scale, vy * scale, 1.0);
    if (!predicted && std::isfinite(d.u_err[i]) && std::isfinite(d.v_err[i])) {
      fig.colour(series(Series::measured), 0.3);
      fig.line_width(0.4);
      // The ellipse's axes lie along U (toward the centre) and V: rotate by the U direction.
      const double ang = std::atan2(-std::sin(d.psi[i] * kDeg), std::cos(d.psi[i] * kDeg));
      fig.ellipse(d.x[i] + vx * scale, d.y[i] + vy * scale, d.u_err[i] * scale, d.v_err[i] * scale,
                  ang);
      fig.line_width(0.6);
    }
  }
  centre_and_sun(fig, d.r0, 0.25 * (d.x1 - d.x0) / 20);
  fig.axes("x [kpc]", predicted ? "" : "y [kpc]", true, !predicted);
  fig.note(0, predicted ? "model's prediction" : "measured", 1.0);
  // The scale arrow, bottom left.
  const double sx = d.x0 + 0.06 * (d.x1 - d.x0), sy = d.y0 + 0.06 * (d.y1 - d.y0);
  fig.colour(kInk);
  fig.arrow(sx, sy, ref_kms * scale, 0, 1.0);
  char lab[32];
  std::snprintf(lab, sizeof lab, "%g km/s", ref_kms);
  fig.text_scale(0.85);
  fig.text(sx, sy + 0.03 * (d.y1 - d.y0), lab, 0);
  fig.text_scale(1.0);
}

void draw(const FaceOn& d, Figure& fig) {
  // Arrows: the 90th percentile of the measured speeds as 7 % of the box.
  std::vector<double> speed;
  for (std::size_t i = 0; i < d.u.size(); ++i)
    speed.push_back(std::hypot(d.u[i], d.v[i]));
  const double s90 = std::max(1.0, quantile(speed, 0.9));
  const double scale = 0.07 * (d.x1 - d.x0) / s90;
  const double ref = round_step(s90);
  draw_panel(d, fig, {0.07, 0.49, 0.12, 0.9}, false, scale, ref);
  draw_panel(d, fig, {0.55, 0.97, 0.12, 0.9}, true, scale, ref);
  fig.panel({0.07, 0.97, 0.12, 0.9, 0, 1, 0, 1});
  char t[64];
  std::snprintf(t, sizeof t, "t = %g Myr", d.time);
  std::vector<Figure::Key> keys{
      {series(Series::measured), "measured U#ds#u, V#ds#u and 1#gs ellipse", 'l'},
      {series(Series::simulated), "model at the same places", 'l'}};
  if (d.has_patterns)
    keys.push_back({series(Series::model),
                    "arm crests: 85 % of the ring's peak density (" + std::string(t) + ")", 'l'});
  keys.push_back({sequential(0.35), "simulated young sources", 'b'});
  fig.legend_above(keys);
}

} // namespace

FigureKind face_on_figure() {
  FigureKind k;
  k.name = "face-on";
  k.source = Source::run;
  k.summary = "the survey from the north Galactic pole: arm crests, simulated young sources, "
              "measured U_s, V_s arrows with error ellipses, and the model's arrows beside it";
  k.page = {180, 100, 300};
  k.available = [](const std::string& dir) {
    for (const char* f :
         {"orbits.h5", "measured-residuals.h5", "mock-residuals.h5", "comparison.h5"})
      if (!std::filesystem::exists(dir + "/" + f)) return false;
    return true;
  };
  k.load = [](const std::string& dir, const DrawOptions&) {
    const RunModel rm = read_run_model(dir, "face-on");
    const H5Input meas(dir + "/measured-residuals.h5", "face-on");
    const H5Input sim(dir + "/mock-residuals.h5", "face-on");
    const H5Input cmp(dir + "/comparison.h5", "face-on");
    FaceOn d;
    d.r0 = rm.r0_kpc, d.time = rm.time_myr;
    d.has_patterns = !rm.model.patterns.empty();
    const auto names = meas.strings("sources/name");
    const std::size_t n = names.size();
    const auto R = meas.doubles_n("sources/R_kpc", n), psi = meas.doubles_n("sources/psi_deg", n);
    const auto U = meas.doubles_n("sources/U_kms", n), V = meas.doubles_n("sources/V_kms", n);
    const auto Ue = meas.doubles_n("sources/U_err_kms", n),
               Ve = meas.doubles_n("sources/V_err_kms", n);
    std::map<std::string, std::size_t> local;
    const auto lname = cmp.strings("local/name");
    const auto up = cmp.doubles_n("local/U_pred_kms", lname.size()),
               vp = cmp.doubles_n("local/V_pred_kms", lname.size());
    for (std::size_t i = 0; i < lname.size(); ++i)
      local[lname[i]] = i;
    std::vector<double> all_x{0, -d.r0}, all_y{0, 0};
    for (std::size_t i = 0; i < names.size(); ++i) {
      const auto [x, y] = place(R[i], psi[i]);
      d.x.push_back(x), d.y.push_back(y), d.psi.push_back(psi[i]);
      d.u.push_back(U[i]), d.v.push_back(V[i]), d.u_err.push_back(Ue[i]), d.v_err.push_back(Ve[i]);
      const auto it = local.find(names[i]);
      d.u_pred.push_back(it == local.end() ? NAN : up[it->second]);
      d.v_pred.push_back(it == local.end() ? NAN : vp[it->second]);
      all_x.push_back(x), all_y.push_back(y);
    }
    const auto sR = sim.doubles("sources/R_kpc");
    const auto spsi = sim.doubles_n("sources/psi_deg", sR.size());
    std::vector<double> sx, sy;
    for (std::size_t i = 0; i < sR.size(); ++i) {
      const auto [x, y] = place(sR[i], spsi[i]);
      sx.push_back(x), sy.push_back(y);
    }
    // A square box around the centre, the Sun and every source, 1 kpc to spare.
    const auto [xa, xb] = range_of({all_x, sx}, 0);
    const auto [ya, yb] = range_of({all_y, sy}, 0);
    const double half = 0.5 * std::max(xb - xa, yb - ya) + 1.0;
    const double cx = 0.5 * (xa + xb), cy = 0.5 * (ya + yb);
    d.x0 = cx - half, d.x1 = cx + half, d.y0 = cy - half, d.y1 = cy + half;
    d.nx = d.ny = 150;
    const double cell = (d.x1 - d.x0) / d.nx;
    // The simulated sources on the grid, smoothed with a Gaussian of 0.3 kpc (common practice
    // for a density map: a few cells, well below the arm spacing).
    std::vector<double> counts(std::size_t(d.nx * d.ny), 0.0);
    for (std::size_t i = 0; i < sx.size(); ++i) {
      const double fx = std::floor((sx[i] - d.x0) / cell), fy = std::floor((sy[i] - d.y0) / cell);
      if (!(fx >= 0 && fx < d.nx && fy >= 0 && fy < d.ny)) continue; // NaN fails too
      counts[std::size_t(fy) * std::size_t(d.nx) + std::size_t(fx)] += 1;
    }
    const double sig = 0.3 / cell;
    const int reach = int(std::ceil(3 * sig));
    std::vector<double> kern(std::size_t(2 * reach + 1));
    for (int j = -reach; j <= reach; ++j)
      kern[std::size_t(j + reach)] = std::exp(-0.5 * j * j / (sig * sig));
    std::vector<double> tmp(counts.size(), 0.0);
    d.sim_density.assign(counts.size(), 0.0);
    for (int iy = 0; iy < d.ny; ++iy)
      for (int ix = 0; ix < d.nx; ++ix)
        for (int j = -reach; j <= reach; ++j)
          if (ix + j >= 0 && ix + j < d.nx)
            tmp[std::size_t(iy * d.nx + ix)] +=
                kern[std::size_t(j + reach)] * counts[std::size_t(iy * d.nx + ix + j)];
    for (int iy = 0; iy < d.ny; ++iy)
      for (int ix = 0; ix < d.nx; ++ix)
        for (int j = -reach; j <= reach; ++j)
          if (iy + j >= 0 && iy + j < d.ny)
            d.sim_density[std::size_t(iy * d.nx + ix)] +=
                kern[std::size_t(j + reach)] * tmp[std::size_t((iy + j) * d.nx + ix)];
    // The patterns' density in the mid-plane at the cell centres, relative to its largest
    // value on the same ring: the crests show at every radius, not only where the arms are
    // strongest.
    const auto rho = [&](double x, double y) {
      double v = 0;
      for (std::size_t p = 0; p < rm.model.patterns.size(); ++p)
        v += rm.model.pattern_density(p, {x, y, 0}, d.time);
      return v;
    };
    const double r_top = std::hypot(std::max(std::fabs(d.x0), std::fabs(d.x1)),
                                    std::max(std::fabs(d.y0), std::fabs(d.y1)));
    constexpr int kRings = 160, kAzimuths = 96;
    std::vector<double> envelope(kRings + 1, 0.0);
    for (int i = 0; i <= kRings && !rm.model.patterns.empty(); ++i) {
      const double R = r_top * i / kRings;
      for (int j = 0; j < kAzimuths; ++j) {
        const double a = 2 * std::numbers::pi * j / kAzimuths;
        envelope[std::size_t(i)] =
            std::max(envelope[std::size_t(i)], rho(R * std::cos(a), R * std::sin(a)));
      }
    }
    d.arms.assign(counts.size(), 0.0);
    for (int iy = 0; iy < d.ny && !rm.model.patterns.empty(); ++iy)
      for (int ix = 0; ix < d.nx; ++ix) {
        const double x = d.x0 + (ix + 0.5) * cell, y = d.y0 + (iy + 0.5) * cell;
        const double f = std::hypot(x, y) / r_top * kRings;
        const int i = std::min(kRings - 1, int(f));
        const double env = envelope[std::size_t(i)] +
                           (f - i) * (envelope[std::size_t(i + 1)] - envelope[std::size_t(i)]);
        d.arms[std::size_t(iy * d.nx + ix)] = env > 0 ? rho(x, y) / env : 0;
      }
    return std::function<void(Figure&)>([d](Figure& f) { draw(d, f); });
  };
  return k;
}

} // namespace undertow::plot

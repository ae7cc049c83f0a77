#include "undertow/run/arm_crossing.hpp"

#include <cmath>
#include <sstream>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/error.hpp"
#include "undertow/run/lag_by_age.hpp"
#include "undertow/units.hpp"

namespace undertow::run {

namespace {

void velocity_drop(CrossingBins& b) {
  std::size_t hi = 0, lo = 0;
  for (std::size_t i = 0; i < b.across.size(); ++i) {
    if (!std::isfinite(b.across[i])) continue;
    if (!std::isfinite(b.across[hi]) || b.across[i] > b.across[hi]) hi = i;
    if (!std::isfinite(b.across[lo]) || b.across[i] < b.across[lo]) lo = i;
  }
  b.drop = b.across[hi] - b.across[lo];
  b.drop_err = std::hypot(b.across_err[hi], b.across_err[lo]);
}

std::vector<double> even_edges(double spacing, int bins) {
  std::vector<double> e(bins + 1);
  for (int i = 0; i <= bins; ++i)
    e[i] = spacing * (double(i) / bins - 0.5);
  return e;
}

} // namespace

CrossingBins cloud_bins(const io::Snapshot& s, const potential::Model& m,
                        const gas::ShockProblem& p, double half_width_kpc, int bins,
                        double& dispersion, std::size_t& used) {
  if (bins < 2) throw InputError("arm crossing: at least 2 bins across an arm spacing");
  if (!(half_width_kpc > 0)) throw InputError("arm crossing: the ring's width must be positive");
  const ArmCrests crests(m, s.time_myr);
  if (crests.empty()) throw InputError("arm crossing: the model has no spiral arms");
  const double sp = std::sin(p.pitch_deg * units::deg), cp = std::cos(p.pitch_deg * units::deg);
  CrossingBins b;
  b.edges = even_edges(p.spacing, bins);
  std::vector<std::vector<double>> across(bins), vs(bins);
  const auto& t = s.tracers;
  used = 0;
  for (std::size_t i = 0; i < t.size(); ++i) {
    if (!s.flags.empty() && (s.flags[i] & (io::kFlagStar | io::kFlagOutsideRange))) continue;
    const double R = std::hypot(t.x[i], t.y[i]);
    if (std::fabs(R - p.radius) >= half_width_kpc) continue;
    const double f = crests.phase(t.x[i], t.y[i]);
    if (!std::isfinite(f)) continue;
    // Rotation is clockwise seen from the north pole: e_psi = (y, -x) / R.
    const double vr = (t.x[i] * t.vx[i] + t.y[i] * t.vy[i]) / R;
    const double dvpsi = (t.y[i] * t.vx[i] - t.x[i] * t.vy[i]) / R - dynamics::circular_speed(m, R);
    const int k = std::min(bins - 1, std::max(0, int(std::floor((f + 0.5) * bins))));
    across[k].push_back(p.u0 + vr * cp + dvpsi * sp);
    vs[k].push_back(dvpsi);
    ++used;
  }
  double ss = 0;
  std::size_t dof = 0;
  for (int k = 0; k < bins; ++k) {
    const auto n = double(across[k].size());
    b.count.push_back(n);
    double mu = 0, mv = 0;
    for (std::size_t j = 0; j < across[k].size(); ++j)
      mu += across[k][j] / n, mv += vs[k][j] / n;
    double su = 0, sv = 0;
    for (std::size_t j = 0; j < across[k].size(); ++j) {
      su += (across[k][j] - mu) * (across[k][j] - mu);
      sv += (vs[k][j] - mv) * (vs[k][j] - mv);
    }
    ss += su;
    dof += across[k].size() > 0 ? across[k].size() - 1 : 0;
    const bool ok = n >= 3;
    b.across.push_back(ok ? mu : NAN);
    b.vs.push_back(ok ? mv : NAN);
    b.across_err.push_back(ok ? std::sqrt(su / (n - 1) / n) : NAN);
    b.vs_err.push_back(ok ? std::sqrt(sv / (n - 1) / n) : NAN);
  }
  if (used < std::size_t(3 * bins))
    throw InputError("arm crossing: only " + std::to_string(used) + " clouds in the ring at " +
                     io::format_number(p.radius, 4) + " kpc; widen it or use more clouds");
  const double mean = double(used) / bins;
  for (double c : b.count)
    b.density.push_back(c / mean);
  dispersion = dof > 0 ? std::sqrt(ss / double(dof)) : NAN;
  velocity_drop(b);
  return b;
}

CrossingBins steady_bins(const gas::ShockProblem& p, const gas::ShockProfile& f,
                         const std::vector<double>& edges) {
  CrossingBins b;
  b.edges = edges;
  const std::size_t bins = edges.size() - 1;
  std::vector<double> w(bins, 0), su(bins, 0), sv(bins, 0), n(bins, 0);
  for (std::size_t i = 0; i < f.x.size(); ++i) {
    const double x = std::remainder(f.x[i], p.spacing);
    std::size_t k = 0;
    while (k + 1 < bins && x >= edges[k + 1])
      ++k;
    w[k] += f.density[i];
    su[k] += f.density[i] * f.u[i];
    sv[k] += f.density[i] * gas::profile_along_rotation(p, f, i);
    n[k] += 1;
  }
  double total = 0, nodes = 0;
  for (std::size_t k = 0; k < bins; ++k)
    total += w[k], nodes += n[k];
  for (std::size_t k = 0; k < bins; ++k) {
    b.count.push_back(0);
    b.density.push_back(n[k] > 0 ? (w[k] / n[k]) / (total / nodes) : NAN);
    b.across.push_back(su[k] / w[k]);
    b.vs.push_back(sv[k] / w[k]);
    b.across_err.push_back(0);
    b.vs_err.push_back(0);
  }
  velocity_drop(b);
  return b;
}

CloudCrossing compare_crossing(const io::Snapshot& s, const potential::Model& m,
                               const gas::ShockProblem& p, const gas::ShockProfile& f,
                               double half_width_kpc, int bins) {
  CloudCrossing c;
  c.time_myr = s.time_myr;
  c.clouds = cloud_bins(s, m, p, half_width_kpc, bins, c.dispersion, c.used);
  c.steady = steady_bins(p, f, c.clouds.edges);
  return c;
}

io::Table crossing_table(const gas::ShockProblem& p, const CloudCrossing& c) {
  io::Table t;
  t.title = "Clouds across the arms at R = " + io::format_number(p.radius, 4) +
            " kpc against the steady isothermal flow";
  t.columns = {{"x_min_kpc", "x_{min}", "x_min", "kpc", 5},
               {"x_max_kpc", "x_{max}", "x_max", "kpc", 5},
               {"clouds", "N", "N", "", 6},
               {"density_clouds", "\\Sigma/\\bar\\Sigma", "Σ/⟨Σ⟩", "", 4},
               {"density_steady", "\\Sigma_{st}/\\bar\\Sigma", "Σ_st/⟨Σ⟩", "", 4},
               {"u_across_clouds_kms", "u_\\perp", "u⊥", "km/s", 4},
               {"u_across_err_kms", "\\sigma(u_\\perp)", "σ(u⊥)", "km/s", 2},
               {"u_across_steady_kms", "u_{\\perp,st}", "u⊥,st", "km/s", 4},
               {"V_s_clouds_kms", "V_s", "V_s", "km/s", 4},
               {"V_s_err_kms", "\\sigma(V_s)", "σ(V_s)", "km/s", 2},
               {"V_s_steady_kms", "V_{s,st}", "V_s,st", "km/s", 4}};
  for (std::size_t k = 0; k + 1 < c.clouds.edges.size(); ++k)
    t.add_row({c.clouds.edges[k], c.clouds.edges[k + 1], c.clouds.count[k], c.clouds.density[k],
               c.steady.density[k], c.clouds.across[k], c.clouds.across_err[k], c.steady.across[k],
               c.clouds.vs[k], c.clouds.vs_err[k], c.steady.vs[k]});
  t.notes.push_back("x across the arms from the potential trough, positive ahead in the sense "
                    "of rotation; cloud means with their standard errors; the steady flow's "
                    "means weighted by its density");
  return t;
}

std::string describe_crossing(const gas::ShockProblem& p, const CloudCrossing& c) {
  std::ostringstream o;
  const auto num = [](double v, int d = 3) { return io::format_number(v, d); };
  o << "clouds at " << num(c.time_myr, 4) << " Myr: " << c.used << " in the ring, dispersion of "
    << "the speed across the arms " << num(c.dispersion) << " km/s (the steady flow's sound speed "
    << num(p.sound_speed) << " km/s)\n"
    << "  velocity drop across the arm: clouds " << num(c.clouds.drop) << " +- "
    << num(c.clouds.drop_err, 2) << " km/s, steady flow " << num(c.steady.drop)
    << " km/s (both over the same " << c.clouds.count.size() << " bins)\n"
    << "  the steady flow is one-dimensional, steady and a fluid; the clouds are none of these: "
       "expect agreement in the shape and the place of the arm's compression, not in every bin\n";
  return o.str();
}

} // namespace undertow::run

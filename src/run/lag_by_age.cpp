#include "undertow/run/lag_by_age.hpp"

#include <algorithm>
#include <cmath>
#include <functional>
#include <map>
#include <variant>

#include "undertow/residuals/summary.hpp"
#include "undertow/units.hpp"

namespace undertow::run {

ArmCrests::ArmCrests(const potential::Model& m, double t_myr, double r_max_kpc) {
  std::vector<std::size_t> spirals;
  for (std::size_t q = 0; q < m.patterns.size(); ++q)
    if (!std::holds_alternative<potential::DehnenBar>(m.patterns[q].shape)) spirals.push_back(q);
  const std::size_t rings = std::size_t(r_max_kpc / dr_), n = 720;
  crests_.resize(rings);
  if (spirals.empty()) return;
  std::vector<double> phi(n);
  for (std::size_t k = 0; k < rings; ++k) {
    const double R = (double(k) + 0.5) * dr_;
    for (std::size_t j = 0; j < n; ++j) {
      const double a = 2 * units::pi * double(j) / double(n);
      phi[j] = 0;
      for (std::size_t q : spirals)
        phi[j] += m.pattern_potential(q, {R * std::cos(a), R * std::sin(a), 0}, t_myr);
    }
    for (std::size_t j = 0; j < n; ++j) {
      const double l = phi[(j + n - 1) % n], c = phi[j], r = phi[(j + 1) % n];
      if (!(c < l && c <= r)) continue;
      const double curv = l - 2 * c + r; // parabola through the three: its vertex
      const double shift = curv > 0 ? 0.5 * (l - r) / curv : 0.0;
      crests_[k].push_back(2 * units::pi * (double(j) + shift) / double(n));
      empty_ = false;
    }
  }
}

double ArmCrests::phase(double x, double y) const {
  const std::size_t k = std::size_t(std::hypot(x, y) / dr_);
  if (k >= crests_.size() || crests_[k].empty()) return NAN;
  const double a = std::atan2(y, x), spacing = 2 * units::pi / double(crests_[k].size());
  double best = INFINITY;
  for (double c : crests_[k]) {
    // ahead in rotation (clockwise seen from +z) is the smaller azimuth: c - a > 0
    double d = std::remainder(c - a, 2 * units::pi);
    if (std::fabs(d) < std::fabs(best)) best = d;
  }
  const double f = best / spacing;
  return f >= 0.5 ? f - 1 : f;
}

namespace {

struct Binned {
  std::vector<double> u, v;
};

void add_rows(io::Table& t, const std::vector<double>& edges, const std::vector<Binned>& sim,
              const std::vector<Binned>& mock, int bootstrap, std::uint64_t seed) {
  for (std::size_t b = 0; b + 1 < edges.size(); ++b) {
    std::vector<double> row{edges[b], edges[b + 1]};
    for (const auto* set : {&sim, &mock}) {
      const Binned& x = (*set)[b];
      row.push_back(double(x.u.size()));
      if (x.u.size() < 3) {
        row.insert(row.end(), 6, NAN);
        continue;
      }
      const auto mu = residuals::bootstrap_moments(x.u, bootstrap, seed, 2 * b);
      const auto mv = residuals::bootstrap_moments(x.v, bootstrap, seed, 2 * b + 1);
      row.insert(row.end(),
                 {mu.mean, mu.mean_err, mv.mean, mv.mean_err, mu.dispersion, mv.dispersion});
    }
    t.add_row(row);
  }
}

io::Table empty_table(const std::string& title, const std::string& what, const std::string& unit) {
  io::Table t;
  t.title = title;
  t.columns = {{what + "_lo" + unit, what + "_{\\rm lo}", what + " lo", "", 6},
               {what + "_hi" + unit, what + "_{\\rm hi}", what + " hi", "", 6}};
  for (const std::string src : {"sim", "mock"})
    for (const auto& c : std::vector<io::Column>{
             {"n_" + src, "N_{\\rm " + src + "}", "N " + src, "", 6},
             {"mean_u_" + src + "_kms", "\\bar U_s", "mean U_s " + src, "km/s", 4},
             {"mean_u_" + src + "_err_kms", "\\sigma_{\\bar U}", "err", "km/s", 2},
             {"mean_v_" + src + "_kms", "\\bar V_s", "mean V_s " + src, "km/s", 4},
             {"mean_v_" + src + "_err_kms", "\\sigma_{\\bar V}", "err", "km/s", 2},
             {"sigma_u_" + src + "_kms", "\\sigma_U", "sigma U " + src, "km/s", 3},
             {"sigma_v_" + src + "_kms", "\\sigma_V", "sigma V " + src, "km/s", 3}})
      t.columns.push_back(c);
  return t;
}

} // namespace

LagTables lag_by_age(const io::Snapshot& snap, const potential::Model& m,
                     const observe::ObservationSettings& obs, const residuals::ResidualSettings& rs,
                     std::array<double, 2> young, int bootstrap, std::uint64_t seed) {
  const auto& t = snap.tracers;
  const std::size_t n = t.size();
  const std::vector<double> age_edges{0, 2, 5, 10, 20, 50, 100};
  std::vector<double> phase_edges;
  for (int k = 0; k <= 10; ++k)
    phase_edges.push_back(-0.5 + 0.1 * k);
  const ArmCrests crests(m, snap.time_myr);
  const auto bin_of = [](const std::vector<double>& e, double x) -> long {
    if (!(x >= e.front() && x < e.back())) return -1;
    return long(std::upper_bound(e.begin(), e.end(), x) - e.begin()) - 1;
  };
  std::vector<double> age(n, NAN), phase(n, NAN);
  for (std::size_t i = 0; i < n; ++i)
    if (snap.flags[i] & io::kFlagStar) {
      age[i] = snap.time_myr - snap.birth_time_myr[i];
      if (!crests.empty()) phase[i] = crests.phase(t.x[i], t.y[i]);
    }
  const auto is_young = [&](std::size_t i) { return age[i] >= young[0] && age[i] <= young[1]; };

  // the stars themselves, inside the survey's volume
  std::vector<Binned> sim_age(age_edges.size() - 1), sim_phase(phase_edges.size() - 1);
  for (std::size_t i = 0; i < n; ++i) {
    if (!(age[i] >= 0)) continue;
    sky::Observed o;
    double d;
    if (!observe::in_survey_volume(t, i, obs, o, d)) continue;
    const auto uvw = residuals::peculiar_motion(o, d, rs);
    if (const long b = bin_of(age_edges, age[i]); b >= 0)
      sim_age[std::size_t(b)].u.push_back(uvw[0]), sim_age[std::size_t(b)].v.push_back(uvw[1]);
    if (const long b = bin_of(phase_edges, phase[i]); b >= 0 && is_young(i))
      sim_phase[std::size_t(b)].u.push_back(uvw[0]), sim_phase[std::size_t(b)].v.push_back(uvw[1]);
  }
  // through the mock survey: one observation per age bin, and the young window's for the phases
  std::map<std::uint64_t, std::size_t> index;
  for (std::size_t i = 0; i < n; ++i)
    index[t.id[i]] = i;
  const auto survey = [&](const std::vector<double>& w, const std::vector<double>& edges,
                          const std::function<double(std::size_t)>& key,
                          std::vector<Binned>& into) {
    if (std::none_of(w.begin(), w.end(), [](double x) { return x > 0; })) return;
    const auto mock = observe::observe(snap, w, obs);
    const auto res = residuals::compute_residuals(mock.catalog, rs);
    for (const auto& src : res.sources) {
      const auto it = index.find(std::stoull(src.name.substr(1))); // names are T<id>
      if (it == index.end()) continue;
      if (const long b = bin_of(edges, key(it->second)); b >= 0)
        into[std::size_t(b)].u.push_back(src.uvw[0]), into[std::size_t(b)].v.push_back(src.uvw[1]);
    }
  };
  std::vector<Binned> mock_age(age_edges.size() - 1), mock_phase(phase_edges.size() - 1);
  for (std::size_t b = 0; b + 1 < age_edges.size(); ++b) {
    std::vector<double> w(n, 0.0);
    for (std::size_t i = 0; i < n; ++i)
      if (age[i] >= age_edges[b] && age[i] < age_edges[b + 1]) w[i] = 1;
    survey(
        w, age_edges, [&](std::size_t i) { return age[i]; }, mock_age);
  }
  if (!crests.empty()) {
    std::vector<double> w(n, 0.0);
    for (std::size_t i = 0; i < n; ++i)
      if (is_young(i)) w[i] = 1;
    survey(
        w, phase_edges, [&](std::size_t i) { return phase[i]; }, mock_phase);
  }

  LagTables out;
  out.by_age = empty_table("Young stars' mean peculiar motion by age: the stars themselves "
                           "(sim) and through the mock survey (mock)",
                           "age", "_myr");
  for (std::size_t c = 0; c < 2; ++c)
    out.by_age.columns[c].unit = "Myr";
  add_rows(out.by_age, age_edges, sim_age, mock_age, bootstrap, seed);
  out.by_age.notes.push_back(
      "stars formed in cloud collisions, at t = " + io::format_number(snap.time_myr, 6) +
      " Myr; sim: true positions and velocities inside the survey's volume; mock: one mock "
      "survey per age bin (its selection, errors and distance treatment); U_s toward the "
      "Galactic centre, V_s in the sense of rotation, about the residuals' rotation curve; "
      "errors of the means by bootstrap");
  out.by_phase = empty_table("Young stars' mean peculiar motion by arm phase", "phase", "");
  if (!crests.empty()) {
    add_rows(out.by_phase, phase_edges, sim_phase, mock_phase, bootstrap, seed + 1);
    out.by_phase.notes.push_back(
        "stars " + io::format_number(young[0], 4) + " to " + io::format_number(young[1], 4) +
        " Myr old; phase: azimuthal offset from the nearest arm crest (minimum of the spiral "
        "patterns' potential on the star's ring) in units of the arm spacing, positive ahead of "
        "the crest in the sense of rotation; inside corotation the flow overtakes the arms, so "
        "it crosses from negative to positive phase");
  }
  return out;
}

} // namespace undertow::run

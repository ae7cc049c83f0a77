#include "undertow/run/whole_run.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <iostream>
#include <map>
#include <optional>
#include <sstream>

#include "undertow/compare/global.hpp"
#include "undertow/compare/local.hpp"
#include "undertow/compare/realisations.hpp"
#include "undertow/compare/verdict.hpp"
#include "undertow/dynamics/frequencies.hpp"
#include "undertow/error.hpp"
#include "undertow/fit/measured_sources.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/digest.hpp"
#include "undertow/io/table_hdf5.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/observe/prepare.hpp"
#include "undertow/residuals/report.hpp"
#include "undertow/run/ensemble.hpp"
#include "undertow/run/lag_by_age.hpp"

namespace undertow::run {
namespace {

namespace fs = std::filesystem;

// The key a finished stage left beside its output, if any.
std::optional<std::string> stored_key(const fs::path& key_file) {
  if (!fs::exists(key_file)) return std::nullopt;
  return io::read_file_bytes(key_file.string());
}

void write_text(const fs::path& p, const std::string& text) {
  io::write_text_file(p.string(), text);
}

bool reusable(const std::optional<std::string>& stored, const std::string& key,
              const fs::path& output, bool force) {
  return !force && fs::exists(output) && stored && *stored == key;
}

residuals::ResidualSettings residual_settings(const scenario::Scenario& s) {
  const auto& c = *s.comparison;
  residuals::ResidualSettings r;
  r.sun = s.observation->settings.sun;
  r.lsr = s.observation->settings.lsr;
  r.rotation.kind = residuals::RotationCurve::Kind::model;
  const potential::Model* m = &s.model;
  r.rotation.model = [m](double R) { return dynamics::circular_speed(*m, R); };
  r.distance = c.distance;
  r.edsd_length_kpc = c.edsd_length_kpc;
  r.prior = c.prior;
  r.parallax_snr_min = c.parallax_snr_min;
  r.draws = c.draws;
  r.seed = c.seed;
  return r;
}

// The mock survey's selection and errors and the measured catalog's treatment, every digit.
std::string selection_description(const scenario::Scenario& s) {
  const auto& x = s.observation->settings.selection;
  const auto& e = s.observation->settings.errors;
  const auto& c = *s.comparison;
  std::ostringstream d;
  d.precision(15);
  d << "distance " << x.distance_min_kpc << "-" << x.distance_max_kpc
    << " kpc, |b| <= " << x.latitude_max_deg << " deg, dec " << x.dec_min_deg << " to "
    << x.dec_max_deg << " deg, parallax S/N >= " << x.parallax_snr_min << ", parallax "
    << x.parallax_min_mas << " to " << x.parallax_max_mas << " mas, at most " << x.max_sources
    << " sources; errors " << int(e.kind) << " (" << e.parallax_mas << " mas, "
    << e.parallax_fraction << ", " << e.pm_masyr << " mas/yr, " << e.vlsr_kms
    << " km/s); measured: distance " << int(c.distance) << ", S/N >= " << c.parallax_snr_min;
  for (const auto& [ours, theirs] : c.catalog_columns)
    d << ", column " << ours << " = " << theirs;
  return d.str();
}

// The verdict's own settings, every digit: runs whose verdicts 'versus' sets side by side must
// share them, or their ln L measure different things.
std::string verdict_description(const scenario::Scenario& s) {
  const auto& c = *s.comparison;
  std::ostringstream d;
  d.precision(15);
  d << "distance prior " << fit::distance_prior_name(c.prior.kind) << " "
    << c.prior.distance_min_kpc << "-" << c.prior.distance_max_kpc << " kpc (scales "
    << c.prior.disk_scale_length_kpc << ", " << c.prior.disk_scale_height_kpc << " kpc), "
    << c.neighbours << " neighbours of " << c.verdict_sources << " young sources, tails " << c.tails
    << " (" << c.robust_dof << "), floor " << c.floor_min_kms << "-" << c.floor_max_kms
    << " km/s, Sun's velocity " << (c.marginalise_sun ? "marginalised" : "fixed") << " ("
    << c.sun_velocity_err_kms[0] << ", " << c.sun_velocity_err_kms[1] << ", "
    << c.sun_velocity_err_kms[2] << "), R0 " << (c.marginalise_r0 ? "marginalised" : "fixed")
    << " (" << c.r0_err_kpc << ")";
  return d.str();
}

// Indices in window.back() of young tracers drawn by the observation's weighted selection, with
// the selection's geometry replaced by `sel` (no errors are used).
std::vector<std::size_t> young_indices(const scenario::Scenario& s,
                                       const std::vector<double>& weights,
                                       const std::vector<io::Snapshot>& window,
                                       const observe::Selection& sel) {
  auto settings = s.observation->settings;
  settings.selection = sel;
  const auto mock = observe::observe(window.back(), weights, settings);
  const auto& t = window.back().tracers;
  std::map<std::uint64_t, std::size_t> index;
  for (std::size_t i = 0; i < t.size(); ++i)
    index[t.id[i]] = i;
  std::vector<std::size_t> out;
  for (auto id : mock.tracer_ids)
    out.push_back(index.at(id));
  return out;
}

// The young tracers that predict the local distributions: the observation's weighted selection
// (no signal-to-noise cut, no errors), with their true peculiar motions.
std::vector<compare::PlanePoint> predictions(const scenario::Scenario& s,
                                             const std::vector<double>& weights,
                                             const std::vector<io::Snapshot>& window) {
  auto sel = s.observation->settings.selection;
  sel.max_sources = s.comparison->prediction_sources;
  sel.parallax_snr_min = 0;
  sel.parallax_min_mas = -1e300, sel.parallax_max_mas = 1e300;
  const auto rs = residual_settings(s);
  const auto& t = window.back().tracers;
  std::vector<compare::PlanePoint> out;
  for (auto i : young_indices(s, weights, window, sel)) {
    sky::Observed o;
    const double d = sky::from_galactocentric(
        {{t.x[i], t.y[i], t.z[i]}, {t.vx[i], t.vy[i], t.vz[i]}}, rs.sun, o);
    compare::PlanePoint p;
    p.x = t.x[i], p.y = t.y[i];
    p.uvw = residuals::peculiar_motion(o, d, rs);
    p.name = "T" + std::to_string(t.id[i]);
    out.push_back(p);
  }
  return out;
}

// The young sources the verdict draws on: the weighted selection over the whole sky out to 3 kpc
// beyond the survey's reach, without any cut on observed quantities (the model's prediction
// does not depend on where the survey could look).
compare::SimulatedYoung verdict_young(const scenario::Scenario& s,
                                      const std::vector<double>& weights,
                                      const std::vector<io::Snapshot>& window) {
  observe::Selection sel;
  sel.distance_max_kpc = s.observation->settings.selection.distance_max_kpc + 3;
  sel.max_sources = s.comparison->verdict_sources;
  const auto& t = window.back().tracers;
  compare::SimulatedYoung y;
  for (auto i : young_indices(s, weights, window, sel)) {
    y.x.push_back(t.x[i]), y.y.push_back(t.y[i]), y.z.push_back(t.z[i]);
    y.vx.push_back(t.vx[i]), y.vy.push_back(t.vy[i]), y.vz.push_back(t.vz[i]);
  }
  return y;
}

compare::VerdictSettings verdict_settings(const scenario::Scenario& s) {
  const auto& c = *s.comparison;
  const auto& ob = s.observation->settings;
  compare::VerdictSettings v;
  v.neighbours = c.neighbours;
  v.prior = c.prior;
  v.prior.parallax_snr_min = 0; // the verdict is conditional on the parallax
  v.lsr = ob.lsr;
  v.tails = c.tails == "gaussian" ? compare::VerdictSettings::Tails::gaussian
            : c.tails == "robust" ? compare::VerdictSettings::Tails::robust
                                  : compare::VerdictSettings::Tails::student;
  v.robust_dof = c.robust_dof;
  v.floor_min_kms = c.floor_min_kms, v.floor_max_kms = c.floor_max_kms;
  v.r0_kpc = ob.sun.r0_kpc, v.z_sun_kpc = ob.sun.z_sun_kpc;
  v.sun_velocity_kms = {ob.sun.u_sun_kms, ob.sun.theta0_kms + ob.sun.v_sun_kms, ob.sun.w_sun_kms};
  v.marginalise_sun = c.marginalise_sun;
  if (ob.sun_velocity_cov)
    for (int a = 0; a < 3; ++a)
      for (int b = 0; b < 3; ++b)
        v.sun_velocity_cov(a, b) = (*ob.sun_velocity_cov)[std::size_t(3 * a + b)];
  else
    v.sun_velocity_cov = Eigen::Vector3d(c.sun_velocity_err_kms[0], c.sun_velocity_err_kms[1],
                                         c.sun_velocity_err_kms[2])
                             .array()
                             .square()
                             .matrix()
                             .asDiagonal();
  v.marginalise_r0 = c.marginalise_r0;
  v.r0_err_kpc = c.r0_err_kpc;
  if (ob.sun_velocity_cov)
    v.sun_velocity_r0_cov = Eigen::Vector3d(ob.sun_velocity_r0_cov[0], ob.sun_velocity_r0_cov[1],
                                            ob.sun_velocity_r0_cov[2]);
  return v;
}

// The measured sources the verdict judges: the comparison's parallax signal-to-noise cut, and a
// parallax that leaves probability inside the distance prior's range.
residuals::Catalog verdict_catalog(const scenario::Scenario& s, const residuals::Catalog& c,
                                   std::vector<std::string>& excluded) {
  residuals::Catalog out;
  out.file = c.file;
  const auto& cm = *s.comparison;
  for (const auto& src : c.sources) {
    if (cm.parallax_snr_min > 0 && !(src.signal_to_noise() >= cm.parallax_snr_min))
      continue; // the residuals' own cut, listed there
    if (!fit::parallax_within_prior(src, cm.prior, 0, 0)) {
      excluded.push_back(src.name + (src.has_distance() ? ": distance" : ": parallax") +
                         " more than 7 sigma outside the distance prior's range");
      continue;
    }
    out.sources.push_back(src);
  }
  return out;
}

std::vector<compare::PlanePoint> plane_points(const residuals::ResidualResult& r) {
  std::vector<compare::PlanePoint> out;
  for (const auto& s : r.sources) {
    compare::PlanePoint p;
    const double psi = s.psi_deg * units::deg;
    p.x = -s.R_kpc * std::cos(psi), p.y = s.R_kpc * std::sin(psi);
    p.uvw = s.uvw;
    p.cov = s.mc_cov;
    p.name = s.name;
    out.push_back(p);
  }
  return out;
}

// One row per measured source: where it is, its measured U_s, V_s, W_s with errors, and the
// prediction of the simulated sources near it, so that a residual map needs no join.
io::Table local_table(const compare::LocalResult& l, const residuals::ResidualResult& measured) {
  // the measured columns as the residual table defines them
  const io::Table src = residuals::source_table(measured);
  io::Table t;
  t.title = "Measured sources against the simulated young sources near them (descriptive)";
  t.text_headers = {"name"};
  std::vector<std::size_t> carried;
  for (const char* name :
       {"R_kpc", "psi_deg", "U_kms", "U_err_kms", "V_kms", "V_err_kms", "W_kms", "W_err_kms"})
    for (std::size_t k = 0; k < src.columns.size(); ++k)
      if (src.columns[k].name == name) carried.push_back(k), t.columns.push_back(src.columns[k]);
  for (const io::Column& c :
       std::vector<io::Column>{{"neighbours", "N", "N", "", 5},
                               {"U_pred_kms", "U_{\\rm pred}", "U_pred", "km/s", 4},
                               {"V_pred_kms", "V_{\\rm pred}", "V_pred", "km/s", 4},
                               {"W_pred_kms", "W_{\\rm pred}", "W_pred", "km/s", 4},
                               {"pull_U", "{\\rm pull}_U", "pull_U", "", 3},
                               {"pull_V", "{\\rm pull}_V", "pull_V", "", 3},
                               {"pull_W", "{\\rm pull}_W", "pull_W", "", 3},
                               {"dof", "\\nu", "ν", "", 4},
                               {"q", "Q", "Q", "", 4},
                               {"p_value", "p", "p", "", 3},
                               {"log_likelihood", "\\ln p", "ln p", "", 5}})
    t.columns.push_back(c);
  std::map<std::string, std::size_t> row_of;
  for (std::size_t r = 0; r < src.text_rows.size(); ++r)
    row_of.emplace(src.text_rows[r][0], r);
  for (const auto& s : l.sources) {
    const auto it = row_of.find(s.name);
    if (it == row_of.end())
      throw std::logic_error("local table: source '" + s.name + "' is not a measured source");
    std::vector<double> row;
    for (const std::size_t k : carried)
      row.push_back(src.rows[it->second][k]);
    for (const double v :
         {double(s.neighbours), s.predicted[0], s.predicted[1], s.predicted[2], s.pull[0],
          s.pull[1], s.pull[2], s.dof, s.chi2, s.p_value, s.log_likelihood})
      row.push_back(v);
    t.add_row({s.name}, std::move(row));
  }
  t.notes.push_back(
      "predictions: the Student-t predictive of the k simulated neighbours (their "
      "sampling noise; Gelman et al. 2013, sec. 3.6), widened by the measurement "
      "errors (Satterthwaite dof); pulls are standard normal deviates of the same "
      "probability; Q/3 ~ F(3, dof); U_s, V_s, W_s and their errors are the measured "
      "ones (Monte Carlo); pull = (measured - predicted) / its error, as a normal deviate. A "
      "descriptive table: the verdict is verdict.csv");
  for (const auto& o : l.outliers)
    t.notes.push_back("beyond 3 sigma: " + o);
  return t;
}

// How far realisation r turns the spiral patterns (deg): stratified over the range, if any.
double arm_shift_deg(const scenario::Scenario& s, std::size_t r) {
  const auto& a = s.comparison->arm_phase_range_deg;
  if (!a) return 0;
  return (*a)[0] + ((*a)[1] - (*a)[0]) * (double(r) + 0.5) / double(s.comparison->realisations);
}

// One row per realisation, then the notes that say what the verdict rests on.
io::Table verdict_table(const scenario::Scenario& s, const std::vector<compare::VerdictResult>& v,
                        const compare::RealisationSummary& sum,
                        const std::vector<std::string>& excluded) {
  io::Table t;
  t.title = "Verdict: ln p(proper motions, v_LSR | parallax) of the measured sources, per "
            "realisation";
  t.text_headers = {"realisation"};
  t.columns = {{"tracer_seed", "{\\rm seed}", "seed", "", 10},
               {"log_likelihood", "\\ln L", "ln L", "", 8},
               {"log_likelihood_max", "\\ln L_{\\rm max}", "ln L_max", "", 8},
               {"floor_kms", "\\sigma_{\\rm int}", "σ_int", "km/s", 3},
               {"floor_mean_kms", "\\langle\\sigma_{\\rm int}\\rangle", "⟨σ_int⟩", "km/s", 3},
               {"u_sun_kms", "U_\\odot", "U☉", "km/s", 4},
               {"sun_vphi_kms", "\\Theta_0 + V_\\odot", "Θ0+V☉", "km/s", 5},
               {"w_sun_kms", "W_\\odot", "W☉", "km/s", 4},
               {"r0_kpc", "R_0", "R0", "kpc", 4},
               {"arm_shift_deg", "\\Delta\\phi_{\\rm arm}", "Δφ_arm", "deg", 4},
               {"far_share", "f_{\\rm far}", "f_far", "", 3}};
  for (std::size_t r = 0; r < v.size(); ++r) {
    t.text_rows.push_back({std::to_string(r)});
    t.add_row({double(s.seed + r), v[r].log_likelihood, v[r].log_likelihood_at_best, v[r].floor_kms,
               v[r].floor_mean_kms, v[r].sun_velocity_kms[0], v[r].sun_velocity_kms[1],
               v[r].sun_velocity_kms[2], v[r].r0_kpc, arm_shift_deg(s, r), v[r].far_share});
  }
  char b[256];
  std::snprintf(b, sizeof b, "ln L = %.2f, scatter %.2f over %zu realisation(s), %zu sources",
                sum.mean, sum.scatter, sum.count, sum.names.size());
  t.notes.push_back(b);
  t.notes.push_back("ln L: marginal over sigma_int (uniform prior) and, when so said below, the "
                    "Sun's velocity and R0; ln L_max, sigma_int, the Sun's velocity and R0: at the "
                    "maximum");
  // each note once, with the realisations it holds for
  std::vector<std::pair<std::string, std::string>> seen; // note, realisations
  for (std::size_t r = 0; r < v.size(); ++r)
    for (const auto& n : v[r].notes) {
      auto it = std::find_if(seen.begin(), seen.end(), [&](const auto& x) { return x.first == n; });
      if (it == seen.end())
        seen.emplace_back(n, std::to_string(r));
      else
        it->second += ", " + std::to_string(r);
    }
  for (const auto& [n, rs] : seen)
    t.notes.push_back((v.size() > 1 ? "realisation " + rs + ": " : std::string()) + n);
  for (const auto& e : excluded)
    t.notes.push_back("not judged: " + e);
  return t;
}

} // namespace

WholeRunResult run_all(const scenario::Scenario& s, const WholeRunOptions& o) {
  if (!s.observation)
    throw InputError(SourcePlace{s.path, 0, 0, "observation"},
                     "a whole run needs an [observation] table");
  if (!s.comparison)
    throw InputError(SourcePlace{s.path, 0, 0, "comparison"},
                     "a whole run needs a [comparison] table");
  residuals::CatalogOptions read;
  read.columns = s.comparison->catalog_columns;
  read.lsr = s.observation->settings.lsr;
  const auto measured = residuals::read_catalog(s.comparison->catalog, read); // inputs first
  residuals::print_catalog_warnings(measured, std::cerr);
  const fs::path dir(o.folder);
  std::error_code ec;
  if (fs::exists(dir, ec) && !fs::is_directory(dir, ec))
    throw InputError(SourcePlace{o.folder, 0, 0, {}}, "is a file; a whole run writes a folder");
  fs::create_directories(dir / ".keys", ec);
  if (ec)
    throw InputError(SourcePlace{o.folder, 0, 0, {}}, "cannot create folder: " + ec.message());
  io::remove_stale_temporaries(o.folder); // of a run killed mid-write: never results
  WholeRunResult res;
  const auto note = [&](const std::string& t) {
    if (o.log) *o.log << t << "\n";
  };

  // 1. orbits, for each realisation: the run's seed in the run folder, seed + r in
  // realisations/r<r>/ (each stage reused when its inputs have not changed)
  const auto realisation_scenario = [&](std::size_t r) {
    scenario::Scenario sr = s;
    sr.seed = s.seed + r;
    if (r > 0)
      sr.orbit_key += "\n# realisation " + std::to_string(r) + ", tracer seed " +
                      std::to_string(sr.seed) + "\n";
    if (s.comparison->arm_phase_range_deg) {
      const double shift = arm_shift_deg(s, r);
      for (auto& pt : sr.model.patterns)
        if (!std::holds_alternative<potential::DehnenBar>(pt.shape)) pt.phase += shift * units::deg;
      char b[96];
      std::snprintf(b, sizeof b, "# spiral patterns turned by %.17g deg\n", shift);
      sr.orbit_key += b;
    }
    return sr;
  };
  const auto orbits_of = [&](std::size_t r) {
    return r == 0 ? dir / "orbits.h5"
                  : dir / "realisations" / ("r" + std::to_string(r)) / "orbits.h5";
  };
  const auto orbit_stage = [&](std::size_t r) {
    const auto sr = realisation_scenario(r);
    const fs::path orbits = orbits_of(r);
    const fs::path key = dir / ".keys" / (r == 0 ? "orbits" : "orbits-r" + std::to_string(r));
    const auto orbits_key = stored_key(key);
    if (reusable(orbits_key, sr.orbit_key, orbits, o.force)) {
      res.reused.push_back(r == 0 ? "orbits" : "orbits-r" + std::to_string(r));
      note("orbits: reused " + orbits.string());
      return true;
    }
    fs::create_directories(orbits.parent_path());
    EnsembleOptions eo;
    eo.output = orbits.string();
    eo.restart = o.force || (orbits_key && *orbits_key != sr.orbit_key);
    eo.progress = o.progress;
    eo.stop = o.stop;
    eo.log = o.log;
    std::error_code e2;
    fs::remove(key, e2);
    const auto er = run_ensemble(sr, eo);
    if (!er.complete) return false;
    write_text(key, sr.orbit_key);
    note("orbits: " + std::to_string(er.tracers) + " tracers to t = " + detail::num(s.end_myr) +
         " Myr (realisation " + std::to_string(r) + ", seed " + std::to_string(sr.seed) + ")");
    return true;
  };
  const std::size_t K = s.comparison->realisations;
  if (!orbit_stage(0)) return res; // the other realisations after the comparison's checks
  const fs::path orbits = orbits_of(0);

  // 2. the mock observation
  const io::SnapshotReader rd(orbits.string());
  const auto prep = observe::prepare(rd, *s.observation, realisation_scenario(0).model,
                                     SourcePlace{s.path, 0, 0, "observation.time_myr"});
  const auto& window = prep.window;
  const auto& weights = prep.weights;
  const auto& ob = s.observation->settings;
  const fs::path mock_path = dir / "mock-catalog.csv";
  // the mock depends on realisation 0's orbits (its seed and any turn of the arms) too
  const std::string mock_key = s.observation_key + realisation_scenario(0).orbit_key;
  if (reusable(stored_key(dir / ".keys/mock"), mock_key, mock_path, o.force)) {
    res.reused.push_back("mock");
    note("mock catalog: reused " + mock_path.string());
  } else {
    const auto mock = observe::observe(window.back(), weights, ob);
    if (mock.catalog.sources.empty())
      throw InputError(SourcePlace{s.path, 0, 0, "observation.selection"},
                       "no simulated tracer passes the selection; nothing compared");
    // as ECSV and FITS too, for astropy; the CSV last, as it marks the stage finished
    const io::Table table = residuals::catalog_table(mock.catalog);
    for (const char* ext : {".ecsv", ".fits", ".csv"}) {
      const std::string path = fs::path(mock_path).replace_extension(ext).string();
      io::write_table_file(path, table, io::machine_format_of_path(path));
    }
    write_text(dir / ".keys/mock", mock_key);
    note("mock catalog: " + std::to_string(mock.catalog.sources.size()) + " sources");
  }

  // 3. residuals of both catalogs through the same code
  const auto rs = residual_settings(s);
  const auto meas_res = residuals::compute_residuals(measured, rs);
  if (meas_res.sources.size() < 3)
    throw InputError(
        SourcePlace{s.comparison->catalog, 0, 0, {}},
        std::to_string(meas_res.sources.size()) +
            " measured sources are left after the selection (3 or more needed); nothing compared");
  const auto mock_res =
      residuals::compute_residuals(residuals::read_catalog(mock_path.string()), rs);
  if (mock_res.sources.size() < 3)
    throw InputError(SourcePlace{s.path, 0, 0, "observation"},
                     "fewer than 3 mock sources are left; nothing compared");
  const std::string settings = "scenario " + s.path;
  residuals::write_report(
      (dir / "measured-residuals").string(), meas_res,
      residuals::summarise(meas_res, s.comparison->bootstrap, s.comparison->seed), settings);
  residuals::write_report(
      (dir / "mock-residuals").string(), mock_res,
      residuals::summarise(mock_res, s.comparison->bootstrap, s.comparison->seed), settings);

  // 4. comparison
  const auto gc = compare::compare_globally(
      meas_res, mock_res, {s.comparison->radius_bins_kpc, s.comparison->azimuth_bins_deg},
      s.comparison->bootstrap, s.comparison->seed);
  const auto global = compare::global_table(gc);
  const auto &all_v = gc.all().uvw[1], &all_u = gc.all().uvw[0];
  compare::Neighbourhood nb;
  nb.kind = s.comparison->nearest ? compare::Neighbourhood::Kind::nearest
                                  : compare::Neighbourhood::Kind::radius;
  nb.k = s.comparison->neighbours;
  nb.radius_kpc = s.comparison->radius_kpc;
  nb.min_count = s.comparison->min_neighbours;
  const auto local =
      compare::compare_locally(plane_points(meas_res), predictions(s, weights, window), nb);
  const auto ltab = local_table(local, meas_res);

  // 5. the verdict, for each realisation
  for (std::size_t r = 1; r < K; ++r)
    if (!orbit_stage(r)) return res;
  std::vector<std::string> verdict_excluded;
  const auto judged = verdict_catalog(s, measured, verdict_excluded);
  if (judged.sources.size() < 3)
    throw InputError(SourcePlace{s.comparison->catalog, 0, 0, {}},
                     std::to_string(judged.sources.size()) +
                         " measured sources are left for the verdict (3 or more needed)");
  const auto vs = verdict_settings(s);
  std::vector<compare::VerdictResult> verdicts;
  for (std::size_t r = 0; r < K; ++r) {
    if (o.stop && o.stop->load()) return res;
    if (r == 0) {
      verdicts.push_back(compare::judge(judged, verdict_young(s, weights, window), vs));
    } else {
      const io::SnapshotReader rr(orbits_of(r).string());
      const auto pr = observe::prepare(rr, *s.observation, realisation_scenario(r).model,
                                       SourcePlace{s.path, 0, 0, "observation.time_myr"});
      verdicts.push_back(compare::judge(judged, verdict_young(s, pr.weights, pr.window), vs));
    }
    note("verdict: realisation " + std::to_string(r) + " (seed " + std::to_string(s.seed + r) +
         "): ln L = " + detail::num(verdicts.back().log_likelihood));
  }
  std::vector<double> totals;
  std::vector<std::vector<double>> per_source;
  for (const auto& v : verdicts)
    totals.push_back(v.log_likelihood), per_source.push_back(v.source_log_likelihood);
  const auto summary = compare::summarise_realisations(totals, per_source, verdicts[0].names);
  const auto vtab = verdict_table(s, verdicts, summary, verdict_excluded);

  // 6. the lag against age, when the gas formed stars
  std::optional<LagTables> lag;
  const auto& observed = window.back();
  if (std::any_of(observed.flags.begin(), observed.flags.end(),
                  [](std::uint32_t f) { return f & io::kFlagStar; })) {
    const auto young =
        ob.young && ob.young->star_age_myr ? *ob.young->star_age_myr : std::array<double, 2>{0, 20};
    lag = lag_by_age(observed, realisation_scenario(0).model, ob, rs, young,
                     s.comparison->bootstrap, s.comparison->seed);
  }

  io::write_table_files((dir / "comparison-global").string(), global);
  io::write_table_files((dir / "comparison-local").string(), ltab);
  io::write_table_files((dir / "verdict").string(), vtab);
  if (lag) {
    io::write_table_files((dir / "lag-by-age").string(), lag->by_age);
    if (!lag->by_phase.rows.empty())
      io::write_table_files((dir / "lag-by-phase").string(), lag->by_phase);
  }
  io::h5::File::write_atomically((dir / "comparison.h5").string(), [&](const io::h5::File& f) {
    io::h5::set_attr(f, f.id(), "undertow_format", std::string("comparison"));
    io::h5::set_attr(f, f.id(), "scenario", s.text);
    io::h5::set_attr(f, f.id(), "log_likelihood", summary.mean);
    io::h5::set_attr(f, f.id(), "log_likelihood_scatter", summary.scatter);
    io::h5::set_attr(f, f.id(), "realisations", std::int64_t(K));
    io::h5::set_attr(f, f.id(), "local_log_likelihood", local.log_likelihood);
    io::h5::set_attr(f, f.id(), "chi2", local.chi2);
    io::h5::set_attr(f, f.id(), "measured_sources", std::int64_t(meas_res.sources.size()));
    io::h5::set_attr(f, f.id(), "judged_sources", std::int64_t(judged.sources.size()));
    // what 'versus' requires runs to share before it sets them side by side
    io::h5::set_attr(f, f.id(), "run_name", s.name);
    io::h5::set_attr(f, f.id(), "catalog_digest",
                     io::hex64(io::digest_file(s.comparison->catalog).fnv1a));
    io::h5::set_attr(f, f.id(), "sun", observe::describe_sun(s.observation->settings));
    io::h5::set_attr(f, f.id(), "selection", selection_description(s));
    io::h5::set_attr(f, f.id(), "verdict", verdict_description(s));
    std::string names;
    for (const auto& n : summary.names)
      names += n + "\n";
    io::h5::set_attr(f, f.id(), "judged_sources_digest", io::hex64(io::fnv1a64(names)));
    io::h5::set_attr(f, f.id(), "mean_V_measured_kms", all_v.measured.mean);
    io::h5::set_attr(f, f.id(), "mean_V_simulated_kms", all_v.simulated.mean);
    io::h5::set_attr(f, f.id(), "mean_V_pull", all_v.pull);
    io::write_table_group(f, "global", global);
    io::write_table_group(f, "local", ltab);
    io::write_table_group(f, "verdict_table", vtab);
    if (lag) {
      io::write_table_group(f, "lag_by_age", lag->by_age);
      if (!lag->by_phase.rows.empty()) io::write_table_group(f, "lag_by_phase", lag->by_phase);
    }
    const auto g = io::h5::create_group(f, "verdict");
    io::h5::write_strings(f, g.id(), "source", summary.names, "the judged measured sources");
    io::h5::write_doubles(f, g.id(), "realisation_log_likelihood", totals, 1, "",
                          "ln L of each realisation, nuisances marginalised");
    std::vector<double> flat;
    for (const auto& v : per_source)
      flat.insert(flat.end(), v.begin(), v.end());
    io::h5::write_doubles(f, g.id(), "source_log_likelihood", flat, summary.names.size(), "",
                          "ln p(pm, v_LSR | parallax) per realisation (rows) and source "
                          "(columns), at the maximum over the nuisances");
  });
  // summary.txt speaks the tables' notation (their Markdown symbols) and names each table
  char b[4096];
  std::snprintf(
      b, sizeof b,
      "scenario %s (%s)\n"
      "the Sun: %s\n"
      "measured catalog: %s, N_meas = %zu sources used\n"
      "mock catalog: N_sim = %zu sources observed at t = %g Myr\n"
      "signs: Δ = measured − simulated; Δ/σ_Δ = Δ over its error (a pull, not a p-value); "
      "pull = (measured − predicted) / its error\n"
      "all V_s (comparison-global): mean_meas = %.2f ± %.2f km/s, mean_sim = %.2f ± %.2f km/s, "
      "Δ = %.2f km/s, Δ/σ_Δ = %.2f\n"
      "all U_s (comparison-global): mean_meas = %.2f ± %.2f km/s, mean_sim = %.2f ± %.2f km/s, "
      "Δ = %.2f km/s, Δ/σ_Δ = %.2f\n"
      "verdict: ln L = %.1f, scatter %.1f over %zu realisation%s (seeds %llu-%llu), %zu "
      "sources; ⟨σ_int⟩ = %.1f km/s; the Sun's velocity %s; R0 %s\n"
      "comparison-local: %zu of %zu sources with p < 0.0027 (beyond 3 σ) of their Student-t "
      "prediction\n",
      s.name.c_str(), s.path.c_str(), observe::describe_sun(s.observation->settings).c_str(),
      s.comparison->catalog.c_str(), meas_res.sources.size(), mock_res.sources.size(),
      prep.time_myr, all_v.measured.mean, all_v.measured.mean_err, all_v.simulated.mean,
      all_v.simulated.mean_err, all_v.difference, all_v.pull, all_u.measured.mean,
      all_u.measured.mean_err, all_u.simulated.mean, all_u.simulated.mean_err, all_u.difference,
      all_u.pull, summary.mean, summary.scatter, K, K == 1 ? "" : "s", (unsigned long long)s.seed,
      (unsigned long long)(s.seed + K - 1), judged.sources.size(), verdicts[0].floor_mean_kms,
      vs.marginalise_sun ? "marginalised" : "held fixed",
      vs.marginalise_r0 ? "marginalised" : "held fixed", local.outliers.size(),
      local.sources.size());
  res.summary = b;
  if (lag) {
    // the youngest bin with stars through the mock survey, and the oldest
    std::string line = "lag-by-age: mean V_s mock ± err by age:";
    for (const auto& row : lag->by_age.rows)
      if (row[9] >= 3)
        line += " " + io::format_number(row[0], 3) + "-" + io::format_number(row[1], 3) + " Myr " +
                io::format_number(row[12], 3) + " ± " + io::format_number(row[13], 2) + ";";
    res.summary += line + " km/s\n";
  }
  if (K == 1)
    res.summary += "note: one realisation: the verdict's realisation noise is not known; set "
                   "[comparison] realisations = 4 or more\n";
  write_text(dir / "summary.txt", res.summary);
  write_text(dir / "scenario.toml", s.text);
  res.complete = true;
  res.log_likelihood = summary.mean;
  res.log_likelihood_scatter = summary.scatter;
  res.realisations = K;
  res.chi2 = local.chi2;
  for (const auto& src : local.sources)
    res.pulls.push_back(src.pull);
  res.measured_sources = meas_res.sources.size();
  res.outliers = local.outliers.size();
  res.global = global;
  res.comparison = gc;
  return res;
}

io::Table compare_runs(const std::vector<std::string>& folders) {
  if (folders.size() < 2) throw InputError("give two or more run folders to compare");
  io::Table t;
  t.title = "Models against one catalog: the verdict, differences against the first";
  t.text_headers = {"run"};
  t.columns = {{"n", "N", "N", "", 5},
               {"realisations", "K", "K", "", 3},
               {"log_likelihood", "\\ln L", "ln L", "", 8},
               {"log_likelihood_scatter", "s_{\\ln L}", "scatter", "", 3},
               {"delta_log_likelihood", "\\Delta\\ln L", "Δ ln L", "", 6},
               {"delta_err", "\\sigma_\\Delta", "σ_Δ", "", 3},
               {"delta_sources_err", "\\sigma_{\\rm src}", "σ_src", "", 3},
               {"delta_realisations_err", "\\sigma_{\\rm real}", "σ_real", "", 3},
               {"delta_pull", "\\Delta/\\sigma_\\Delta", "Δ/σ_Δ", "", 3},
               {"mean_V_measured_kms", "\\langle V_s\\rangle_{\\rm meas}", "⟨V_s⟩_meas", "km/s", 4},
               {"mean_V_simulated_kms", "\\langle V_s\\rangle_{\\rm sim}", "⟨V_s⟩_sim", "km/s", 4},
               {"mean_V_pull", "\\Delta V/\\sigma", "ΔV/σ", "", 3}};
  std::string first_catalog, first_sun, first_selection, first_verdict, first_judged;
  std::vector<std::string> names;
  std::vector<compare::RealisationSummary> sums;
  std::vector<std::array<double, 4>> extra; // n, mean V measured, simulated, pull
  for (std::size_t i = 0; i < folders.size(); ++i) {
    const fs::path p = fs::path(folders[i]) / "comparison.h5";
    const auto f = io::h5::File::open_read(p.string());
    for (const char* a : {"run_name", "catalog_digest", "sun", "selection", "realisations",
                          "verdict", "judged_sources_digest"})
      if (!io::h5::has_attr(f.id(), a))
        throw InputError(SourcePlace{p.string(), 0, 0, a},
                         "written by an older undertow: run it again ('undertow run') so that "
                         "versus can check what the runs share and weigh their realisations");
    const std::string cat = io::h5::get_attr_string(f, f.id(), "catalog_digest"),
                      sun = io::h5::get_attr_string(f, f.id(), "sun"),
                      sel = io::h5::get_attr_string(f, f.id(), "selection"),
                      ver = io::h5::get_attr_string(f, f.id(), "verdict"),
                      judged = io::h5::get_attr_string(f, f.id(), "judged_sources_digest");
    if (i == 0) {
      first_catalog = cat, first_sun = sun, first_selection = sel;
      first_verdict = ver, first_judged = judged;
    } else {
      const auto differ = [&](const char* what, const std::string& a, const std::string& b) {
        if (a != b)
          throw InputError(SourcePlace{p.string(), 0, 0, what},
                           std::string("differs from ") + folders[0] + "'s (" + b + " against " +
                               a + "): Delta ln L between runs of different " + what +
                               " compares different data; nothing written");
      };
      differ("catalog", cat, first_catalog);
      differ("sun", sun, first_sun);
      differ("selection", sel, first_selection);
      differ("verdict", ver, first_verdict);
      differ("judged sources", judged, first_judged);
    }
    const auto g = io::h5::open_group(f, "verdict");
    const auto totals = io::h5::read_doubles(f, g.id(), "realisation_log_likelihood", 1);
    const std::size_t n = std::size_t(io::h5::get_attr_int(f, f.id(), "judged_sources"));
    std::size_t rows = 0;
    const auto flat = io::h5::read_doubles(f, g.id(), "source_log_likelihood", n, &rows);
    std::vector<std::vector<double>> per(rows);
    for (std::size_t r = 0; r < rows; ++r)
      per[r].assign(flat.begin() + long(r * n), flat.begin() + long((r + 1) * n));
    // the same sources in the same order in every run: their names' digest was checked above
    std::vector<std::string> idx(n);
    for (std::size_t k = 0; k < n; ++k)
      idx[k] = std::to_string(k);
    sums.push_back(compare::summarise_realisations(totals, per, idx));
    names.push_back(io::h5::get_attr_string(f, f.id(), "run_name"));
    extra.push_back({double(n), io::h5::get_attr_double(f, f.id(), "mean_V_measured_kms"),
                     io::h5::get_attr_double(f, f.id(), "mean_V_simulated_kms"),
                     io::h5::get_attr_double(f, f.id(), "mean_V_pull")});
  }
  // rows by run name; runs that share a name also get their folder
  for (std::size_t i = 0; i < names.size(); ++i)
    t.text_rows.push_back({std::count(names.begin(), names.end(), names[i]) > 1
                               ? names[i] + " (" + folders[i] + ")"
                               : names[i]});
  bool unknown_noise = false;
  for (std::size_t i = 0; i < sums.size(); ++i) {
    compare::ModelDifference d;
    if (i > 0) d = compare::difference(sums[0], sums[i]);
    if (i > 0 && !d.realisation_noise_known) unknown_noise = true;
    t.add_row({extra[i][0], double(sums[i].count), sums[i].mean, sums[i].scatter, d.delta, d.sigma,
               d.sigma_sources, d.sigma_realisations, d.sigma > 0 ? d.delta / d.sigma : 0.0,
               extra[i][1], extra[i][2], extra[i][3]});
    if (i == 0) continue;
    char b[512];
    if (d.distinguished)
      std::snprintf(b, sizeof b,
                    "%s against %s: Δ ln L = %+.1f ± %.1f: the catalog prefers %s "
                    "(|Δ ln L| > 2 σ_Δ)",
                    t.text_rows[i][0].c_str(), t.text_rows[0][0].c_str(), d.delta, d.sigma,
                    d.delta > 0 ? t.text_rows[i][0].c_str() : t.text_rows[0][0].c_str());
    else
      std::snprintf(b, sizeof b,
                    "%s against %s: Δ ln L = %+.1f ± %.1f: NOT distinguished by this "
                    "catalog (|Δ ln L| within 2 σ_Δ)",
                    t.text_rows[i][0].c_str(), t.text_rows[0][0].c_str(), d.delta, d.sigma);
    t.notes.push_back(b);
  }
  t.notes.push_back("Δ ln L = ln L of the run − ln L of the first; σ_Δ adds the catalog's sampling "
                    "(bootstrap over sources, closed "
                    "form, from the per-source ln L at each realisation's maximum) and the "
                    "realisations' scatter (s^2/K of each run) in quadrature; as the per-source "
                    "values also carry realisation noise, it errs on the large side");
  if (unknown_noise)
    t.notes.push_back("WARNING: runs with one realisation each: the realisation noise is not "
                      "known and σ_Δ holds the catalog's sampling only; set [comparison] "
                      "realisations = 4 or more");
  t.notes.push_back("the runs share the measured catalog (by content), the Sun and the "
                    "selection, checked; the Sun: " +
                    first_sun);
  return t;
}

std::vector<std::string> finished_stage_files(const std::string& folder) {
  std::error_code ec;
  std::vector<std::string> kept;
  if (fs::is_directory(folder, ec))
    for (const auto& f : fs::recursive_directory_iterator(folder, ec))
      if (f.is_regular_file() && f.path().parent_path().filename() != ".keys")
        kept.push_back(fs::relative(f.path(), folder).string());
  std::sort(kept.begin(), kept.end());
  return kept;
}

} // namespace undertow::run

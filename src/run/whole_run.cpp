#include "undertow/run/whole_run.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <map>
#include <optional>
#include <sstream>

#include "undertow/compare/global.hpp"
#include "undertow/compare/local.hpp"
#include "undertow/dynamics/frequencies.hpp"
#include "undertow/error.hpp"
#include "undertow/io/digest.hpp"
#include "undertow/io/table_hdf5.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/observe/prepare.hpp"
#include "undertow/residuals/report.hpp"
#include "undertow/run/ensemble.hpp"

namespace undertow::run {
namespace {

namespace fs = std::filesystem;

// The key a finished stage left beside its output, if any.
std::optional<std::string> stored_key(const fs::path& key_file) {
  if (!fs::exists(key_file)) return std::nullopt;
  return io::read_text_file(key_file.string());
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
  r.min_parallax_snr = c.min_parallax_snr;
  r.draws = c.draws;
  r.seed = c.seed;
  return r;
}

// The Sun of a run, every digit, and where it came from.
std::string sun_description(const scenario::Scenario& s) {
  const auto& o = s.observation->settings;
  std::ostringstream d;
  d.precision(15);
  d << "R0 " << o.sun.r0_kpc << " kpc, z_sun " << o.sun.z_sun_kpc << " kpc, Theta0 "
    << o.sun.theta0_kms << " km/s, solar motion (" << o.sun.u_sun_kms << ", " << o.sun.v_sun_kms
    << ", " << o.sun.w_sun_kms << ") km/s, LSR " << (o.lsr == sky::LsrForm::apex ? "apex" : "components")
    << ", from " << o.sun_source;
  return d.str();
}

// The mock survey's selection and errors and the measured catalog's treatment, every digit.
std::string selection_description(const scenario::Scenario& s) {
  const auto& x = s.observation->settings.selection;
  const auto& e = s.observation->settings.errors;
  const auto& c = *s.comparison;
  std::ostringstream d;
  d.precision(15);
  d << "distance " << x.distance_min_kpc << "-" << x.distance_max_kpc << " kpc, |b| <= "
    << x.latitude_max_deg << " deg, dec " << x.dec_min_deg << " to " << x.dec_max_deg
    << " deg, parallax S/N >= " << x.parallax_snr_min << ", parallax " << x.parallax_min_mas
    << " to " << x.parallax_max_mas << " mas, at most " << x.max_sources << " sources; errors "
    << int(e.kind) << " (" << e.parallax_mas << " mas, " << e.parallax_fraction << ", "
    << e.pm_masyr << " mas/yr, " << e.vlsr_kms << " km/s); measured: distance "
    << int(c.distance) << ", S/N >= " << c.min_parallax_snr;
  return d.str();
}

// The young tracers that predict the local distributions: the observation's weighted selection
// (no signal-to-noise cut, no errors), with their true peculiar motions.
std::vector<compare::PlanePoint> predictions(const scenario::Scenario& s,
                                             const std::vector<double>& weights,
                                             const std::vector<io::Snapshot>& window) {
  auto settings = s.observation->settings;
  settings.selection.max_sources = s.comparison->prediction_sources;
  settings.selection.parallax_snr_min = 0;
  const auto mock = observe::observe(window.back(), weights, settings);
  const auto rs = residual_settings(s);
  const auto& t = window.back().tracers;
  std::map<std::uint64_t, std::size_t> index;
  for (std::size_t i = 0; i < t.size(); ++i)
    index[t.id[i]] = i;
  std::vector<compare::PlanePoint> out;
  for (auto id : mock.tracer_ids) {
    const std::size_t i = index.at(id);
    sky::Observed o;
    const double d = sky::from_galactocentric(
        {{t.x[i], t.y[i], t.z[i]}, {t.vx[i], t.vy[i], t.vz[i]}}, rs.sun, o);
    compare::PlanePoint p;
    p.x = t.x[i], p.y = t.y[i];
    p.uvw = residuals::peculiar_motion(o, d, rs);
    p.name = "T" + std::to_string(id);
    out.push_back(p);
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

io::Table local_table(const compare::LocalResult& l) {
  io::Table t;
  t.title = "Measured sources against the simulated young sources near them";
  t.label_header = "name";
  t.columns = {{"neighbours", "N", "N", "", 5},
               {"U_pred_kms", "U_{\\rm pred}", "U_pred", "km/s", 4},
               {"V_pred_kms", "V_{\\rm pred}", "V_pred", "km/s", 4},
               {"W_pred_kms", "W_{\\rm pred}", "W_pred", "km/s", 4},
               {"pull_U", "p_U", "pull_U", "", 3},
               {"pull_V", "p_V", "pull_V", "", 3},
               {"pull_W", "p_W", "pull_W", "", 3},
               {"chi2", "\\chi^2", "χ²", "", 4},
               {"log_likelihood", "\\ln L", "ln L", "", 5}};
  for (const auto& s : l.sources) {
    t.row_labels.push_back(s.name);
    t.add_row({double(s.neighbours), s.predicted[0], s.predicted[1], s.predicted[2], s.pull[0],
               s.pull[1], s.pull[2], s.chi2, s.log_likelihood});
  }
  for (const auto& o : l.outliers)
    t.notes.push_back("beyond 3 sigma: " + o);
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
  const auto measured = residuals::read_catalog(s.comparison->catalog); // check the inputs first
  const fs::path dir(o.folder);
  std::error_code ec;
  fs::create_directories(dir / ".keys", ec);
  if (ec)
    throw InputError(SourcePlace{o.folder, 0, 0, {}}, "cannot create folder: " + ec.message());
  WholeRunResult res;
  const auto note = [&](const std::string& t) {
    if (o.log) *o.log << t << "\n";
  };

  // 1. orbits
  const fs::path orbits = dir / "orbits.h5";
  const auto orbits_key = stored_key(dir / ".keys/orbits");
  if (reusable(orbits_key, s.orbit_key, orbits, o.force)) {
    res.reused.push_back("orbits");
    note("orbits: reused " + orbits.string());
  } else {
    EnsembleOptions eo;
    eo.output = orbits.string();
    eo.restart = o.force || (orbits_key && *orbits_key != s.orbit_key);
    eo.progress = o.progress;
    eo.stop = o.stop;
    eo.log = o.log;
    fs::remove(dir / ".keys/orbits", ec);
    const auto r = run_ensemble(s, eo);
    if (!r.complete) return res;
    write_text(dir / ".keys/orbits", s.orbit_key);
    note("orbits: " + std::to_string(r.tracers) + " tracers to t = " + detail::num(s.end_myr) +
         " Myr");
  }

  // 2. the mock observation
  const io::SnapshotReader rd(orbits.string());
  const auto prep = observe::prepare(rd, *s.observation, s.model,
                                     SourcePlace{s.path, 0, 0, "observation.time_myr"});
  const auto& window = prep.window;
  const auto& weights = prep.weights;
  const auto& ob = s.observation->settings;
  const fs::path mock_path = dir / "mock-catalog.csv";
  if (reusable(stored_key(dir / ".keys/mock"), s.observation_key, mock_path, o.force)) {
    res.reused.push_back("mock");
    note("mock catalog: reused " + mock_path.string());
  } else {
    const auto mock = observe::observe(window.back(), weights, ob);
    if (mock.catalog.sources.empty())
      throw InputError(SourcePlace{s.path, 0, 0, "observation.selection"},
                       "no simulated tracer passes the selection; nothing compared");
    residuals::write_catalog(mock_path.string(), mock.catalog);
    write_text(dir / ".keys/mock", s.observation_key);
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
  const auto& all_v = gc.all().uvw[1], &all_u = gc.all().uvw[0];
  compare::Neighbourhood nb;
  nb.kind = s.comparison->nearest ? compare::Neighbourhood::Kind::nearest
                                  : compare::Neighbourhood::Kind::radius;
  nb.k = s.comparison->neighbours;
  nb.radius_kpc = s.comparison->radius_kpc;
  nb.min_count = s.comparison->min_neighbours;
  const auto local =
      compare::compare_locally(plane_points(meas_res), predictions(s, weights, window), nb);
  const auto ltab = local_table(local);
  io::write_table_files((dir / "comparison-global").string(), global);
  io::write_table_files((dir / "comparison-local").string(), ltab);
  io::h5::File::write_atomically((dir / "comparison.h5").string(), [&](const io::h5::File& f) {
    io::h5::set_attr(f, f.id(), "undertow_format", std::string("comparison"));
    io::h5::set_attr(f, f.id(), "scenario", s.text);
    io::h5::set_attr(f, f.id(), "log_likelihood", local.log_likelihood);
    io::h5::set_attr(f, f.id(), "chi2", local.chi2);
    io::h5::set_attr(f, f.id(), "measured_sources", std::int64_t(meas_res.sources.size()));
    // what 'versus' requires runs to share before it sets them side by side
    io::h5::set_attr(f, f.id(), "run_name", s.name);
    io::h5::set_attr(f, f.id(), "catalog_digest",
                     io::hex64(io::digest_file(s.comparison->catalog).fnv1a));
    io::h5::set_attr(f, f.id(), "sun", sun_description(s));
    io::h5::set_attr(f, f.id(), "selection", selection_description(s));
    io::h5::set_attr(f, f.id(), "mean_V_measured_kms", all_v.measured.mean);
    io::h5::set_attr(f, f.id(), "mean_V_simulated_kms", all_v.simulated.mean);
    io::h5::set_attr(f, f.id(), "mean_V_significance", all_v.significance);
    io::write_table_group(f, "global", global);
    io::write_table_group(f, "local", ltab);
  });
  const auto& sun = s.observation->settings.sun;
  char b[2048];
  std::snprintf(
      b, sizeof b,
      "scenario %s (%s)\n"
      "the Sun: R0 = %g kpc, z_sun = %g kpc, Theta0 = %g km/s, solar motion (%g, %g, %g) km/s, "
      "from %s\n"
      "measured catalog: %s, %zu sources used\n"
      "mock catalog: %zu sources observed at t = %g Myr\n"
      "mean V_s: measured %.2f +- %.2f km/s, simulated %.2f +- %.2f km/s, difference %.1f sigma\n"
      "mean U_s: measured %.2f +- %.2f km/s, simulated %.2f +- %.2f km/s\n"
      "local comparison: sum ln L = %.2f, sum chi^2 = %.1f for %zu sources (%zu beyond 3 sigma)\n",
      s.name.c_str(), s.path.c_str(), sun.r0_kpc, sun.z_sun_kpc, sun.theta0_kms, sun.u_sun_kms,
      sun.v_sun_kms, sun.w_sun_kms, s.observation->settings.sun_source.c_str(),
      s.comparison->catalog.c_str(), meas_res.sources.size(),
      mock_res.sources.size(), prep.time_myr, all_v.measured.mean, all_v.measured.mean_err,
      all_v.simulated.mean, all_v.simulated.mean_err, all_v.significance, all_u.measured.mean,
      all_u.measured.mean_err, all_u.simulated.mean, all_u.simulated.mean_err,
      local.log_likelihood, local.chi2, local.sources.size(),
      local.outliers.size());
  res.summary = b;
  write_text(dir / "summary.txt", res.summary);
  write_text(dir / "scenario.toml", s.text);
  res.complete = true;
  res.log_likelihood = local.log_likelihood;
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
  t.title = "Models against one catalog (differences against the first)";
  t.label_header = "run";
  t.columns = {{"n", "N", "N", "", 5},
               {"log_likelihood", "\\ln L", "ln L", "", 6},
               {"delta_log_likelihood", "\\Delta\\ln L", "Δ ln L", "", 5},
               {"chi2", "\\chi^2", "χ²", "", 6},
               {"delta_chi2", "\\Delta\\chi^2", "Δχ²", "", 5},
               {"mean_V_measured_kms", "\\langle V_s\\rangle_{\\rm obs}", "⟨V_s⟩_obs", "km/s", 4},
               {"mean_V_simulated_kms", "\\langle V_s\\rangle_{\\rm sim}", "⟨V_s⟩_sim", "km/s", 4},
               {"mean_V_significance", "\\Delta/\\sigma", "Δ/σ", "", 3}};
  double l0 = 0, c0 = 0;
  std::string first_catalog, first_sun, first_selection;
  std::vector<std::string> names;
  for (std::size_t i = 0; i < folders.size(); ++i) {
    const fs::path p = fs::path(folders[i]) / "comparison.h5";
    const auto f = io::h5::File::open_read(p.string());
    for (const char* a : {"run_name", "catalog_digest", "sun", "selection"})
      if (!io::h5::has_attr(f.id(), a))
        throw InputError(SourcePlace{p.string(), 0, 0, a},
                         "written by an older undertow: run it again ('undertow run') so that "
                         "versus can check what the runs share");
    const std::string cat = io::h5::get_attr_string(f, f.id(), "catalog_digest"),
                      sun = io::h5::get_attr_string(f, f.id(), "sun"),
                      sel = io::h5::get_attr_string(f, f.id(), "selection");
    if (i == 0) {
      first_catalog = cat, first_sun = sun, first_selection = sel;
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
    }
    const double l = io::h5::get_attr_double(f, f.id(), "log_likelihood");
    const double c = io::h5::get_attr_double(f, f.id(), "chi2");
    if (i == 0) l0 = l, c0 = c;
    names.push_back(io::h5::get_attr_string(f, f.id(), "run_name"));
    t.add_row({double(io::h5::get_attr_int(f, f.id(), "measured_sources")), l, l - l0, c, c - c0,
               io::h5::get_attr_double(f, f.id(), "mean_V_measured_kms"),
               io::h5::get_attr_double(f, f.id(), "mean_V_simulated_kms"),
               io::h5::get_attr_double(f, f.id(), "mean_V_significance")});
  }
  // rows by run name; runs that share a name also get their folder
  for (std::size_t i = 0; i < names.size(); ++i)
    t.row_labels.push_back(std::count(names.begin(), names.end(), names[i]) > 1
                               ? names[i] + " (" + folders[i] + ")"
                               : names[i]);
  t.notes.push_back("Delta ln L > 0: the run explains the catalog better than the first; a "
                    "difference of a few units is not significant. The runs share the measured "
                    "catalog (by content), the Sun and the selection, checked.");
  t.notes.push_back("the Sun: " + first_sun);
  return t;
}

} // namespace undertow::run

#include "undertow/scenario/scenario.hpp"

#include <cmath>
#include <optional>
#include <sstream>

#include "undertow/detail/kernel.hpp"
#include "undertow/io/paths.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/io/toml_table.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/residuals/peculiar.hpp"

namespace undertow::scenario {
namespace {

using io::at_keys;
using io::TableReader;

void read_tracers(Scenario& s, const TableReader& r) {
  const std::string source = r.string("source");
  if (source == "disk") {
    r.check_keys({"source", "count", "scale_length_kpc", "r_min_kpc", "r_max_kpc",
                  "vertical_profile", "scale_height_kpc", "sigma_r_kms", "sigma_z_kms",
                  "dispersion_radius_kpc", "dispersion_scale_kpc", "asymmetric_drift"});
    auto& d = s.tracers.disk;
    s.tracers.kind = TracerSource::Kind::disk;
    const double count = r.number("count");
    if (!(count >= 1 && count <= 1e10 && std::floor(count) == count))
      r.fail("count", "must be a whole number from 1 to 1e10");
    d.count = std::uint64_t(count);
    d.scale_length_kpc = r.number("scale_length_kpc");
    d.r_min_kpc = r.number("r_min_kpc");
    d.r_max_kpc = r.number("r_max_kpc");
    const std::string vp = r.string_or("vertical_profile", "sech2");
    if (vp == "sech2")
      d.vertical = tracers::DiskPopulation::Vertical::sech2;
    else if (vp == "exponential")
      d.vertical = tracers::DiskPopulation::Vertical::exponential;
    else
      r.fail("vertical_profile", "must be \"sech2\" or \"exponential\", got \"" + vp + "\"");
    d.scale_height_kpc = r.number("scale_height_kpc");
    d.sigma_r_kms = r.number("sigma_r_kms");
    d.sigma_z_kms = r.number("sigma_z_kms");
    d.dispersion_radius_kpc = r.number_or("dispersion_radius_kpc", 8.0);
    d.dispersion_scale_kpc = r.number_or("dispersion_scale_kpc", INFINITY);
    d.asymmetric_drift = r.boolean_or("asymmetric_drift", true);
    at_keys(r, [&] {
      d.validate();
      return 0;
    });
  } else if (source == "file") {
    r.check_keys({"source", "file"});
    s.tracers.kind = TracerSource::Kind::file;
    s.tracers.file = io::path_beside(s.path, r.string("file"));
  } else {
    r.fail("source", "must be \"disk\" or \"file\", got \"" + source + "\"");
  }
}

// "frame" (inertial or rotating) and, for a rotating frame, "frame_pattern": the pattern speed
// the frame turns with (km/s/kpc), or nothing for the inertial frame.
std::optional<double> read_frame(const Scenario& s, const TableReader& r) {
  const std::string frame = r.string_or("frame", "inertial");
  if (frame == "inertial") return std::nullopt;
  if (frame != "rotating")
    r.fail("frame", "must be \"inertial\" or \"rotating\", got \"" + frame + "\"");
  const std::string label = r.string("frame_pattern");
  std::optional<double> speed;
  for (const auto& p : s.model.patterns)
    if (p.label == label) speed = p.pattern_speed;
  if (!speed) r.fail("frame_pattern", "no pattern labelled '" + label + "'");
  return speed;
}

void read_integration(Scenario& s, const TableReader& r) {
  r.check_keys({"method", "start_myr", "end_myr", "step_myr", "tolerance", "batch_size", "frame",
                "frame_pattern", "radius_max_kpc"});
  try {
    s.integration.method = orbit::method_from_name(r.string("method"));
  } catch (const InputError& e) {
    r.fail("method", e.what());
  }
  s.start_myr = r.number_or("start_myr", 0.0);
  s.end_myr = r.number("end_myr");
  if (s.end_myr == s.start_myr) r.fail("end_myr", "must differ from start_myr");
  s.integration.step_myr = r.number("step_myr");
  if (!(s.integration.step_myr > 0)) r.fail("step_myr", "must be positive");
  if (const double span = std::fabs(s.end_myr - s.start_myr); s.integration.step_myr > span)
    s.warnings.push_back(InputError::format(
        r.place("step_myr"), "longer than the run (" + detail::num(span) +
                                 " Myr): the run takes one step of " + detail::num(span) + " Myr"));
  s.integration.tolerance = r.number_or("tolerance", 1e-10);
  if (!(s.integration.tolerance > 0 && s.integration.tolerance < 1))
    r.fail("tolerance", "must lie in (0, 1)");
  const double batch = r.number_or("batch_size", 4096);
  if (!(batch >= 1 && batch <= 1 << 24 && std::floor(batch) == batch))
    r.fail("batch_size", "must be a whole number from 1 to 16777216");
  s.integration.batch = std::size_t(batch);
  s.max_radius_kpc = r.number_or("radius_max_kpc", 500.0);
  if (!(s.max_radius_kpc > 0)) r.fail("radius_max_kpc", "must be positive");
  if (r.string_or("frame", "inertial") == "rotating" && orbit::is_symplectic(s.integration.method))
    r.fail("frame", "the " + orbit::method_name(s.integration.method) +
                        " stepper integrates in the inertial frame (the rotating-frame "
                        "equations are not separable); use an adaptive method, or ask for "
                        "rotating-frame output in [output]");
  s.integration.rotating_frame_speed = read_frame(s, r);
}

void read_gas(Scenario& s, const TableReader& r) {
  r.check_keys({"cloud_radius_kpc", "normal_restitution", "tangential_restitution", "stirring_kms",
                "extent_kpc", "stars"});
  gas::GasSettings g;
  auto& c = g.collisions;
  c.radius_kpc = r.number_or("cloud_radius_kpc", c.radius_kpc);
  c.normal_restitution = r.number_or("normal_restitution", c.normal_restitution);
  c.tangential_restitution = r.number_or("tangential_restitution", c.tangential_restitution);
  c.extent_kpc = r.number_or("extent_kpc", 20.0);
  g.stirring_kms = r.number_or("stirring_kms", g.stirring_kms);
  at_keys(r, [&] {
    try {
      g.collisions.validate();
    } catch (detail::ParameterError& e) {
      if (e.key == "radius_kpc") e.key = "cloud_radius_kpc";
      throw;
    }
    detail::non_negative(g.stirring_kms, "stirring_kms");
    return 0;
  });
  if (const toml::table* t = r.table("stars")) {
    const TableReader q(*t, s.path, "gas.stars");
    q.check_keys({"threshold_kms", "efficiency", "dispersion_kms", "age_max_myr", "step_ratio"});
    gas::StarFormation f;
    f.threshold_kms = q.number_or("threshold_kms", f.threshold_kms);
    f.efficiency = q.number_or("efficiency", f.efficiency);
    f.dispersion_kms = q.number_or("dispersion_kms", f.dispersion_kms);
    f.max_age_myr = q.number_or("age_max_myr", f.max_age_myr);
    if (q.has("step_ratio")) {
      f.step_ratio = q.integer("step_ratio");
      if (f.step_ratio != 1 && s.integration.method != orbit::Method::leapfrog)
        q.fail("step_ratio", "longer steps for the stars need the leapfrog; with " +
                                 orbit::method_name(s.integration.method) +
                                 " the stars step with the gas (step_ratio = 1)");
    } else if (s.integration.method != orbit::Method::leapfrog) {
      f.step_ratio = 1;
    }
    at_keys(q, [&] {
      f.validate();
      return 0;
    });
    g.stars = f;
  }
  if (!orbit::is_symplectic(s.integration.method))
    r.fail("", "colliding clouds need a fixed-step method (leapfrog or symplectic4)");
  s.gas = g;
}

void read_output(Scenario& s, const TableReader& r) {
  r.check_keys({"times_myr", "every_myr", "frame", "frame_pattern"});
  auto& o = s.output;
  const bool list = r.has("times_myr"), every = r.has("every_myr");
  if (list && every) r.fail("", "give times_myr or every_myr, not both");
  const double lo = std::min(s.start_myr, s.end_myr), hi = std::max(s.start_myr, s.end_myr);
  if (list) {
    o.times_myr = r.numbers("times_myr");
    for (std::size_t i = 0; i < o.times_myr.size(); ++i) {
      const double t = o.times_myr[i];
      if (t < lo || t > hi)
        r.fail("times_myr", "every output time must lie between start_myr and end_myr");
      const bool ordered =
          i == 0 || (s.end_myr > s.start_myr ? t > o.times_myr[i - 1] : t < o.times_myr[i - 1]);
      if (!ordered)
        r.fail("times_myr",
               "output times must run in the direction of integration, without repeats");
    }
    if (!o.times_myr.empty() && o.times_myr.front() == s.start_myr)
      o.times_myr.erase(o.times_myr.begin());
  }
  if (every) {
    const double e = r.number("every_myr");
    if (!(e > 0)) r.fail("every_myr", "must be positive");
    const double n = std::floor((hi - lo) / e * (1 + 1e-12));
    if (n > 100000) r.fail("every_myr", "gives more than 100000 snapshots");
    for (double k = 1; k <= n; ++k)
      o.times_myr.push_back(s.end_myr > s.start_myr ? s.start_myr + k * e : s.start_myr - k * e);
  }
  if (o.times_myr.empty() || o.times_myr.back() != s.end_myr) o.times_myr.push_back(s.end_myr);
  if (const auto speed = read_frame(s, r)) {
    o.frame = Output::Frame::rotating;
    o.frame_pattern_speed = *speed;
  }
}

} // namespace

Scenario parse_scenario(const std::string& text, const std::string& path) {
  Scenario s;
  s.path = path;
  s.text = text;
  const toml::table root = io::parse_toml_text(text, path);
  TableReader r(root, path, "");
  r.check_keys(
      {"run", "galaxy", "tracers", "gas", "integration", "output", "observation", "comparison"});
  const auto section = [&](const char* name) {
    const toml::table* t = r.table(name);
    if (!t) r.fail("", std::string("missing [") + name + "] table");
    return TableReader(*t, path, name);
  };
  {
    TableReader run = section("run");
    run.check_keys({"name", "description", "seed"});
    s.name = run.string("name");
    s.description = run.string_or("description", "");
    const double seed = run.number("seed");
    if (!(seed >= 0 && seed < 9.007199254740992e15 && std::floor(seed) == seed))
      run.fail("seed", "must be a whole number from 0 to 2^53");
    s.seed = std::uint64_t(seed);
  }
  {
    const toml::table* g = r.table("galaxy");
    if (!g) r.fail("", "missing [galaxy] table");
    TableReader gr(*g, path, "galaxy");
    if (gr.has("model_file")) {
      gr.check_keys({"model_file"});
      s.model_path = io::path_beside(path, gr.string("model_file"));
      s.model_text = io::read_text_file(s.model_path);
      s.model = potential::parse_model_text(s.model_text, s.model_path);
    } else {
      s.model = potential::model_from_table(*g, path, "galaxy");
    }
  }
  read_tracers(s, section("tracers"));
  read_integration(s, section("integration"));
  if (const toml::table* g = r.table("gas")) read_gas(s, TableReader(*g, path, "gas"));
  read_output(s, section("output"));
  const auto canon = [&](std::initializer_list<const char*> keys) {
    std::ostringstream o;
    for (const char* k : keys)
      if (const auto* t = root[k].as_table()) o << "[" << k << "]\n" << *t << "\n";
    return o.str() + s.model_text;
  };
  s.orbit_key = canon({"run", "galaxy", "tracers", "gas", "integration", "output"});
  if (const toml::table* ob = r.table("observation")) {
    s.observation = observe::observation_from_table(*ob, path, "observation", s.model);
    s.observation_key = s.orbit_key + canon({"observation"});
  }
  if (const toml::table* cm = r.table("comparison")) {
    TableReader q(*cm, path, "comparison");
    q.check_keys({"catalog",
                  "catalog_columns",
                  "distance",
                  "edsd_length_kpc",
                  "distance_prior",
                  "distance_min_kpc",
                  "distance_max_kpc",
                  "disk_scale_length_kpc",
                  "disk_scale_height_kpc",
                  "parallax_snr_min",
                  "draws",
                  "bootstrap",
                  "seed",
                  "neighbourhood",
                  "neighbours",
                  "neighbours_min",
                  "neighbourhood_radius_kpc",
                  "prediction_sources",
                  "radius_bins_kpc",
                  "azimuth_bins_deg",
                  "realisations",
                  "verdict_sources",
                  "verdict_tails",
                  "robust_dof",
                  "floor_kms",
                  "sun_nuisance",
                  "sun_velocity_err_kms",
                  "r0_nuisance",
                  "r0_err_kpc",
                  "arm_phase_range_deg"});
    Comparison c;
    c.catalog = io::path_beside(path, q.string("catalog"));
    c.catalog_columns = q.string_map_or_empty("catalog_columns");
    try {
      c.distance = residuals::distance_from_name(q.string_or("distance", "inverse"));
    } catch (const InputError& e) {
      q.fail("distance", e.what());
    }
    c.edsd_length_kpc = q.number_or("edsd_length_kpc", 1.35);
    try {
      c.prior.kind = fit::distance_prior_from_name(q.string_or("distance_prior", "uniform"));
    } catch (const InputError& e) {
      q.fail("distance_prior", e.what());
    }
    if (c.prior.kind == fit::DistancePrior::Kind::table ||
        c.prior.kind == fit::DistancePrior::Kind::edsd)
      q.fail("distance_prior",
             "must be \"uniform\" or \"disk\" (edsd: distance = \"edsd-median\")");
    c.prior.distance_min_kpc = q.number_or("distance_min_kpc", 0.0);
    c.prior.distance_max_kpc = q.number_or("distance_max_kpc", 20.0);
    c.prior.disk_scale_length_kpc = q.number_or("disk_scale_length_kpc", 3.0);
    c.prior.disk_scale_height_kpc = q.number_or("disk_scale_height_kpc", 0.1);
    try {
      c.prior.validate();
    } catch (const InputError& e) {
      q.fail(e.place().field, e.what());
    }
    c.parallax_snr_min = q.number_or("parallax_snr_min", 0.0);
    const auto whole = [&](const char* k, double d, double lo) {
      const double v = q.number_or(k, d);
      if (!(v >= lo && std::floor(v) == v && v < 1e9))
        q.fail(k, "must be a whole number of at least " + detail::num(lo));
      return v;
    };
    c.draws = int(whole("draws", residuals::kDefaultDraws, 2));
    c.bootstrap = int(whole("bootstrap", residuals::kDefaultBootstrap, 2));
    c.seed = std::uint64_t(whole("seed", 1, 0));
    const std::string nb = q.string_or("neighbourhood", "nearest");
    if (nb != "nearest" && nb != "radius")
      q.fail("neighbourhood", "must be \"nearest\" or \"radius\"");
    c.nearest = nb == "nearest";
    c.neighbours = std::size_t(whole("neighbours", 30, 2));
    c.min_neighbours = std::size_t(whole("neighbours_min", 5, 2));
    c.prediction_sources = std::size_t(whole("prediction_sources", 5000, 10));
    c.radius_kpc = q.number_or("neighbourhood_radius_kpc", 1.0);
    if (!(c.radius_kpc > 0)) q.fail("neighbourhood_radius_kpc", "must be positive");
    if (q.has("radius_bins_kpc")) c.radius_bins_kpc = q.numbers("radius_bins_kpc");
    if (q.has("azimuth_bins_deg")) c.azimuth_bins_deg = q.numbers("azimuth_bins_deg");
    for (const auto* e : {&c.radius_bins_kpc, &c.azimuth_bins_deg})
      for (std::size_t i = 1; i < e->size(); ++i)
        if (!((*e)[i] > (*e)[i - 1]))
          q.fail(e == &c.radius_bins_kpc ? "radius_bins_kpc" : "azimuth_bins_deg",
                 "bin edges must increase");
    c.realisations = std::size_t(whole("realisations", 4, 1));
    c.verdict_sources = std::size_t(whole("verdict_sources", 20000, 100));
    c.tails = q.string_or("verdict_tails", "student");
    if (c.tails != "student" && c.tails != "gaussian" && c.tails != "robust")
      q.fail("verdict_tails", "must be \"student\", \"gaussian\" or \"robust\"");
    c.robust_dof = q.number_or("robust_dof", 4);
    if (!(c.robust_dof >= 1 && c.robust_dof <= 1000)) q.fail("robust_dof", "must lie in [1, 1000]");
    if (q.has("floor_kms")) {
      std::vector<double> f;
      if (q.is_array("floor_kms"))
        f = q.numbers("floor_kms");
      else
        f = {q.number("floor_kms")};
      if (f.size() == 1) f.push_back(f[0]);
      if (f.size() != 2 || !(f[0] >= 0) || !(f[1] >= f[0]) || !(f[1] <= 200))
        q.fail("floor_kms", "must be one value or [minimum, maximum] in km/s, 0 <= min <= max "
                            "<= 200");
      c.floor_min_kms = f[0], c.floor_max_kms = f[1];
    }
    const bool sun_from_fit = s.observation && s.observation->settings.sun_velocity_cov;
    if (q.has("sun_velocity_err_kms")) {
      const auto e = q.numbers("sun_velocity_err_kms");
      if (e.size() != 3 || !(e[0] > 0 && e[1] > 0 && e[2] > 0))
        q.fail("sun_velocity_err_kms", "must hold three positive numbers: U, Theta0 + V, W");
      if (sun_from_fit)
        q.fail("sun_velocity_err_kms", "the Sun comes from a fit, whose posterior gives these");
      c.sun_velocity_err_kms = {e[0], e[1], e[2]};
    }
    const std::string nuis = q.string_or(
        "sun_nuisance", sun_from_fit || q.has("sun_velocity_err_kms") ? "marginalise" : "fixed");
    if (nuis != "fixed" && nuis != "marginalise")
      q.fail("sun_nuisance", "must be \"marginalise\" or \"fixed\"");
    c.marginalise_sun = nuis == "marginalise";
    if (c.marginalise_sun && !sun_from_fit && !q.has("sun_velocity_err_kms"))
      q.fail("sun_nuisance", "marginalising the Sun's velocity needs its uncertainty: "
                             "[observation.sun] from_fit, or sun_velocity_err_kms");
    const double fit_r0_err = s.observation ? s.observation->settings.r0_err_kpc : 0.0;
    if (q.has("r0_err_kpc")) {
      c.r0_err_kpc = q.number("r0_err_kpc");
      if (!(c.r0_err_kpc > 0 && c.r0_err_kpc < 5)) q.fail("r0_err_kpc", "must lie in (0, 5) kpc");
      if (fit_r0_err > 0)
        q.fail("r0_err_kpc", "the Sun comes from a fit, whose posterior gives it");
    }
    const std::string r0n = q.string_or("r0_nuisance", "fixed");
    if (r0n != "fixed" && r0n != "marginalise")
      q.fail("r0_nuisance", "must be \"marginalise\" or \"fixed\"");
    c.marginalise_r0 = r0n == "marginalise";
    if (c.marginalise_r0 && !(fit_r0_err > 0) && !q.has("r0_err_kpc"))
      q.fail("r0_nuisance", "marginalising R0 needs its uncertainty: [observation.sun] from_fit "
                            "with R0 free, or r0_err_kpc");
    if (fit_r0_err > 0) c.r0_err_kpc = fit_r0_err;
    if (q.has("arm_phase_range_deg")) {
      const auto a = q.numbers("arm_phase_range_deg");
      if (a.size() != 2 || !(a[0] <= a[1]) || !(a[0] >= -180) || !(a[1] <= 180))
        q.fail("arm_phase_range_deg", "must be [low, high] in degrees, -180 <= low <= high <= 180");
      bool spiral = false;
      for (const auto& pt : s.model.patterns)
        spiral = spiral || std::holds_alternative<potential::LogSpiral>(pt.shape) ||
                 std::holds_alternative<potential::CoxGomezSpiral>(pt.shape);
      if (!spiral) q.fail("arm_phase_range_deg", "the galaxy has no spiral pattern to turn");
      c.arm_phase_range_deg = std::array<double, 2>{a[0], a[1]};
    }
    s.comparison = c;
    s.comparison_key = s.observation_key + canon({"comparison"});
  }
  return s;
}

Scenario load_scenario(const std::string& path) {
  return parse_scenario(io::read_text_file(path), path);
}

} // namespace undertow::scenario

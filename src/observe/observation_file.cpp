#include "undertow/observe/observation_file.hpp"

#include <cmath>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/fit/report.hpp"
#include "undertow/io/paths.hpp"
#include "undertow/io/toml_table.hpp"

namespace undertow::observe {
namespace {

using io::TableReader;
std::string sub(const std::string& ctx, const char* name) {
  return ctx.empty() ? name : ctx + "." + name;
}

// A fit's Galactic parameters; a file that is not one is an error at the key.
fit::GalacticFromFit at_keys_fit(const TableReader& q, const std::string& path) {
  try {
    return fit::read_galactic_parameters(path);
  } catch (const InputError& e) {
    q.fail("from_fit", e.what());
  }
}

} // namespace

ObservationSpec observation_from_table(const toml::table& t, const std::string& file,
                                       const std::string& ctx, const potential::Model& m) {
  ObservationSpec spec;
  auto& s = spec.settings;
  TableReader r(t, file, ctx);
  r.check_keys({"seed", "lsr", "time_myr", "sun", "selection", "young", "errors"});
  const double seed = r.number_or("seed", 1);
  // below 2^53: every whole number there is exact, and the conversion to 64 bits is defined
  if (!(seed >= 0 && std::floor(seed) == seed && seed < 0x1p53))
    r.fail("seed", "must be a whole number from 0 to 2^53");
  s.seed = std::uint64_t(seed);
  try {
    s.lsr = sky::lsr_form_from_name(r.string_or("lsr", "apex"));
  } catch (const InputError& e) {
    r.fail("lsr", e.what());
  }
  spec.time_myr = r.optional_number("time_myr");

  const toml::table* sun = r.table("sun");
  if (!sun) r.fail("", "missing [" + sub(ctx, "sun") + "] table");
  {
    TableReader q(*sun, file, sub(ctx, "sun"));
    q.check_keys({"r0_kpc", "z_sun_kpc", "theta0_kms", "solar_motion_kms", "from_fit"});
    if (q.has("from_fit")) {
      // The Sun of a finished kinematic fit (its posterior median). Θ0 stays the model's
      // circular speed, the model defining rotation; V☉ is set so that the Sun's total
      // velocity Θ0 + V☉, which the data measure, is the fit's.
      for (const char* k : {"r0_kpc", "z_sun_kpc", "theta0_kms", "solar_motion_kms"})
        if (q.has(k)) q.fail(k, "cannot be combined with from_fit (the fit gives it)");
      const std::string path = io::path_beside(file, q.string("from_fit"));
      const auto g = at_keys_fit(q, path);
      const auto& p = g.median;
      const auto at = [&](fit::Param k) { return p[std::size_t(k)]; };
      s.sun.r0_kpc = at(fit::Param::r0);
      s.sun.z_sun_kpc = at(fit::Param::z_sun);
      s.sun.theta0_kms = dynamics::circular_speed(m, s.sun.r0_kpc);
      s.sun.u_sun_kms = at(fit::Param::u_sun);
      s.sun.v_sun_kms = g.model.theta0(p) + at(fit::Param::v_sun) - s.sun.theta0_kms;
      s.sun.w_sun_kms = at(fit::Param::w_sun);
      if (r.has("lsr") && s.lsr != g.model.lsr)
        r.fail("lsr", "contradicts the LSR of the kinematic fit " + path);
      s.lsr = g.model.lsr;
      s.sun_source = std::string(g.converged ? "" : "NOT CONVERGED ") + "kinematic fit " + path +
                     " (posterior median; Theta0 the model's v_c(R0), V_sun set so that "
                     "Theta0 + V_sun = " +
                     detail::num(g.model.theta0(p) + at(fit::Param::v_sun)) + " km/s as fitted)";
      // the posterior covariance of (R0, U, Θ0 + V, W), for the verdict's nuisances
      if (g.samples.size() > 10) {
        std::vector<std::array<double, 4>> v;
        for (const auto& x : g.samples)
          v.push_back({x[std::size_t(fit::Param::r0)], x[std::size_t(fit::Param::u_sun)],
                       g.model.theta0(x) + x[std::size_t(fit::Param::v_sun)],
                       x[std::size_t(fit::Param::w_sun)]});
        std::array<double, 4> mean{};
        for (const auto& x : v)
          for (std::size_t a = 0; a < 4; ++a)
            mean[a] += x[a] / double(v.size());
        std::array<double, 16> cov{};
        for (const auto& x : v)
          for (std::size_t a = 0; a < 4; ++a)
            for (std::size_t b = 0; b < 4; ++b)
              cov[4 * a + b] += (x[a] - mean[a]) * (x[b] - mean[b]) / double(v.size() - 1);
        // a component the fit held fixed has no spread: give it 0.01 km/s, not a singular prior
        std::array<double, 9> vel{};
        for (std::size_t a = 0; a < 3; ++a)
          for (std::size_t b = 0; b < 3; ++b)
            vel[3 * a + b] = cov[4 * (a + 1) + b + 1];
        for (std::size_t a = 0; a < 3; ++a)
          vel[4 * a] = std::max(vel[4 * a], 1e-4);
        s.sun_velocity_cov = vel;
        s.r0_err_kpc = std::sqrt(cov[0]);
        for (std::size_t a = 0; a < 3; ++a)
          s.sun_velocity_r0_cov[a] = cov[4 * (a + 1)];
      }
      q.finish({"from_fit"});
      try {
        s.sun.validate();
      } catch (const InputError& e) {
        q.fail("from_fit", e.what());
      }
    } else {
      s.sun.r0_kpc = q.number("r0_kpc");
      s.sun.z_sun_kpc = q.number_or("z_sun_kpc", 0.0);
      if (q.has("solar_motion_kms")) {
        const auto v = q.numbers("solar_motion_kms");
        if (v.size() != 3) q.fail("solar_motion_kms", "must hold three numbers: U, V, W");
        s.sun.u_sun_kms = v[0], s.sun.v_sun_kms = v[1], s.sun.w_sun_kms = v[2];
      }
      s.sun.theta0_kms = q.number_or("theta0_kms", dynamics::circular_speed(m, s.sun.r0_kpc));
      try {
        s.sun.validate();
      } catch (const InputError& e) {
        q.fail(e.place().field, e.what());
      }
    }
  }
  if (const toml::table* sel = r.table("selection")) {
    TableReader q(*sel, file, sub(ctx, "selection"));
    q.check_keys({"distance_min_kpc", "distance_max_kpc", "latitude_max_deg", "dec_min_deg",
                  "dec_max_deg", "parallax_snr_min", "parallax_min_mas", "parallax_max_mas",
                  "sources_max"});
    auto& x = s.selection;
    x.distance_min_kpc = q.number_or("distance_min_kpc", 0.0);
    x.distance_max_kpc = q.number_or("distance_max_kpc", 1e9);
    if (!(x.distance_max_kpc > x.distance_min_kpc))
      q.fail("distance_max_kpc", "must exceed distance_min_kpc");
    x.latitude_max_deg = q.number_or("latitude_max_deg", 90.0);
    x.dec_min_deg = q.number_or("dec_min_deg", -90.0);
    x.dec_max_deg = q.number_or("dec_max_deg", 90.0);
    if (!(x.dec_max_deg > x.dec_min_deg)) q.fail("dec_max_deg", "must exceed dec_min_deg");
    x.parallax_snr_min = q.number_or("parallax_snr_min", 0.0);
    x.parallax_min_mas = q.number_or("parallax_min_mas", -1e300);
    x.parallax_max_mas = q.number_or("parallax_max_mas", 1e300);
    if (!(x.parallax_max_mas > x.parallax_min_mas))
      q.fail("parallax_max_mas", "must exceed parallax_min_mas");
    const double n = q.number_or("sources_max", 0.0);
    if (!(n >= 0 && std::floor(n) == n))
      q.fail("sources_max", "must be a whole number (0: no limit)");
    x.max_sources = std::size_t(n);
  }
  if (const toml::table* y = r.table("young")) {
    TableReader q(*y, file, sub(ctx, "young"));
    YoungWeights w;
    if (q.has("star_age_myr")) {
      q.check_keys({"star_age_myr"});
      const auto a = q.numbers("star_age_myr");
      if (a.size() != 2 || !(a[0] >= 0) || !(a[1] >= a[0]))
        q.fail("star_age_myr", "must be [youngest, oldest] in Myr, 0 <= youngest <= oldest");
      w.star_age_myr = std::array<double, 2>{a[0], a[1]};
    } else {
      q.check_keys({"exponent", "age_window_myr", "density", "cell_kpc"});
      const std::string d = q.string_or("density", "model");
      if (d == "tracers")
        w.density = YoungWeights::Density::tracers;
      else if (d != "model")
        q.fail("density", "must be \"model\" or \"tracers\"");
      w.cell_kpc = q.number_or("cell_kpc", 0.25);
      if (!(w.cell_kpc > 0)) q.fail("cell_kpc", "must be positive");
      w.exponent = q.number_or("exponent", 1.4);
      if (!(w.exponent > 0)) q.fail("exponent", "must be positive");
      w.age_window_myr = q.number("age_window_myr");
      if (!(w.age_window_myr >= 0)) q.fail("age_window_myr", "must not be negative");
    }
    s.young = w;
  }
  const toml::table* er = r.table("errors");
  if (!er) r.fail("", "missing [" + sub(ctx, "errors") + "] table");
  {
    TableReader q(*er, file, sub(ctx, "errors"));
    const std::string kind = q.string("kind");
    auto& e = s.errors;
    const auto pos = [&](const char* k, double d) {
      const double v = q.number_or(k, d);
      if (!(v > 0)) q.fail(k, "must be positive");
      return v;
    };
    if (kind == "fixed") {
      q.check_keys({"kind", "parallax_err_mas", "pm_err_masyr", "vlsr_err_kms"});
      e.kind = ErrorModel::Kind::fixed;
      e.parallax_mas = pos("parallax_err_mas", 0.02);
    } else if (kind == "fractional") {
      q.check_keys({"kind", "parallax_err_fraction", "pm_err_masyr", "vlsr_err_kms"});
      e.kind = ErrorModel::Kind::fractional;
      e.parallax_fraction = pos("parallax_err_fraction", 0.1);
    } else if (kind == "distance") {
      q.check_keys({"kind", "distance_err_fraction", "pm_err_masyr", "vlsr_err_kms"});
      e.kind = ErrorModel::Kind::distance;
      e.distance_fraction = pos("distance_err_fraction", 0.1);
    } else if (kind == "catalog") {
      q.check_keys({"kind", "catalog", "catalog_columns"});
      e.kind = ErrorModel::Kind::catalog;
      residuals::CatalogOptions co;
      co.columns = q.string_map_or_empty("catalog_columns");
      e.reference = residuals::read_catalog(io::path_beside(file, q.string("catalog")), co);
    } else {
      q.fail("kind", "must be \"fixed\", \"fractional\", \"distance\" or \"catalog\", got \"" +
                         kind + "\"");
    }
    if (e.kind != ErrorModel::Kind::catalog) {
      e.pm_masyr = pos("pm_err_masyr", 0.1);
      e.vlsr_kms = pos("vlsr_err_kms", 5.0);
    }
  }
  return spec;
}

ObservationSpec load_observation_file(const std::string& path, const potential::Model& m) {
  return observation_from_table(io::parse_toml_file(path), path, "", m);
}

} // namespace undertow::observe

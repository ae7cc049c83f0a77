#include "undertow/fit/fit_file.hpp"

#include <algorithm>
#include <cmath>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/io/paths.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/io/toml_table.hpp"
#include "undertow/potential/model_file.hpp"

namespace undertow::fit {

double default_value(Param p) {
  switch (p) {
  case Param::r0:
    return 8.1;
  case Param::theta0:
    return 230;
  case Param::sun_angular_speed:
    return (230 + 12.24) / 8.1;
  case Param::model_scale:
    return 1;
  case Param::u_sun: // Schönrich, Binney & Dehnen 2010, MNRAS 403, 1829
    return 11.1;
  case Param::v_sun:
    return 12.24;
  case Param::w_sun:
    return 7.25;
  case Param::dispersion:
  case Param::dispersion_u:
  case Param::dispersion_v:
  case Param::dispersion_w:
    return 5;
  case Param::outlier_fraction:
    return 0.05;
  case Param::disk_scale_length:
    return 3.0;
  case Param::disk_scale_height:
    return 0.1;
  default:
    return 0;
  }
}

namespace {

ParamSetting read_param(const io::TableReader& r, const std::string& key, Param p,
                        const toml::node& n, const std::string& file) {
  ParamSetting s;
  s.param = p;
  s.place = r.place(key);
  const auto domain = [&](const io::TableReader& where, const std::string& k, double v) {
    if (!in_domain(p, v))
      where.fail(k, "value " + detail::num(v) + " is outside what the parameter allows (" +
                        (p == Param::outlier_fraction ? "[0, 1]" : "positive") + ")");
  };
  if (n.is_number()) {
    s.value = r.number(key);
    domain(r, key, s.value);
    return s;
  }
  const auto* t = n.as_table();
  if (!t)
    r.fail(key, "must be a number (fixed) or a table such as { start = 8.1, min = 6, max = 11 }");
  io::TableReader q(*t, file, "parameters." + key);
  q.check_keys({"fixed", "start", "min", "max", "mean", "sigma"});
  if (q.has("fixed")) {
    s.value = q.number("fixed");
    domain(q, "fixed", s.value);
    q.finish({"fixed"});
    return s;
  }
  s.free = true;
  const auto mn = q.optional_number("min"), mx = q.optional_number("max");
  const auto mean = q.optional_number("mean"), sigma = q.optional_number("sigma");
  if (mn) s.prior.min = *mn;
  if (mx) s.prior.max = *mx;
  if (mn && mx && !(*mx > *mn)) q.fail("max", "must be larger than min");
  if (mean.has_value() != sigma.has_value())
    q.fail(mean ? "mean" : "sigma", "a Gaussian prior needs both mean and sigma");
  if (sigma) {
    if (!(*sigma > 0))
      q.fail("sigma", "a prior's width must be positive, got " + detail::num(*sigma));
    s.prior.kind = Prior::Kind::gaussian;
    s.prior.mean = *mean, s.prior.sigma = *sigma;
    if (!(*mean >= s.prior.min && *mean <= s.prior.max))
      q.fail("mean", "the Gaussian prior's mean lies outside its limits [min, max]");
  } else if (mn && mx) {
    s.prior.kind = Prior::Kind::uniform;
  }
  s.value = q.has("start") ? q.number("start")
            : sigma        ? *mean
            : (mn && mx)   ? 0.5 * (*mn + *mx)
                         : (q.fail("", "a free parameter needs a start value (start = ...)"), 0.0);
  if (!(s.value >= s.prior.min && s.value <= s.prior.max))
    q.fail(q.has("start") ? "start" : "", "the start value lies outside [min, max]");
  if (!in_domain(p, s.value))
    q.fail(q.has("start") ? "start" : "",
           "the start value " + detail::num(s.value) + " is outside what the parameter allows");
  q.finish({"start", "min", "max", "mean", "sigma"});
  return s;
}

} // namespace

FitFile parse_fit_file(const std::string& text, const std::string& name) {
  FitFile f;
  f.text = text;
  FitSpec& s = f.spec;
  s.file = name;
  const toml::table root = io::parse_toml_text(text, name);
  io::TableReader r(root, name, "");
  const std::vector<std::string> top{"catalog",           "catalog_columns", "lsr",
                                     "longitude_min_deg", "rotation",        "distances",
                                     "velocities",        "sampler",         "parameters"};
  r.check_keys(top);
  s.catalog_path = io::path_beside(name, r.string("catalog"));
  s.catalog_columns = r.string_map_or_empty("catalog_columns");
  KinematicModel& m = s.model;
  m.lsr = io::at_keys(r, [&] { return sky::lsr_form_from_name(r.string_or("lsr", "apex")); });
  if (r.has("radius_min_kpc"))
    r.fail("radius_min_kpc", "a cut in R biases the distances of the sources kept: use "
                             "longitude_min_deg, a cut on direction alone");
  f.longitude_min_deg = r.number_or("longitude_min_deg", 15);
  if (!(f.longitude_min_deg >= 0 && f.longitude_min_deg < 90))
    r.fail("longitude_min_deg", "must lie in [0, 90)");

  const toml::table empty;
  const auto sub = [&](const char* k) { return r.table(k) ? *r.table(k) : empty; };
  const toml::table rot_t = sub("rotation"), dist_t = sub("distances"), vel_t = sub("velocities"),
                    samp_t = sub("sampler");
  io::TableReader rot(rot_t, name, "rotation");
  rot.check_keys({"form", "model_file"});
  try {
    m.rotation = rotation_form_from_name(rot.string_or("form", "flat"));
  } catch (const InputError& e) {
    rot.fail("form", e.what());
  }
  if (m.rotation == RotationForm::model) {
    f.model_file = io::path_beside(name, rot.string("model_file"));
    const auto model = potential::load_model_file(f.model_file);
    m.model_step_kpc = 0.01;
    for (int i = 0; i <= 3000; ++i) // 0 to 30 kpc
      m.model_vc_kms.push_back(i == 0 ? 0.0 : dynamics::circular_speed(model, i * 0.01));
  }
  rot.finish({"form", "model_file"});

  io::TableReader dist(dist_t, name, "distances");
  const std::vector<std::string> dkeys{"prior",
                                       "distance_min_kpc",
                                       "distance_max_kpc",
                                       "parallax_snr_min",
                                       "edsd_length_kpc",
                                       "density_table",
                                       "nodes"};
  dist.check_keys(dkeys);
  DistancePrior& p = m.prior;
  try {
    p.kind = distance_prior_from_name(dist.string_or("prior", "uniform"));
  } catch (const InputError& e) {
    dist.fail("prior", e.what());
  }
  p.distance_min_kpc = dist.number_or("distance_min_kpc", 0);
  p.distance_max_kpc = dist.number("distance_max_kpc");
  p.parallax_snr_min = dist.number_or("parallax_snr_min", 0);
  p.edsd_length_kpc = dist.number_or("edsd_length_kpc", 1.35);
  if (p.kind == DistancePrior::Kind::table) {
    const std::string tf = io::path_beside(name, dist.string("density_table"));
    read_density_table(tf, p);
  }
  m.nodes = dist.has("nodes") ? dist.integer("nodes") : 64;
  if (m.nodes < 8 || m.nodes > 1024) dist.fail("nodes", "must lie between 8 and 1024");
  try {
    p.validate();
  } catch (const InputError& e) {
    dist.fail(e.place().field, e.what());
  }
  dist.finish(dkeys);

  io::TableReader vel(vel_t, name, "velocities");
  vel.check_keys({"dispersion", "outliers", "outlier_dispersion_kms"});
  const std::string disp = vel.string_or("dispersion", "isotropic");
  if (disp != "isotropic" && disp != "per-component")
    vel.fail("dispersion", "must be \"isotropic\" or \"per-component\"");
  m.anisotropic = disp == "per-component";
  m.outliers = vel.boolean_or("outliers", false);
  m.outlier_dispersion_kms = vel.number_or("outlier_dispersion_kms", 50);
  if (!(m.outlier_dispersion_kms > 0)) vel.fail("outlier_dispersion_kms", "must be positive");
  vel.finish({"dispersion", "outliers", "outlier_dispersion_kms"});

  io::TableReader sm(samp_t, name, "sampler");
  const std::vector<std::string> skeys{
      "walkers", "steps_max",   "tau_multiple",       "r_hat_max",
      "seed",    "de_fraction", "accept_unconverged", "accept_degenerate"};
  sm.check_keys(skeys);
  SamplerSettings& ss = s.sampler;
  ss.walkers = sm.has("walkers") ? sm.integer("walkers") : 0;
  if (ss.walkers != 0 && (ss.walkers < 4 || ss.walkers % 2))
    sm.fail("walkers", "must be an even number of at least 4 (or 0 for the default)");
  ss.steps_max = sm.has("steps_max") ? sm.integer("steps_max") : ss.steps_max;
  if (ss.steps_max < 100) sm.fail("steps_max", "must be at least 100");
  ss.tau_multiple = sm.number_or("tau_multiple", ss.tau_multiple);
  if (!(ss.tau_multiple >= 10)) sm.fail("tau_multiple", "must be at least 10");
  ss.r_hat_max = sm.number_or("r_hat_max", ss.r_hat_max);
  if (!(ss.r_hat_max > 1)) sm.fail("r_hat_max", "must be larger than 1");
  ss.seed = sm.has("seed") ? std::uint64_t(sm.integer("seed")) : 1;
  ss.de_fraction = sm.number_or("de_fraction", ss.de_fraction);
  if (!(ss.de_fraction >= 0 && ss.de_fraction <= 1)) sm.fail("de_fraction", "must lie in [0, 1]");
  ss.accept_unconverged = sm.boolean_or("accept_unconverged", false);
  s.accept_degenerate = sm.boolean_or("accept_degenerate", false);
  sm.finish(skeys);

  // parameters
  const auto* pt = r.table("parameters");
  if (pt && pt->contains("theta0_kms") && pt->contains("sun_angular_speed_kms_kpc"))
    r.fail("parameters", "give theta0_kms or sun_angular_speed_kms_kpc, not both");
  m.angular_speed_form = pt && pt->contains("sun_angular_speed_kms_kpc");
  const auto used = m.used_params();
  std::vector<ParamSetting> given;
  if (pt) {
    io::TableReader pr(*pt, name, "parameters");
    for (const auto& [k, node] : *pt) {
      const std::string key(k.str());
      const Param par = param_from_key(key, pr.place(key));
      if (std::find(used.begin(), used.end(), par) == used.end())
        pr.fail(key, "is not used by this model (rotation form '" + rotation_form_name(m.rotation) +
                         "', distance prior '" + distance_prior_name(p.kind) + "', dispersion '" +
                         disp + "', outliers " + (m.outliers ? "on" : "off") + ")");
      given.push_back(read_param(pr, key, par, node, name));
    }
  }
  r.table("parameters");
  for (Param u : used) {
    const auto it = std::find_if(given.begin(), given.end(),
                                 [&](const ParamSetting& q) { return q.param == u; });
    if (it != given.end()) {
      s.params.push_back(*it);
    } else {
      ParamSetting d;
      d.param = u;
      d.value = default_value(u);
      s.params.push_back(d);
    }
  }
  r.finish(top);
  return f;
}

FitFile load_fit_file(const std::string& path) {
  return parse_fit_file(io::read_text_file(path), path);
}

} // namespace undertow::fit

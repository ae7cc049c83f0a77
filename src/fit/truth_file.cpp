#include "undertow/fit/truth_file.hpp"

#include <algorithm>
#include <cmath>

#include "undertow/fit/fit_file.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/io/toml_table.hpp"

namespace undertow::fit {

KinematicTruth parse_truth_file(const std::string& text, const std::string& name) {
  KinematicTruth t;
  const toml::table root = io::parse_toml_text(text, name);
  io::TableReader r(root, name, "");
  const std::vector<std::string> top{"sources",   "seed",   "lsr",        "rotation", "volume",
                                     "streaming", "errors", "parameters", "arms"};
  r.check_keys(top);
  const int n = r.integer("sources");
  if (n < 1 || n > 10000000) r.fail("sources", "must lie between 1 and 10 000 000");
  t.sources = std::size_t(n);
  t.seed = r.has("seed") ? std::uint64_t(r.integer("seed")) : 1;
  t.model.lsr = io::at_keys(r, [&] { return sky::lsr_form_from_name(r.string_or("lsr", "apex")); });
  const toml::table empty;
  const auto sub = [&](const char* k) { return r.table(k) ? *r.table(k) : empty; };
  const toml::table rot_t = sub("rotation"), vol_t = sub("volume"), str_t = sub("streaming"),
                    err_t = sub("errors");
  io::TableReader rot(rot_t, name, "rotation");
  rot.check_keys({"form"});
  try {
    t.model.rotation = rotation_form_from_name(rot.string_or("form", "flat"));
  } catch (const InputError& e) {
    rot.fail("form", e.what());
  }
  if (t.model.rotation == RotationForm::model)
    rot.fail("form", "a truth file takes flat, linear or power-law");
  rot.finish({"form"});
  io::TableReader vol(vol_t, name, "volume");
  const std::vector<std::string> vkeys{"distance_min_kpc",      "distance_max_kpc",
                                       "longitude_min_deg",     "dec_min_deg",
                                       "disk_scale_length_kpc", "scale_height_kpc"};
  vol.check_keys(vkeys);
  t.distance_min_kpc = vol.number_or("distance_min_kpc", t.distance_min_kpc);
  t.distance_max_kpc = vol.number_or("distance_max_kpc", t.distance_max_kpc);
  if (!(t.distance_min_kpc >= 0)) vol.fail("distance_min_kpc", "must not be negative");
  if (!(t.distance_max_kpc > t.distance_min_kpc))
    vol.fail("distance_max_kpc", "must be larger than distance_min_kpc");
  t.longitude_min_deg = vol.number_or("longitude_min_deg", t.longitude_min_deg);
  if (!(t.longitude_min_deg >= 0 && t.longitude_min_deg < 180))
    vol.fail("longitude_min_deg", "must lie in [0, 180)");
  t.dec_min_deg = vol.number_or("dec_min_deg", t.dec_min_deg);
  if (!(t.dec_min_deg >= -90 && t.dec_min_deg < 90))
    vol.fail("dec_min_deg", "must lie in [-90, 90)");
  t.disk_scale_length_kpc = vol.number_or("disk_scale_length_kpc", t.disk_scale_length_kpc);
  if (!(t.disk_scale_length_kpc >= 0)) vol.fail("disk_scale_length_kpc", "must not be negative");
  t.scale_height_kpc = vol.number_or("scale_height_kpc", t.scale_height_kpc);
  if (!(t.scale_height_kpc > 0)) vol.fail("scale_height_kpc", "must be positive");
  vol.finish(vkeys);
  io::TableReader st(str_t, name, "streaming");
  st.check_keys({"amplitude_kms", "arms", "pitch_deg"});
  t.stream_kms = st.number_or("amplitude_kms", 0);
  t.arms = st.has("arms") ? st.integer("arms") : 4;
  if (t.arms < 1 || t.arms > 16) st.fail("arms", "must lie between 1 and 16");
  t.pitch_deg = st.number_or("pitch_deg", 12);
  if (!(t.pitch_deg > 0 && t.pitch_deg < 90)) st.fail("pitch_deg", "must lie in (0, 90)");
  st.finish({"amplitude_kms", "arms", "pitch_deg"});
  {
    const toml::table arm_t = sub("arms");
    io::TableReader ar(arm_t, name, "arms");
    const std::vector<std::string> akeys{"arms",        "pitch_deg",   "radius_kpc", "width_kpc",
                                         "psi_min_deg", "psi_max_deg", "only"};
    ar.check_keys(akeys);
    auto& a = t.placement;
    if (r.table("arms")) {
      a.arms = ar.integer("arms");
      if (a.arms < 1 || a.arms > 16) ar.fail("arms", "must lie between 1 and 16");
      a.pitch_deg = ar.number("pitch_deg");
      if (!(a.pitch_deg > 0 && a.pitch_deg < 90)) ar.fail("pitch_deg", "must lie in (0, 90)");
      a.radius_kpc = ar.number("radius_kpc");
      if (!(a.radius_kpc > 0)) ar.fail("radius_kpc", "must be positive");
      a.width_kpc = ar.number("width_kpc");
      if (!(a.width_kpc > 0)) ar.fail("width_kpc", "must be positive");
      a.psi_min_deg = ar.number_or("psi_min_deg", -180);
      a.psi_max_deg = ar.number_or("psi_max_deg", 180);
      if (!(a.psi_min_deg >= -180 && a.psi_max_deg <= 180 && a.psi_min_deg < a.psi_max_deg))
        ar.fail("psi_max_deg", "the azimuth range must lie in [-180, 180] with min < max");
      if (ar.has("only"))
        for (double k : ar.numbers("only")) {
          if (k != std::round(k))
            ar.fail("only", "lists whole arm numbers (0: arm0, 1: arm1, ...)");
          a.only.push_back(int(k));
        }
    }
    ar.finish(akeys);
  }
  io::TableReader er(err_t, name, "errors");
  const std::vector<std::string> ekeys{"parallax_err_mas", "distance_err_fraction", "pm_err_masyr",
                                       "vlsr_err_kms", "parallax_snr_min"};
  er.check_keys(ekeys);
  // parallaxes with a fixed error, or (distance_err_fraction) distances given instead
  const bool distances = er.has("distance_err_fraction");
  if (distances && er.has("parallax_err_mas"))
    er.fail("distance_err_fraction", "give parallax_err_mas or distance_err_fraction, not both");
  t.errors.kind =
      distances ? observe::ErrorModel::Kind::distance : observe::ErrorModel::Kind::fixed;
  const char* first = distances ? "distance_err_fraction" : "parallax_err_mas";
  (distances ? t.errors.distance_fraction : t.errors.parallax_mas) = er.number(first);
  t.errors.pm_masyr = er.number("pm_err_masyr");
  t.errors.vlsr_kms = er.number("vlsr_err_kms");
  for (const char* k : {first, "pm_err_masyr", "vlsr_err_kms"})
    if (!(er.number(k) > 0)) er.fail(k, "an error must be positive");
  t.parallax_snr_min = er.number_or("parallax_snr_min", 0);
  er.finish(ekeys);
  // the model's parameters, each a number; the defaults of fit files for the rest
  t.model.anisotropic = false;
  const auto* pt = r.table("parameters");
  if (pt && (pt->contains("dispersion_u_kms") || pt->contains("dispersion_v_kms") ||
             pt->contains("dispersion_w_kms")))
    t.model.anisotropic = true;
  t.model.prior.kind = DistancePrior::Kind::disk;
  const auto used = t.model.used_params();
  for (Param p : used)
    t.params[std::size_t(p)] = default_value(p);
  if (pt) {
    io::TableReader pr(*pt, name, "parameters");
    for (const auto& [k, node] : *pt) {
      const std::string key(k.str());
      const Param p = param_from_key(key, pr.place(key));
      if (std::find(used.begin(), used.end(), p) == used.end() || p == Param::disk_scale_length ||
          p == Param::disk_scale_height || p == Param::outlier_fraction)
        pr.fail(key, "is not a parameter of this truth (the volume is under [volume])");
      t.params[std::size_t(p)] = pr.number(key);
    }
    pr.finish({});
  }
  t.params[std::size_t(Param::disk_scale_length)] = t.disk_scale_length_kpc;
  t.params[std::size_t(Param::disk_scale_height)] = t.scale_height_kpc;
  r.finish(top);
  return t;
}

KinematicTruth load_truth_file(const std::string& path) {
  return parse_truth_file(io::read_text_file(path), path);
}

} // namespace undertow::fit

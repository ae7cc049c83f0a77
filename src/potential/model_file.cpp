// Reads galaxy model files. Every table is read strictly (unknown keys are errors) and every
// parameter error is reported at the line of the offending key.
#include "undertow/potential/model_file.hpp"

#include <cmath>
#include <functional>
#include <limits>
#include <map>
#include <optional>
#include <set>

#include "undertow/dynamics/calibration.hpp"
#include "undertow/dynamics/frequencies.hpp"
#include "undertow/io/hdf5.hpp"
#include "undertow/io/paths.hpp"
#include "undertow/io/toml_table.hpp"

namespace undertow::potential {
namespace {

using io::at_keys;
using io::TableReader;
constexpr double inf = std::numeric_limits<double>::infinity();

struct KindSpec {
  std::vector<std::string> keys; // besides label and kind
  std::function<ComponentShape(const TableReader&)> make;
};

const std::map<std::string, KindSpec>& component_specs() {
  static const std::map<std::string, KindSpec> specs = {
      {PointMass::kind,
       {{"mass_msun"},
        [](const TableReader& r) -> ComponentShape {
          return PointMass::make(r.number("mass_msun"));
        }}},
      {Plummer::kind,
       {{"mass_msun", "scale_kpc"},
        [](const TableReader& r) -> ComponentShape {
          return Plummer::make(r.number("mass_msun"), r.number("scale_kpc"));
        }}},
      {Hernquist::kind,
       {{"mass_msun", "scale_kpc"},
        [](const TableReader& r) -> ComponentShape {
          return Hernquist::make(r.number("mass_msun"), r.number("scale_kpc"));
        }}},
      {Isochrone::kind,
       {{"mass_msun", "scale_kpc"},
        [](const TableReader& r) -> ComponentShape {
          return Isochrone::make(r.number("mass_msun"), r.number("scale_kpc"));
        }}},
      {MiyamotoNagai::kind,
       {{"mass_msun", "radial_scale_kpc", "vertical_scale_kpc"},
        [](const TableReader& r) -> ComponentShape {
          return MiyamotoNagai::make(r.number("mass_msun"), r.number("radial_scale_kpc"),
                                     r.number("vertical_scale_kpc"));
        }}},
      {Nfw::kind,
       {{"density_msun_kpc3", "scale_kpc", "virial_mass_msun", "concentration", "overdensity",
         "hubble_kms_mpc"},
        [](const TableReader& r) -> ComponentShape {
          const bool by_density = r.has("density_msun_kpc3") || r.has("scale_kpc");
          const bool by_virial = r.has("virial_mass_msun") || r.has("concentration");
          if (by_density == by_virial)
            r.fail("", "give either density_msun_kpc3 and scale_kpc, or virial_mass_msun and "
                       "concentration (with optional overdensity, hubble_kms_mpc)");
          if (by_density) return Nfw::make(r.number("density_msun_kpc3"), r.number("scale_kpc"));
          return Nfw::make_virial(r.number("virial_mass_msun"), r.number("concentration"),
                                  r.number_or("overdensity", 200.0),
                                  r.number_or("hubble_kms_mpc", 70.0));
        }}},
      {Logarithmic::kind,
       {{"speed_kms", "core_kpc", "flattening"},
        [](const TableReader& r) -> ComponentShape {
          return Logarithmic::make(r.number("speed_kms"), r.number_or("core_kpc", 0.0),
                                   r.number_or("flattening", 1.0));
        }}},
      {Burkert::kind,
       {{"density_msun_kpc3", "core_kpc"},
        [](const TableReader& r) -> ComponentShape {
          return Burkert::make(r.number("density_msun_kpc3"), r.number("core_kpc"));
        }}},
      {TaperedCusp::kind,
       {{"density_msun_kpc3", "reference_radius_kpc", "slope", "cutoff_kpc"},
        [](const TableReader& r) -> ComponentShape {
          return TaperedCusp::make(r.number("density_msun_kpc3"), r.number("reference_radius_kpc"),
                                   r.number("slope"), r.number("cutoff_kpc"));
        }}},
      {AllenSantillanHalo::kind,
       {{"mass_msun", "scale_kpc", "exponent", "cutoff_kpc"},
        [](const TableReader& r) -> ComponentShape {
          return AllenSantillanHalo::make(r.number("mass_msun"), r.number("scale_kpc"),
                                          r.number_or("exponent", 2.02),
                                          r.number_or("cutoff_kpc", 100.0));
        }}},
  };
  return specs;
}

template <class Map> std::string kinds_of(const Map& m) {
  std::string s;
  for (const auto& [k, v] : m)
    s += (s.empty() ? "" : ", ") + k;
  return s;
}

std::string context_for(const char* table, const std::string& label, std::size_t index) {
  return std::string(table) + "[" + (label.empty() ? std::to_string(index + 1) : label) + "]";
}

Component read_component(const toml::table& t, const std::string& file, const std::string& ctx,
                         std::size_t index) {
  const std::string label_hint = t["label"].value_or(std::string{});
  TableReader r(t, file,
                ctx.empty() ? context_for("component", label_hint, index)
                            : ctx + "." + context_for("component", label_hint, index));
  const std::string kind = r.string("kind");
  const auto& specs = component_specs();
  const auto it = specs.find(kind);
  if (kind == "power-law-cutoff") // renamed (CHANGELOG.md)
    r.fail("kind", "renamed: write \"tapered-cusp\", with reference_radius_kpc given (see "
                   "CHANGELOG.md and docs/migration.md)");
  if (it == specs.end())
    r.fail("kind", "unknown component kind '" + kind + "'; known kinds: " + kinds_of(specs));
  std::vector<std::string> valid{"kind", "label"};
  valid.insert(valid.end(), it->second.keys.begin(), it->second.keys.end());
  r.check_keys(valid);
  Component c;
  c.label = r.string_or("label", kind);
  c.shape = at_keys(r, [&] { return it->second.make(r); });
  r.finish(valid);
  return c;
}

const std::vector<std::string> pattern_common = {"kind",
                                                 "label",
                                                 "pattern_speed_kms_kpc",
                                                 "phase_deg",
                                                 "arm_azimuth_deg",
                                                 "arm_azimuth_at_myr",
                                                 "grow_start_myr",
                                                 "grow_duration_myr"};

// A finished arm fit ('undertow arms', its arms.h5): the preferred number of arms, their shared
// pitch, and the azimuth at which an arm crosses a radius, at the time of the catalog.
struct FittedArms {
  int arms = 0;
  double pitch_deg = 0, azimuth_deg = 0, radius_kpc = 0;
};

FittedArms read_fitted_arms(const TableReader& r, const std::string& model_file) {
  const std::string path = io::path_beside(model_file, r.string("arms_from"));
  FittedArms a;
  try {
    const auto f = io::h5::File::open_read(path);
    const auto g = io::h5::open_group(f, "preferred");
    a.arms = int(io::h5::get_attr_int(f, g.id(), "arms"));
    a.pitch_deg = io::h5::get_attr_double(f, g.id(), "pitch_deg");
    a.azimuth_deg = io::h5::get_attr_double(f, g.id(), "arm_azimuth_deg");
    a.radius_kpc = io::h5::get_attr_double(f, g.id(), "arm_azimuth_radius_kpc");
  } catch (const std::exception&) {
    r.fail("arms_from", path + " is not the arms.h5 of an arm fit of two segments or more "
                               "(undertow arms writes /preferred only when it counts arms)");
  }
  return a;
}

// Builds a pattern; force ratios and bar strengths need the finished axisymmetric model.
// The arms' layer thickness h (kpc): 0.3 unless given, infinite (no vertical decay) for
// `planar = true`, which excludes a thickness.
double planar_arms(const io::TableReader& r) {
  if (!r.boolean_or("planar", false)) return r.number_or("scale_height_kpc", 0.3);
  if (r.has("scale_height_kpc"))
    r.fail("scale_height_kpc", "planar arms have no thickness: give planar or scale_height_kpc");
  return inf;
}

Pattern read_pattern(const toml::table& t, const std::string& file, const std::string& ctx,
                     std::size_t index, const Model& axi) {
  const std::string label_hint = t["label"].value_or(std::string{});
  TableReader r(t, file,
                ctx.empty() ? context_for("pattern", label_hint, index)
                            : ctx + "." + context_for("pattern", label_hint, index));
  const std::string kind = r.string("kind");
  std::vector<std::string> valid = pattern_common;
  if (kind == LogSpiral::kind)
    valid.insert(valid.end(), {"arms", "pitch_deg", "reference_radius_kpc", "amplitude_km2_s2",
                               "force_ratio", "envelope_scale_kpc", "inner_taper_kpc",
                               "scale_height_kpc", "planar", "outer_radius_kpc", "arms_from"});
  else if (kind == CoxGomezSpiral::kind)
    valid.insert(valid.end(), {"arms", "pitch_deg", "reference_radius_kpc", "radial_scale_kpc",
                               "scale_height_kpc", "density_msun_kpc3", "arms_from"});
  else if (kind == DehnenBar::kind)
    valid.insert(valid.end(),
                 {"bar_radius_kpc", "amplitude_km2_s2", "strength", "reference_radius_kpc"});
  else
    r.fail("kind", "unknown pattern kind '" + kind + "'; known kinds: " + pattern_kinds());
  r.check_keys(valid);
  Pattern p;
  p.label = r.string_or("label", kind);
  p.pattern_speed = r.number("pattern_speed_kms_kpc");
  // The arms of a finished arm fit: their number and pitch, and where they were when the catalog
  // was observed (arm_azimuth_at_myr), moved along the arm to this pattern's reference radius.
  std::optional<FittedArms> fitted;
  if (r.has("arms_from")) {
    for (const char* k : {"arms", "pitch_deg", "phase_deg", "arm_azimuth_deg"})
      if (r.has(k)) r.fail(k, "comes from arms_from: give one or the other");
    if (!r.has("arm_azimuth_at_myr"))
      r.fail("arms_from", "needs arm_azimuth_at_myr: the time of the catalog's observation, when "
                          "the arms were where the fit found them");
    fitted = read_fitted_arms(r, file);
  }
  const auto arms_of = [&] { return fitted ? fitted->arms : r.integer("arms"); };
  const auto pitch_of = [&] { return fitted ? fitted->pitch_deg : r.number("pitch_deg"); };
  if (fitted) {
    const double t = r.number("arm_azimuth_at_myr");
    const double tanp = std::tan(fitted->pitch_deg * units::deg);
    // along the arm, ln R = ln R_x − (ψ − ψ_x) tan p: its azimuth at the reference radius
    const double a = fitted->azimuth_deg * units::deg -
                     std::log(r.number("reference_radius_kpc") / fitted->radius_kpc) / tanp;
    const double turned = p.pattern_speed * t * units::kms_per_kpc_times_myr;
    p.phase = std::remainder(a - turned, 2 * units::pi);
  } else if (r.has("arm_azimuth_deg") || r.has("arm_azimuth_at_myr")) {
    // The pattern where it is at a given time (the observation's), so that a sweep over the
    // pattern speed keeps today's arms where the data see them; the t = 0 phase follows.
    if (r.has("phase_deg"))
      r.fail("phase_deg", "give phase_deg (at t = 0) or arm_azimuth_deg with arm_azimuth_at_myr, "
                          "not both");
    if (!r.has("arm_azimuth_deg"))
      r.fail("arm_azimuth_at_myr", "needs arm_azimuth_deg (the azimuth at that time)");
    if (!r.has("arm_azimuth_at_myr"))
      r.fail("arm_azimuth_deg", "needs arm_azimuth_at_myr (the time of that azimuth, usually "
                                "the observation's)");
    const double a = r.number("arm_azimuth_deg") * units::deg, t = r.number("arm_azimuth_at_myr");
    const double turned = p.pattern_speed * t * units::kms_per_kpc_times_myr;
    p.phase = std::remainder(a - turned, 2 * units::pi); // in [-pi, pi]
  } else {
    p.phase = r.number_or("phase_deg", 0.0) * units::deg;
  }
  p.growth.start_myr = r.number_or("grow_start_myr", 0.0);
  p.growth.duration_myr = r.number_or("grow_duration_myr", 0.0);
  if (p.growth.duration_myr < 0) r.fail("grow_duration_myr", "must not be negative");
  const auto vc = [&](double R, const char* key) {
    const double v = dynamics::circular_speed(axi, R);
    if (!(v > 0)) r.fail(key, "the axisymmetric model has no circular speed at this radius");
    return v;
  };
  if (kind == LogSpiral::kind) {
    const bool direct = r.has("amplitude_km2_s2"), ratio = r.has("force_ratio");
    if (direct == ratio) r.fail("", "give exactly one of amplitude_km2_s2 and force_ratio");
    p.shape = at_keys(r, [&] {
      auto s = LogSpiral::make(arms_of(), pitch_of(), r.number("reference_radius_kpc"),
                               r.number_or("envelope_scale_kpc", inf),
                               r.number_or("inner_taper_kpc", 1.0), planar_arms(r),
                               direct ? r.number("amplitude_km2_s2") : 0.0,
                               r.number_or("outer_radius_kpc", 20.0));
      if (ratio) {
        const double f = r.number("force_ratio");
        if (!(f >= 0 && f < 1))
          r.fail("force_ratio", "must lie in [0, 1), got " + undertow::detail::num(f));
        const double v = vc(s.rref, "reference_radius_kpc");
        s.amp = f * (v * v / s.rref) / s.peak_radial_force_per_amplitude();
      }
      return s;
    });
  } else if (kind == CoxGomezSpiral::kind) {
    p.shape = at_keys(r, [&] {
      return CoxGomezSpiral::make(arms_of(), pitch_of(), r.number("reference_radius_kpc"),
                                  r.number("radial_scale_kpc"), r.number("scale_height_kpc"),
                                  r.number("density_msun_kpc3"));
    });
  } else if (kind == DehnenBar::kind) {
    const bool direct = r.has("amplitude_km2_s2"), strength = r.has("strength");
    if (direct == strength) r.fail("", "give exactly one of amplitude_km2_s2 and strength");
    p.shape = at_keys(r, [&] {
      const double rb = r.number("bar_radius_kpc");
      double amp = 0;
      if (direct) {
        amp = r.number("amplitude_km2_s2");
      } else {
        const double r0 =
            detail::positive(r.number("reference_radius_kpc"), "reference_radius_kpc");
        amp =
            DehnenBar::amplitude_from_strength(r.number("strength"), vc(r0, "reference_radius_kpc"),
                                               r0, detail::positive(rb, "bar_radius_kpc"));
      }
      return DehnenBar::make(rb, amp);
    });
  }
  r.finish(valid);
  return p;
}

} // namespace

std::string component_kinds() {
  return kinds_of(component_specs());
}
std::string pattern_kinds() {
  return std::string(LogSpiral::kind) + ", " + CoxGomezSpiral::kind + ", " + DehnenBar::kind;
}

Model model_from_table(const toml::table& t, const std::string& file, const std::string& ctx) {
  TableReader r(t, file, ctx);
  r.check_keys({"name", "description", "component", "pattern", "calibration"});
  Model m;
  m.name = r.string_or("name", "");
  m.description = r.string_or("description", "");
  const toml::array* comps = r.array_of_tables("component");
  if (!comps || comps->empty()) r.fail("", "a model needs at least one [[component]]");
  std::set<std::string> labels;
  for (std::size_t i = 0; i < comps->size(); ++i) {
    Component c = read_component(*comps->get(i)->as_table(), file, ctx, i);
    if (!labels.insert(c.label).second)
      TableReader(*comps->get(i)->as_table(), file, ctx)
          .fail("label", "component label '" + c.label + "' is used twice");
    m.components.push_back(std::move(c));
  }
  if (const toml::table* cal = r.table("calibration")) {
    TableReader cr(*cal, file, ctx.empty() ? "calibration" : ctx + ".calibration");
    cr.check_keys({"radius_kpc", "speed_kms", "rescale"});
    const double r0 = cr.number("radius_kpc"), v0 = cr.number("speed_kms");
    const auto which = cr.strings("rescale");
    cr.finish({"radius_kpc", "speed_kms", "rescale"});
    try {
      io::at_keys(cr, [&] { return dynamics::calibrate(m, r0, v0, which); });
    } catch (const InputError& e) {
      if (!e.place().file.empty()) throw; // already placed at its key
      cr.fail("rescale", e.what());
    }
  }
  if (const toml::array* pats = r.array_of_tables("pattern")) {
    for (std::size_t i = 0; i < pats->size(); ++i)
      m.patterns.push_back(read_pattern(*pats->get(i)->as_table(), file, ctx, i, m));
  }
  r.finish({"name", "description", "component", "pattern", "calibration"});
  return m;
}

Model parse_model_text(std::string_view text, const std::string& source_name) {
  return model_from_table(io::parse_toml_text(text, source_name), source_name, "");
}

Model load_model_file(const std::string& path) {
  return model_from_table(io::parse_toml_file(path), path, "");
}

} // namespace undertow::potential

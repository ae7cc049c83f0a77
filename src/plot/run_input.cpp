#include "run_input.hpp"

#include <filesystem>

#include "undertow/error.hpp"
#include "undertow/io/snapshot.hpp"
#include "undertow/io/toml_table.hpp"
#include "undertow/scenario/provenance_model.hpp"
#include "undertow/sky/solar_frame.hpp"

namespace undertow::plot {

RunModel read_run_model(const std::string& dir, const std::string& figure) {
  const std::string orbits = dir + "/orbits.h5";
  if (!std::filesystem::is_regular_file(orbits))
    throw InputError(orbits + ": no such file (figure '" + figure + "' needs the model in it)");
  const io::SnapshotReader reader(orbits);
  RunModel r;
  // the model file's text, or the recorded scenario's inline [galaxy] (a sweep point's)
  try {
    r.model = scenario::model_of(reader.provenance(), orbits);
  } catch (const InputError& e) {
    throw InputError(std::string(e.what()) + " (figure '" + figure + "' needs the model)");
  }
  const auto times = reader.times_myr();
  r.time_myr = times.empty() ? 0 : times.back();
  r.r0_kpc = sky::SolarFrame{}.r0_kpc;
  const std::string scenario = dir + "/scenario.toml";
  if (std::filesystem::is_regular_file(scenario)) {
    toml::table t;
    try {
      t = toml::parse_file(scenario);
    } catch (const toml::parse_error& e) {
      throw InputError(SourcePlace{scenario, int(e.source().begin.line), 0, {}},
                       std::string(e.description()));
    }
    const io::TableReader root(t, scenario, "");
    if (const toml::table* obs = root.table("observation")) {
      const io::TableReader o(*obs, scenario, "observation");
      if (auto v = o.optional_number("time_myr")) r.time_myr = *v;
      if (const toml::table* sun = o.table("sun"))
        if (auto v = io::TableReader(*sun, scenario, "observation.sun").optional_number("r0_kpc"))
          r.r0_kpc = *v;
    }
  }
  return r;
}

} // namespace undertow::plot

#include "undertow/scenario/provenance_model.hpp"

#include "undertow/io/toml_table.hpp"
#include "undertow/potential/model_file.hpp"

namespace undertow::scenario {

potential::Model model_of(const io::Provenance& p, const std::string& path) {
  if (!p.model_text.empty())
    return potential::parse_model_text(p.model_text, path + ":/model/model_file");
  const auto root = io::parse_toml_text(p.scenario_text, path + ":/scenario");
  const toml::table* g = root["galaxy"].as_table();
  if (!g)
    throw InputError(SourcePlace{path, 0, 0, "scenario"},
                     "the recorded scenario has no [galaxy] table");
  return potential::model_from_table(*g, path + ":/scenario", "galaxy");
}

} // namespace undertow::scenario

#pragma once
// Galaxy model files (TOML): the format is described in docs/model-files.md.
#include <string>
#include <string_view>

#include "undertow/potential/model.hpp"

namespace toml {
inline namespace v3 {
class table;
}
} // namespace toml

namespace undertow::potential {

// Throws InputError naming file, line, column and key for any bad input.
Model load_model_file(const std::string& path);
Model parse_model_text(std::string_view text, const std::string& source_name);
// For files that embed a model in a larger document (scenarios).
Model model_from_table(const toml::table& t, const std::string& file, const std::string& context);

// Kinds understood in [[component]] and [[pattern]] tables.
std::string component_kinds();
std::string pattern_kinds();

} // namespace undertow::potential

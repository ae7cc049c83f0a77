#pragma once
// A key path names one value of a scenario: table keys joined by '.', and an element of an array
// of tables picked by its label or its index, e.g. "galaxy.pattern[arms].force_ratio" or
// "galaxy.component[0].mass_msun" (the same spelling the scenario's own errors use).
#include <cstddef>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include <toml++/toml.h>

namespace undertow::sweep {

struct KeyStep {
  std::string key;
  std::optional<std::string> label; // [label]: the element whose "label" is this
  std::optional<std::size_t> index; // [n]: the n-th element (from 0)
};

// A bad path or one that does not lead to a value; what() says which step and why.
struct KeyPathError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

std::vector<KeyStep> parse_key_path(const std::string& path);

// Sets the value at path. Every table and element on the way must exist (a sweep must not
// switch on a whole section by accident); the last key may be new, and the scenario reader
// then decides whether it is a valid key.
void set_at_key_path(toml::table& root, const std::string& path, const toml::node& value);

// The value at path, or nullptr when it, or a table on the way, is absent.
const toml::node* find_at_key_path(const toml::table& root, const std::string& path);

} // namespace undertow::sweep

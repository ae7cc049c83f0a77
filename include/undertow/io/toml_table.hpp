#pragma once
// Reading one TOML table strictly: every key must be asked for, unknown keys are errors, and
// every error names the file, line, column and key path (after toml++'s source regions).
#include <map>
#include <optional>
#include <set>
#include <string>
#include <string_view>
#include <vector>

#include <toml++/toml.h>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"

namespace undertow::io {

class TableReader {
public:
  // context: the key path of this table, e.g. "component[disk]"; empty for the root.
  TableReader(const toml::table& t, std::string file, std::string context);

  bool has(std::string_view key) const;
  double number(std::string_view key) const; // required, finite, int or float
  std::optional<double> optional_number(std::string_view key) const;
  double number_or(std::string_view key, double fallback) const;
  int integer(std::string_view key) const;
  std::string string(std::string_view key) const;
  std::string string_or(std::string_view key, std::string fallback) const;
  std::vector<std::string> strings(std::string_view key) const;
  std::vector<double> numbers(std::string_view key) const; // array of finite numbers
  // An optional table of strings (a column map); empty when absent.
  std::map<std::string, std::string> string_map_or_empty(std::string_view key) const;
  bool is_array(std::string_view key) const; // present and an array
  bool boolean_or(std::string_view key, bool fallback) const;
  const toml::table* table(std::string_view key) const;           // optional sub-table
  const toml::array* array_of_tables(std::string_view key) const; // optional [[key]]

  SourcePlace place(std::string_view key) const; // of the key's value, or of the table
  [[noreturn]] void fail(std::string_view key, const std::string& what) const;
  // Throws for the first key not in valid (a misspelled key is reported as such, before any
  // "missing key" error it would cause).
  void check_keys(const std::vector<std::string>& valid) const;
  // Throws for the first key that was never asked for, listing the valid ones.
  void finish(const std::vector<std::string>& valid) const;

private:
  const toml::node* get(std::string_view key) const;
  const toml::table& t_;
  std::string file_, context_;
  mutable std::set<std::string, std::less<>> used_;
};

// Runs f, turning a parameter check's error (detail::ParameterError, which names a key) into an
// InputError at that key of table r.
template <class F> auto at_keys(const TableReader& r, F&& f) {
  try {
    return f();
  } catch (const detail::ParameterError& e) {
    r.fail(e.key, e.what());
  }
}

// Parses a TOML document; a syntax error becomes an InputError at its line and column.
toml::table parse_toml_file(const std::string& path);
toml::table parse_toml_text(std::string_view text, const std::string& source_name);

} // namespace undertow::io

#pragma once
// Command-line options that were renamed or removed: the old spelling stays as a hidden option,
// and using it is refused (one line naming the new spelling, exit 2) once the command line has
// been parsed. The list of renames lives with the options, in main.cpp and the subcommands;
// docs/migration.md lists them for users.
#include <string>
#include <vector>

#include <CLI/CLI.hpp>

namespace undertow::cli {

class RenamedOptions {
public:
  // A flag (no value) now spelled differently, or gone: `note` says what to use instead.
  void flag(CLI::App& command, const std::string& old_name, const std::string& note);
  // An option taking `values` values.
  void option(CLI::App& command, const std::string& old_name, const std::string& note,
              int values = 1);
  // The first old spelling that was used, as one error line; empty when none was.
  std::string refusal() const { return used_.empty() ? std::string() : used_.front(); }

private:
  std::vector<std::string> used_;
};

} // namespace undertow::cli

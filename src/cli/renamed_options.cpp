#include "renamed_options.hpp"

namespace undertow::cli {

void RenamedOptions::flag(CLI::App& command, const std::string& old_name, const std::string& note) {
  const std::string line = command.get_name() + " " + old_name + " is gone: " + note;
  command.add_flag_callback(old_name, [this, line] { used_.push_back(line); })->group("");
}

void RenamedOptions::option(CLI::App& command, const std::string& old_name, const std::string& note,
                            int values) {
  const std::string line = command.get_name() + " " + old_name + " is gone: " + note;
  command
      .add_option_function<std::vector<std::string>>(
          old_name, [this, line](const std::vector<std::string>&) { used_.push_back(line); })
      ->expected(values)
      ->group("");
}

} // namespace undertow::cli

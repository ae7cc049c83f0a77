#pragma once
// An empty scratch folder under the system's temporary directory, for tests that write files.
#include <filesystem>
#include <string>

namespace undertow::test {

inline std::filesystem::path scratch(const std::string& name) {
  const auto d = std::filesystem::temp_directory_path() / ("undertow-test-" + name);
  std::filesystem::remove_all(d);
  std::filesystem::create_directories(d);
  return d;
}

} // namespace undertow::test

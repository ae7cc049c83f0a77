#include "undertow/io/paths.hpp"

#include <filesystem>

namespace undertow::io {

std::string path_beside(const std::string& file, const std::string& p) {
  const std::filesystem::path q(p);
  if (q.is_absolute()) return p;
  return (std::filesystem::path(file).parent_path() / q).lexically_normal().string();
}

} // namespace undertow::io

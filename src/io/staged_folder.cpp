#include "undertow/io/staged_folder.hpp"

#include <filesystem>
#include <unistd.h>

namespace undertow::io {

std::vector<std::string>
write_folder_atomically(const std::string& folder,
                        const std::function<std::vector<std::string>(const std::string&)>& write) {
  namespace fs = std::filesystem;
  const fs::path out = fs::path(folder).lexically_normal();
  const fs::path parent = out.has_parent_path() ? out.parent_path() : fs::path(".");
  const std::string tag = std::to_string(::getpid());
  const fs::path tmp = parent / ("." + out.filename().string() + ".tmp-" + tag);
  const fs::path old = parent / ("." + out.filename().string() + ".old-" + tag);
  fs::remove_all(tmp);
  std::vector<std::string> files;
  try {
    fs::create_directories(tmp);
    for (const auto& file : write(tmp.string()))
      files.push_back((out / fs::path(file).filename()).string());
    if (fs::exists(out)) fs::rename(out, old);
    fs::rename(tmp, out);
    fs::remove_all(old);
  } catch (...) {
    std::error_code ec;
    fs::remove_all(tmp, ec);
    if (fs::exists(old, ec) && !fs::exists(out, ec)) fs::rename(old, out, ec);
    throw;
  }
  return files;
}

} // namespace undertow::io

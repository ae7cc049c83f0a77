#include "undertow/io/staged_folder.hpp"

#include <filesystem>
#include <unistd.h>

#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"

namespace undertow::io {

void check_replaceable_folder(const std::string& folder, const std::string& marker,
                              const std::string& what) {
  namespace fs = std::filesystem;
  if (!fs::exists(folder)) return;
  if (!fs::is_directory(folder))
    throw InputError(SourcePlace{folder, 0, 0, {}}, "the output exists and is not a folder");
  if (!fs::is_empty(folder) && !fs::exists(fs::path(folder) / marker))
    throw InputError(SourcePlace{folder, 0, 0, {}},
                     "the output folder exists and holds no earlier " + what + " (no " + marker +
                         "): give a new folder, so that nothing of yours is overwritten");
}

std::vector<std::string>
write_folder_atomically(const std::string& folder, const std::string& marker,
                        const std::string& what,
                        const std::function<std::vector<std::string>(const std::string&)>& write) {
  namespace fs = std::filesystem;
  check_replaceable_folder(folder, marker, what);
  const fs::path out = fs::path(folder).lexically_normal();
  const fs::path parent = out.has_parent_path() ? out.parent_path() : fs::path(".");
  const std::string tag = std::to_string(::getpid());
  const fs::path tmp = parent / AtomicPath::temporary_name(out.filename().string());
  const fs::path old = parent / ("." + out.filename().string() + ".old-" + tag);
  remove_stale_temporaries_of(out.string()); // a killed earlier write's, ours included
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
    try {
      throw;
    } catch (const InputError& e) {
      rethrow_with_path(e.what(), tmp.string(), out.string());
    }
  }
  return files;
}

std::vector<std::string>
write_files_together(const std::string& folder,
                     const std::function<std::vector<std::string>(const std::string&)>& write) {
  namespace fs = std::filesystem;
  const fs::path out(folder);
  std::error_code ec;
  const bool created = !fs::exists(out, ec);
  fs::create_directories(out, ec);
  if (ec || !fs::is_directory(out))
    throw InputError(SourcePlace{folder, 0, 0, {}},
                     "cannot create the output folder" + (ec ? ": " + ec.message() : ""));
  const fs::path tmp = out / AtomicPath::temporary_name("files");
  std::vector<std::string> files;
  try {
    fs::remove_all(tmp);
    fs::create_directory(tmp);
    for (const auto& file : write(tmp.string())) {
      const fs::path to = out / fs::path(file).filename();
      fs::rename(file, to);
      files.push_back(to.string());
    }
    fs::remove_all(tmp);
  } catch (...) {
    fs::remove_all(tmp, ec);
    if (created) fs::remove_all(out, ec);
    try {
      throw;
    } catch (const InputError& e) {
      rethrow_with_path(e.what(), tmp.string(), out.string());
    }
  }
  return files;
}

} // namespace undertow::io

#include "undertow/io/atomic_file.hpp"

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <memory>
#include <unistd.h>
#include <vector>

#include "undertow/error.hpp"

namespace undertow::io {

AtomicPath::AtomicPath(std::string path) : path_(std::move(path)) {
  const std::filesystem::path p(path_);
  tmp_ = (p.parent_path() / temporary_name(p.filename().string())).string();
}

std::string AtomicPath::temporary_name(const std::string& filename) {
  return temporary_prefix(filename) + std::to_string(::getpid());
}

AtomicPath::~AtomicPath() {
  if (!done_) std::remove(tmp_.c_str());
}

bool AtomicPath::is_temporary(const std::string& filename) {
  const auto at = filename.rfind(".tmp-");
  if (filename.empty() || filename[0] != '.' || at == std::string::npos ||
      at + 5 == filename.size())
    return false;
  for (std::size_t i = at + 5; i < filename.size(); ++i)
    if (filename[i] < '0' || filename[i] > '9') return false;
  return true;
}

void AtomicPath::commit(bool written) {
  done_ = true;
  if (!written) {
    std::remove(tmp_.c_str());
    throw InputError(SourcePlace{path_, 0, 0, {}}, "write failed (disk full?); nothing written");
  }
  if (std::rename(tmp_.c_str(), path_.c_str()) != 0) {
    const std::string why = std::strerror(errno);
    std::remove(tmp_.c_str());
    throw InputError(SourcePlace{path_, 0, 0, {}},
                     "cannot move the finished file into place: " + why);
  }
}

AtomicFile::AtomicFile(std::string path) : path_(std::move(path)) {
  out_.open(path_.temporary(), std::ios::binary | std::ios::trunc);
  if (!out_)
    throw InputError(SourcePlace{path_.target(), 0, 0, {}},
                     std::string("cannot write here: ") + std::strerror(errno));
}

AtomicFile::~AtomicFile() {
  if (out_.is_open()) out_.close(); // before path_ removes the temporary
}

void AtomicFile::commit() {
  out_.flush();
  const bool ok = bool(out_);
  out_.close();
  path_.commit(ok && !out_.fail());
}

void rethrow_with_path(const std::string& what, const std::string& temporary,
                       const std::string& target) {
  std::string m = what;
  for (auto at = m.find(temporary); at != std::string::npos;
       at = m.find(temporary, at + target.size()))
    m.replace(at, temporary.size(), target);
  throw InputError(m);
}

void write_files_atomically(const std::vector<StagedWrite>& files) {
  std::vector<std::unique_ptr<AtomicPath>> staged; // each removes its temporary unless committed
  for (const auto& [target, write] : files) {
    const std::string& tmp = staged.emplace_back(std::make_unique<AtomicPath>(target))->temporary();
    try {
      write(tmp);
    } catch (const InputError& e) {
      rethrow_with_path(e.what(), tmp, target);
    }
  }
  for (auto& p : staged)
    p->commit();
}

void check_output_file(const std::string& path) {
  namespace fs = std::filesystem;
  std::error_code ec;
  if (fs::is_directory(path, ec))
    throw InputError(SourcePlace{path, 0, 0, {}}, "is a folder; give the output a file name");
  fs::path parent = fs::path(path).parent_path();
  if (parent.empty()) parent = ".";
  if (!fs::exists(parent, ec))
    throw InputError(SourcePlace{path, 0, 0, {}},
                     "its folder " + parent.string() + " does not exist");
  if (!fs::is_directory(parent, ec))
    throw InputError(SourcePlace{path, 0, 0, {}}, parent.string() + " is a file, not a folder");
  if (::access(parent.c_str(), W_OK | X_OK) != 0)
    throw InputError(SourcePlace{path, 0, 0, {}},
                     "cannot write in " + parent.string() + ": " + std::strerror(errno));
}

void remove_stale_temporaries(const std::string& dir) {
  namespace fs = std::filesystem;
  std::error_code ec;
  if (!fs::is_directory(dir, ec)) return;
  std::vector<fs::path> stale; // collected first: removing while iterating is undefined
  for (const auto& e : fs::recursive_directory_iterator(dir, ec))
    if (AtomicPath::is_temporary(e.path().filename().string())) stale.push_back(e.path());
  for (const auto& p : stale)
    fs::remove_all(p, ec);
}

void remove_stale_temporaries_of(const std::string& path) {
  namespace fs = std::filesystem;
  const fs::path p(path);
  fs::path parent = p.parent_path();
  if (parent.empty()) parent = ".";
  const std::string prefix = AtomicPath::temporary_prefix(p.filename().string());
  // and a replaced folder set aside by write_folder_atomically: ".<name>.old-<pid>"
  const std::string old = "." + p.filename().string() + ".old-";
  const auto pid_after = [](const std::string& name, const std::string& start) {
    return name.size() > start.size() && name.rfind(start, 0) == 0 &&
           name.find_first_not_of("0123456789", start.size()) == std::string::npos;
  };
  std::error_code ec;
  std::vector<fs::path> stale;
  for (const auto& e : fs::directory_iterator(parent, ec)) {
    const std::string name = e.path().filename().string();
    if ((name.rfind(prefix, 0) == 0 && AtomicPath::is_temporary(name)) || pid_after(name, old))
      stale.push_back(e.path());
  }
  for (const auto& q : stale)
    fs::remove_all(q, ec);
}

} // namespace undertow::io

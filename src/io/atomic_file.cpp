#include "undertow/io/atomic_file.hpp"

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <unistd.h>

#include "undertow/error.hpp"

namespace undertow::io {

AtomicPath::AtomicPath(std::string path) : path_(std::move(path)) {
  const std::filesystem::path p(path_);
  tmp_ = (p.parent_path() / ("." + p.filename().string() + ".tmp-" + std::to_string(::getpid())))
             .string();
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

} // namespace undertow::io

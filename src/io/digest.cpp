#include "undertow/io/digest.hpp"

#include <fstream>
#include <vector>

#include "undertow/error.hpp"

namespace undertow::io {

std::uint64_t fnv1a64(std::string_view bytes, std::uint64_t state) {
  for (unsigned char c : bytes) {
    state ^= c;
    state *= 0x100000001b3ULL;
  }
  return state;
}

std::string hex64(std::uint64_t v) {
  char b[17];
  std::snprintf(b, sizeof b, "%016llx", static_cast<unsigned long long>(v));
  return b;
}

FileDigest digest_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(SourcePlace{path, 0, 0, {}}, "cannot open the file to check it");
  FileDigest d;
  d.fnv1a = 0xcbf29ce484222325ULL;
  std::vector<char> buf(1 << 20);
  while (in) {
    in.read(buf.data(), std::streamsize(buf.size()));
    const auto n = std::size_t(in.gcount());
    d.fnv1a = fnv1a64(std::string_view(buf.data(), n), d.fnv1a);
    d.size += n;
  }
  if (in.bad()) throw InputError(SourcePlace{path, 0, 0, {}}, "read error while checking the file");
  return d;
}

} // namespace undertow::io

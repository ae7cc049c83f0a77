#pragma once
// Content digests for telling a finished output file from a changed, truncated or half-written
// one: 64-bit FNV-1a (Fowler, Noll & Vo; IETF draft-eastlake-fnv). Not a cryptographic hash.
#include <cstdint>
#include <string>
#include <string_view>

namespace undertow::io {

std::uint64_t fnv1a64(std::string_view bytes, std::uint64_t state = 0xcbf29ce484222325ULL);
std::string hex64(std::uint64_t v); // 16 lowercase hex digits

struct FileDigest {
  std::uintmax_t size = 0;
  std::uint64_t fnv1a = 0;
  bool operator==(const FileDigest&) const = default;
};
// Throws InputError naming the file if it cannot be read.
FileDigest digest_file(const std::string& path);

} // namespace undertow::io

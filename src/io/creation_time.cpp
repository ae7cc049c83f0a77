#include "undertow/io/creation_time.hpp"

#include <cerrno>
#include <cstdlib>

#include "undertow/error.hpp"

namespace undertow::io {

std::optional<std::time_t> fixed_creation_time() {
  const char* e = std::getenv("SOURCE_DATE_EPOCH");
  if (!e || !*e) return std::nullopt;
  char* end = nullptr;
  errno = 0;
  const long long v = std::strtoll(e, &end, 10);
  // the specification asks for a refusal of anything but decimal digits; the bound is 9999-12-31
  if (*end || errno || v < 0 || v > 253402300799LL || *e < '0' || *e > '9')
    throw InputError(std::string("SOURCE_DATE_EPOCH = '") + e +
                     "' is not a whole number of seconds since 1970-01-01 (UTC)");
  return static_cast<std::time_t>(v);
}

std::time_t creation_time() {
  if (const auto t = fixed_creation_time()) return *t;
  return std::time(nullptr);
}

std::string creation_time_utc(const char* format) {
  const std::time_t t = creation_time();
  std::tm tm{};
  gmtime_r(&t, &tm);
  char b[64];
  return std::string(b, std::strftime(b, sizeof b, format, &tm));
}

} // namespace undertow::io

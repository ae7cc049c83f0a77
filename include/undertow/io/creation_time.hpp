#pragma once
// When an output file says it was written: now, or SOURCE_DATE_EPOCH when that is set (the
// reproducible-builds convention, reproducible-builds.org/specs/source-date-epoch), so that a
// rerun, a resumed run and an uninterrupted one can write identical bytes.
#include <ctime>
#include <optional>
#include <string>

namespace undertow::io {

// SOURCE_DATE_EPOCH in seconds since 1970-01-01 UTC, if set; InputError when it is malformed.
std::optional<std::time_t> fixed_creation_time();
std::time_t creation_time();
// strftime of creation_time() in UTC, e.g. "%Y-%m-%dT%H:%M:%SZ".
std::string creation_time_utc(const char* format);

} // namespace undertow::io

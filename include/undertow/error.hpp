#pragma once
// One error type for bad input: it knows where the bad value came from, so the user reads
// "file:line:column: key: what is wrong" and never a bare "invalid value".

#include <stdexcept>
#include <string>

namespace undertow {

struct SourcePlace {
  std::string file;  // empty when the value did not come from a file
  int line = 0;      // 1-based; 0 when unknown
  int column = 0;    // 1-based; 0 when unknown
  std::string field; // key path or column name; may be empty
};

class InputError : public std::runtime_error {
public:
  InputError(SourcePlace place, const std::string& what)
      : std::runtime_error(format(place, what)), place_(std::move(place)) {}
  explicit InputError(const std::string& what) : std::runtime_error(what) {}

  const SourcePlace& place() const { return place_; }

  static std::string format(const SourcePlace& p, const std::string& what) {
    std::string s;
    if (!p.file.empty()) {
      s += p.file;
      if (p.line > 0) s += ":" + std::to_string(p.line);
      if (p.column > 0) s += ":" + std::to_string(p.column);
      s += ": ";
    }
    if (!p.field.empty()) s += p.field + ": ";
    return s + what;
  }

private:
  SourcePlace place_;
};

} // namespace undertow

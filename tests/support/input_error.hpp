#pragma once
// The message of the InputError that f throws, or "(no error)": for checks on the wording and the
// file:line:column of an error.
#include <functional>
#include <string>

#include "undertow/error.hpp"

namespace undertow::test {

inline std::string input_error_of(const std::function<void()>& f) {
  try {
    f();
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

} // namespace undertow::test

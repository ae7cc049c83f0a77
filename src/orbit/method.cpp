#include "undertow/orbit/method.hpp"

#include <utility>

#include "undertow/error.hpp"

namespace undertow::orbit {

namespace {
struct Named {
  Method m;
  const char* name;
};
constexpr Named kMethods[] = {{Method::leapfrog, "leapfrog"},
                              {Method::symplectic4, "symplectic4"},
                              {Method::dopri5, "dopri5"},
                              {Method::rk78, "rk78"},
                              {Method::bulirsch_stoer, "bulirsch-stoer"}};
// Names before undertow 0.2 (CHANGELOG.md): refused, naming the new one.
constexpr std::pair<const char*, const char*> kRenamed[] = {{"mclachlan4", "symplectic4"},
                                                            {"fehlberg78", "rk78"}};
} // namespace

std::string method_names() {
  std::string s;
  for (const auto& n : kMethods)
    s += (s.empty() ? "" : ", ") + std::string(n.name);
  return s;
}

Method method_from_name(const std::string& name) {
  for (const auto& n : kMethods)
    if (name == n.name) return n.m;
  for (const auto& [old_name, new_name] : kRenamed)
    if (name == old_name)
      throw InputError("integration method '" + name + "' renamed: write '" + new_name +
                       "' (see CHANGELOG.md and docs/migration.md)");
  throw InputError("unknown integration method '" + name + "'; known: " + method_names());
}

std::string method_name(Method m) {
  for (const auto& n : kMethods)
    if (m == n.m) return n.name;
  return "?";
}

bool is_symplectic(Method m) {
  return m == Method::leapfrog || m == Method::symplectic4;
}

} // namespace undertow::orbit

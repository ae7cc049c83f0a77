#include "undertow/orbit/method.hpp"

#include "undertow/error.hpp"

namespace undertow::orbit {

namespace {
struct Named {
  Method m;
  const char* name;
};
constexpr Named kMethods[] = {{Method::leapfrog, "leapfrog"},
                              {Method::mclachlan4, "mclachlan4"},
                              {Method::dopri5, "dopri5"},
                              {Method::fehlberg78, "fehlberg78"},
                              {Method::bulirsch_stoer, "bulirsch-stoer"}};
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
  throw InputError("unknown integration method '" + name + "'; known: " + method_names());
}

std::string method_name(Method m) {
  for (const auto& n : kMethods)
    if (m == n.m) return n.name;
  return "?";
}

bool is_symplectic(Method m) {
  return m == Method::leapfrog || m == Method::mclachlan4;
}

} // namespace undertow::orbit

#pragma once
// Integration methods, chosen by name in a scenario. All go through Boost.Odeint.
#include <string>

namespace undertow::orbit {

enum class Method {
  leapfrog,      // velocity Verlet (kick-drift-kick), 2nd order, symplectic, fixed step
  symplectic4,   // McLachlan's (1995) 4th-order symplectic RKN, six stages, fixed step
  dopri5,        // Dormand-Prince 5(4), adaptive
  rk78,          // Runge-Kutta-Fehlberg 7(8), adaptive
  bulirsch_stoer // Bulirsch-Stoer extrapolation, adaptive
};

Method method_from_name(const std::string& name); // throws InputError listing the names
std::string method_name(Method m);
bool is_symplectic(Method m); // fixed-step, advances whole batches
std::string method_names();

} // namespace undertow::orbit

#pragma once
// Resonance radii of a pattern with speed Omega_p and m arms (Binney & Tremaine 2008, §3.3.3):
// corotation Omega = Omega_p, Lindblad resonances Omega -/+ kappa/m = Omega_p, and the 4:1
// resonances Omega -/+ kappa/4 = Omega_p.
#include <string>
#include <vector>

#include "undertow/potential/model.hpp"

namespace undertow::dynamics {

struct Resonance {
  std::string name;          // "corotation", "inner Lindblad", ...
  std::string condition;     // e.g. "Omega - kappa/2 = Omega_p"
  std::vector<double> radii; // kpc, ascending; empty when there is none in the range
  std::string note;          // why there is none, when there is none
};

std::vector<Resonance> resonances(const potential::Model& m, double pattern_speed_kms_kpc, int arms,
                                  double r_min_kpc = 0.05, double r_max_kpc = 50);

} // namespace undertow::dynamics

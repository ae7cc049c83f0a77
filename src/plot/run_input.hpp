#pragma once
// What the run figures need beyond tables: the galaxy model (kept in orbits.h5), the time of the
// mock observation and the Sun's distance from the centre (from the run's copy of its scenario,
// [observation] time_myr and [observation.sun] r0_kpc, with the scenario defaults).
#include <string>

#include "undertow/potential/model.hpp"

namespace undertow::plot {

struct RunModel {
  potential::Model model;
  double time_myr = 0; // the observation's
  double r0_kpc = 0;
};

RunModel read_run_model(const std::string& dir, const std::string& figure);

} // namespace undertow::plot

#pragma once
// A rotating, growing perturbation: a shape, a pattern speed, a phase and a growth law.
// Positive pattern speeds rotate with the Galaxy; angles are Galactocentric azimuths in the
// sense of rotation measured from the Sun's direction (docs/conventions.md).
#include <string>
#include <variant>

#include "undertow/potential/cox_gomez_spiral.hpp"
#include "undertow/potential/dehnen_bar.hpp"
#include "undertow/potential/growth.hpp"
#include "undertow/potential/log_spiral.hpp"
#include "undertow/units.hpp"

namespace undertow::potential {

using PatternShape = std::variant<LogSpiral, CoxGomezSpiral, DehnenBar>;

struct Pattern {
  std::string label;
  PatternShape shape;
  double pattern_speed = 0; // km/s/kpc
  double phase = 0;         // rad, at t = 0
  Growth growth;

  const char* kind() const {
    return std::visit([](const auto& s) { return s.kind; }, shape);
  }
  // Azimuth of the pattern at time t (Myr).
  double angle_at(double t_myr) const {
    return phase + pattern_speed * t_myr * units::kms_per_kpc_times_myr;
  }
  int arms() const {
    if (auto* s = std::get_if<LogSpiral>(&shape)) return s->m;
    if (auto* s = std::get_if<CoxGomezSpiral>(&shape)) return s->arms;
    return 2;
  }
};

} // namespace undertow::potential

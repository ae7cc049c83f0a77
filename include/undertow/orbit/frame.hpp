#pragma once
// The frame rotating with a pattern: it coincides with the Galactocentric frame at t = 0 and
// turns at the pattern speed in the sense of Galactic rotation (docs/conventions.md).
#include "undertow/orbit/phase_space.hpp"

namespace undertow::orbit {

struct RotatingFrame {
  double pattern_speed = 0; // km/s/kpc

  // Angle turned by time t (Myr), in the sense of rotation.
  double angle(double t_myr) const;
  void to_rotating(PhaseSpace& p, double t_myr) const;
  void to_inertial(PhaseSpace& p, double t_myr) const;
};

} // namespace undertow::orbit

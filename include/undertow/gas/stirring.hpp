#pragma once
// Warmth: collisions only ever take kinetic energy out of the clouds' random motion, so left
// alone the gas cools until clouds stop meeting. Stirring puts it back as a random walk in
// velocity, standing for the turbulence that young stars' winds, ionisation and supernovae drive
// in the clouds around them: every step each cloud's velocity gets an independent Gaussian kick
// of per-component dispersion kms √(dt / 1 Myr). Without collisions the dispersion would grow
// as kms √(t / Myr); against the collisional cooling (which goes as n σ³) the gas settles
// where the two balance, colder where it is dense. The kicks are drawn from each cloud's own
// stream keyed by the step's time, so they do not depend on the frame (Galilean invariant), on
// the thread count, or on whether the run was interrupted and resumed.
#include <cstddef>
#include <cstdint>

#include "undertow/orbit/phase_space.hpp"

namespace undertow::gas {

// Kicks the first `count` clouds of p for a step of dt (Myr) that starts at t (Myr).
void stir(orbit::PhaseSpace& p, std::size_t count, double kms, double dt_myr, double t_myr,
          std::uint64_t seed);

// A salt for random streams that differ from step to step: the bits of the step's time.
std::uint64_t time_salt(double t_myr);

} // namespace undertow::gas

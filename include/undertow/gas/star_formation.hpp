#pragma once
// Stars from cloud collisions: a collision whose approach speed (the normal relative speed at
// contact) exceeds a threshold forms a star with a given probability, at the pair's centre with
// its centre-of-mass velocity plus a small isotropic dispersion. Collisions between clouds of
// the same population happen at a rate per volume ∝ n² σ ⟨v_rel⟩, so at a fixed velocity
// distribution this is a volume Schmidt law ρ_SFR ∝ ρ_gas² (Schmidt 1959, ApJ 129, 243, with
// the exponent 2 of binary collisions); where converging streams raise the approach speeds (a
// spiral shock) the threshold lets more of the collisions count. Each collision's draw comes
// from a stream keyed by the pair's ids and the step's time: deterministic, thread-independent.
#include <cstdint>
#include <vector>

#include "undertow/gas/cloud_collisions.hpp"

namespace undertow::gas {

struct StarFormation {
  double threshold_kms = 5;  // approach speed at contact a collision needs to form a star
  double efficiency = 1;     // probability that such a collision forms one
  double dispersion_kms = 1; // newborn velocity about the pair's centre of mass, per component
  double max_age_myr = 100;  // older stars leave the run (they are no longer young)
  // The stars are collisionless: with the leapfrog they take one step per `step_ratio` of the
  // gas's steps (gas_orbits.hpp).
  int step_ratio = 2;
  void validate() const; // throws detail::ParameterError naming the key
};

struct Newborn {
  std::uint64_t parent_a = 0, parent_b = 0;
  double birth_time_myr = 0;     // the contact
  double x = 0, y = 0, z = 0;    // where it is at the start of the step (kpc)
  double vx = 0, vy = 0, vz = 0; // km/s
  double bx = 0, by = 0, bz = 0; // where it was born: the contact point (kpc)
};

// The stars formed by the collisions of a pass that starts at t (Myr).
std::vector<Newborn> form_stars(const std::vector<CollisionEvent>& events, const StarFormation& sf,
                                double t_myr, std::uint64_t seed);

} // namespace undertow::gas

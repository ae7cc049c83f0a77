#pragma once
// Finite-size clouds that collide pairwise (the sticky-particle method of Levinson & Roberts
// 1981, ApJ 245, 465, and Schwarz 1981, ApJ 247, 77, in the form of inelastic hard spheres):
// clouds of radius a move in straight lines over a short interval dt; two clouds collide when
// their paths bring them to a distance 2a while approaching. The collision is resolved in the
// pair's centre-of-mass frame: the relative velocity's component along the line of centres is
// reversed and scaled by the normal restitution e_n, the tangential component scaled by e_t.
// Equal masses, so momentum is kept exactly and kinetic energy never grows (e_n, e_t in [0, 1]);
// the rule depends on relative positions and velocities only, so it is Galilean invariant; the
// rate of collisions follows n σ v_rel with σ = π (2a)². Candidate pairs come from a cell list
// (cells of at least 2a + the farthest relative travel in dt), so a pass is O(N).
// Deterministic: each cloud collides at most once per pass, collisions are taken in order of
// their contact time (ties by the pair's ids), whatever the input order.
#include <cstddef>

#include "undertow/orbit/phase_space.hpp"

namespace undertow::gas {

struct CloudCollisions {
  double radius_kpc = 0.01;            // a
  double normal_restitution = 0.3;     // e_n
  double tangential_restitution = 1.0; // e_t
  void validate() const;               // throws detail::ParameterError naming the key
};

struct CollisionPass {
  std::size_t collisions = 0;
  double energy_lost = 0; // (km/s)² per unit cloud mass, summed over clouds
};

// Finds the collisions within the next dt (Myr) of straight-line motion and changes the
// colliding clouds' velocities at their contact; positions are not moved (the caller's
// integrator does that).
CollisionPass collide_pairs(orbit::PhaseSpace& p, const CloudCollisions& c, double dt_myr);

} // namespace undertow::gas

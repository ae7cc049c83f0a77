#pragma once
// Finite-size clouds that collide pairwise (the sticky-particle method of Levinson & Roberts
// 1981, ApJ 245, 465, and Schwarz 1981, ApJ 247, 77, in the form of inelastic hard spheres):
// clouds of radius a move in straight lines over a short interval dt; two clouds collide when
// their paths bring them to a distance 2a while approaching. The collision is resolved in the
// pair's centre-of-mass frame: the relative velocity's component along the line of centres is
// reversed and scaled by the normal restitution e_n, the tangential component scaled by e_t.
// Equal masses, so momentum is kept exactly and kinetic energy never grows (e_n, e_t in [0, 1]);
// the rule depends on relative positions and velocities only, so it is Galilean invariant; the
// rate of collisions follows n σ v_rel with σ = π (2a)².
//
// Candidate pairs come from a cell list, O(N): columns in (x, y), built on the clouds'
// positions at mid-interval. A reference flow V (the model's circular flow) of Lipschitz
// constant K bounds how far apart two clouds can be at mid-interval and still touch within dt:
// |r_mid| <= 2a + c (|w_i| + |w_j|) + K c |r_mid|, w = v - V at the start, c = (dt/2) /
// (1 - K dt/2), so |r_mid| <= s_i + s_j with s = (a + c |w|) / (1 - K c). K need only hold
// between the pair's starting points, which are at most D = 2a + 2 v_max dt apart: each cloud
// takes the flow's bound over R +- D about its own radius (K_i >= the pair's, and s grows with
// K), which away from a cusped centre is a few times Omega rather than the centre's steepness.
// Clouds moving with the flow therefore search only a few cloud radii however fast the disk
// rotates; the few fastest clouds search as far as they need. The search is exact, so the
// result does not depend on the flow, the cells or the thread count.
// Deterministic: each cloud collides at most once per pass, collisions are taken in order of
// their contact time (ties by the pair's ids), whatever the input order.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <vector>

#include "undertow/gas/circular_flow.hpp"
#include "undertow/orbit/phase_space.hpp"

namespace undertow::gas {

struct CloudCollisions {
  double radius_kpc = 0.01;            // a
  double normal_restitution = 0.3;     // e_n
  double tangential_restitution = 1.0; // e_t
  double extent_kpc = INFINITY;        // clouds with |x| or |y| beyond this never collide
  void validate() const;               // throws detail::ParameterError naming the key
};

struct CollisionEvent {
  std::uint64_t id_a = 0, id_b = 0; // id_a < id_b
  double t_myr = 0;                 // contact, after the start of the pass
  double x = 0, y = 0, z = 0;       // the pair's centre at contact, kpc
  double vx = 0, vy = 0, vz = 0;    // the pair's centre-of-mass velocity, km/s
  double approach_kms = 0;          // normal relative speed at contact
};

struct CollisionPass {
  std::size_t collisions = 0;
  double energy_lost = 0;             // (km/s)² per unit cloud mass, summed over clouds
  std::size_t candidate_pairs = 0;    // pairs given the exact test (the search's cost)
  std::vector<CollisionEvent> events; // in order of contact time
};

// Finds the collisions among the first `count` clouds of p within the next dt (Myr) of
// straight-line motion and changes the colliding clouds' velocities at their contact; positions
// are not moved (the caller's integrator does that). `flow` only guides the search.
CollisionPass collide_pairs(orbit::PhaseSpace& p, const CloudCollisions& c, double dt_myr,
                            const CircularFlow& flow = {},
                            std::size_t count = std::numeric_limits<std::size_t>::max());

} // namespace undertow::gas

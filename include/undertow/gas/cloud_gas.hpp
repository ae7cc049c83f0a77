#pragma once
// The gas of a run: finite-size clouds that collide pairwise (cloud_collisions), are stirred
// back to warmth (stirring) and form stars in their collisions (star_formation). The stars then
// orbit collisionlessly alongside the clouds. One step at time t, before the orbits advance by
// dt: collisions over the coming dt, stars from them, stirring, and the retirement of stars
// older than the star-formation rule's maximum age (in bulk: retire_stars with no slack before
// the state is read).
#include <cstdint>
#include <optional>
#include <vector>

#include "undertow/gas/circular_flow.hpp"
#include "undertow/gas/cloud_collisions.hpp"
#include "undertow/gas/star_formation.hpp"
#include "undertow/orbit/integrator.hpp"
#include "undertow/orbit/phase_space.hpp"

namespace undertow::gas {

struct GasSettings {
  CloudCollisions collisions;
  double stirring_kms = 0.6; // per component, per √Myr (stirring.hpp)
  std::optional<StarFormation> stars;
  void validate() const; // throws detail::ParameterError naming the key
};

// Clouds first, then the stars in order of birth. The clouds are kept sorted by place (every few
// steps), so that neighbours sit near each other in memory and the collision search stays in
// cache; slot[i] is cloud i's place in the starting order, which snapshots keep. Nothing a run
// computes depends on the order in memory.
struct GasState {
  orbit::PhaseSpace p;
  std::size_t clouds = 0;
  std::vector<double> birth_time_myr; // per entry (clouds: the start of the run)
  std::vector<double> birth_position; // 3 per entry, kpc (clouds: where they started)
  std::vector<std::uint64_t> parents; // 2 per entry (clouds: 0, 0)
  std::uint64_t next_star_id = 0;     // ids of stars continue after the largest cloud id
  std::vector<std::size_t> slot;      // per cloud: its index in the starting order
  std::size_t steps_since_sort = 0;
  // The acceleration at each entry's position, carried between leapfrog steps (NaN: not known);
  // moved with the entries, never written to snapshots.
  orbit::CarriedAccelerations acc;

  // Reorders the clouds by the (x, y) cell of side cell_kpc they are in.
  void sort_clouds_by_place(double cell_kpc);
  // Removes the stars older than max_age_myr at t_myr when there are more than `slack` of them;
  // returns how many it removed.
  std::size_t retire_stars(double t_myr, double max_age_myr, std::size_t slack = 0);
  // Cloud i becomes cloud perm[i] (every per-cloud array); the stars stay.
  void permute_clouds(const std::vector<std::size_t>& perm);
  // The state with the clouds in their starting order (for snapshots).
  GasState in_starting_order() const;

  // A state of clouds only, born at t.
  static GasState of_clouds(orbit::PhaseSpace clouds, double t_myr);
  std::size_t stars() const { return p.size() - clouds; }
};

struct StepReport {
  std::size_t collisions = 0, candidate_pairs = 0, stars_formed = 0, stars_retired = 0;
  double energy_lost = 0; // (km/s)² per unit cloud mass
};

StepReport gas_step(GasState& g, const GasSettings& s, const CircularFlow& flow, double t_myr,
                    double dt_myr, std::uint64_t seed);

} // namespace undertow::gas

#include "undertow/gas/star_formation.hpp"

#include "undertow/detail/kernel.hpp"
#include "undertow/gas/stirring.hpp"
#include "undertow/tracers/random.hpp"
#include "undertow/units.hpp"

namespace undertow::gas {

void StarFormation::validate() const {
  detail::non_negative(threshold_kms, "threshold_kms");
  if (!(efficiency > 0 && efficiency <= 1))
    throw detail::ParameterError("efficiency",
                                 "must lie in (0, 1], got " + detail::num(efficiency));
  detail::non_negative(dispersion_kms, "dispersion_kms");
  detail::positive(max_age_myr, "age_max_myr");
  if (step_ratio < 1 || step_ratio > 64)
    throw detail::ParameterError("step_ratio", "must be an integer from 1 to 64, got " +
                                                   std::to_string(step_ratio));
}

std::vector<Newborn> form_stars(const std::vector<CollisionEvent>& events, const StarFormation& sf,
                                double t_myr, std::uint64_t seed) {
  std::vector<Newborn> out;
  const std::uint64_t salt = time_salt(t_myr) ^ 0x57a125ULL;
  for (const auto& e : events) {
    if (!(e.approach_kms >= sf.threshold_kms)) continue;
    tracers::TracerStream rng(seed, tracers::TracerStream::mix(e.id_a) ^ e.id_b, salt);
    if (!(rng.uniform() < sf.efficiency)) continue;
    Newborn b;
    b.parent_a = e.id_a, b.parent_b = e.id_b;
    b.birth_time_myr = t_myr + e.t_myr;
    b.bx = e.x, b.by = e.y, b.bz = e.z;
    b.vx = e.vx + sf.dispersion_kms * rng.normal();
    b.vy = e.vy + sf.dispersion_kms * rng.normal();
    b.vz = e.vz + sf.dispersion_kms * rng.normal();
    // back along the pair's centre-of-mass path to the start of the step
    const double back = units::myr_to_internal(e.t_myr);
    b.x = e.x - e.vx * back, b.y = e.y - e.vy * back, b.z = e.z - e.vz * back;
    out.push_back(b);
  }
  return out;
}

} // namespace undertow::gas

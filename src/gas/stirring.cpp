#include "undertow/gas/stirring.hpp"

#include <algorithm>
#include <bit>
#include <cmath>

#include "undertow/tracers/random.hpp"

namespace undertow::gas {

std::uint64_t time_salt(double t_myr) {
  return tracers::TracerStream::mix(std::bit_cast<std::uint64_t>(t_myr + 0.0) ^ 0x5717ULL);
}

void stir(orbit::PhaseSpace& p, std::size_t count, double kms, double dt_myr, double t_myr,
          std::uint64_t seed) {
  if (!(kms > 0) || !(dt_myr > 0)) return;
  const double sigma = kms * std::sqrt(dt_myr);
  const std::uint64_t salt = time_salt(t_myr);
  const long n = long(std::min(count, p.size()));
#pragma omp parallel for schedule(static)
  for (long i = 0; i < n; ++i) {
    tracers::TracerStream rng(seed, p.id[std::size_t(i)], salt);
    p.vx[std::size_t(i)] += sigma * rng.normal();
    p.vy[std::size_t(i)] += sigma * rng.normal();
    p.vz[std::size_t(i)] += sigma * rng.normal();
  }
}

} // namespace undertow::gas

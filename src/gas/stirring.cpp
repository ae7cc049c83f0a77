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
    // Gaussian pairs by the polar method (Marsaglia & Bray 1964, SIAM Rev. 6, 260): no
    // trigonometry, one logarithm per pair; four values drawn, three used
    tracers::TracerStream rng(seed, p.id[std::size_t(i)], salt);
    double g[4];
    for (int k = 0; k < 4; k += 2) {
      double u, v, r2;
      do {
        u = 2 * rng.uniform() - 1, v = 2 * rng.uniform() - 1, r2 = u * u + v * v;
      } while (!(r2 < 1));
      const double f = std::sqrt(-2 * std::log(r2) / r2);
      g[k] = u * f, g[k + 1] = v * f;
    }
    p.vx[std::size_t(i)] += sigma * g[0];
    p.vy[std::size_t(i)] += sigma * g[1];
    p.vz[std::size_t(i)] += sigma * g[2];
  }
}

} // namespace undertow::gas

#include "undertow/gas/stirring.hpp"

#include <algorithm>
#include <bit>
#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/tracers/random.hpp"

namespace undertow::gas {

std::uint64_t time_salt(double t_myr) {
  return tracers::TracerStream::mix(std::bit_cast<std::uint64_t>(t_myr + 0.0) ^ 0x5717ULL);
}

namespace {

constexpr long kBlock = 256;

// Box-Muller (Box & Muller 1958, Ann. Math. Stat. 29, 610) over a whole block of uniforms, in a
// loop that calls libmvec: three Gaussians of dispersion sigma per cloud. Always whole blocks,
// so no cloud takes a scalar remainder loop with different rounding.
UNDERTOW_CLONES void gaussians(const double (*u)[kBlock], double sigma, double* __restrict gx,
                               double* __restrict gy, double* __restrict gz) {
  const double two_pi = 6.283185307179586;
#pragma omp simd
  for (long i = 0; i < kBlock; ++i) {
    const double r1 = sigma * std::sqrt(-2 * std::log(u[0][i])),
                 r2 = sigma * std::sqrt(-2 * std::log(u[2][i]));
    // cos and sin of one angle: written as two cosines, since GCC would fuse cos and sin of
    // one argument into sincos, which has no vector variant
    gx[i] = r1 * std::cos(two_pi * u[1][i]);
    gy[i] = r1 * std::cos(two_pi * (u[1][i] - 0.25));
    gz[i] = r2 * std::cos(two_pi * u[3][i]);
  }
}

} // namespace

void stir(orbit::PhaseSpace& p, std::size_t count, double kms, double dt_myr, double t_myr,
          std::uint64_t seed) {
  if (!(kms > 0) || !(dt_myr > 0)) return;
  const double sigma = kms * std::sqrt(dt_myr);
  // Each cloud's stream is keyed by (seed, id, step time); the seed's and the time's share of
  // the key is the same for every cloud, so it is mixed once.
  using tracers::TracerStream;
  const std::uint64_t key = TracerStream::mix(seed ^ 0x6a09e667f3bcc909ULL) ^
                            TracerStream::mix(time_salt(t_myr) + 0xbb67ae8584caa73bULL);
  const long n = long(std::min(count, p.size()));
#pragma omp parallel for schedule(static)
  for (long b = 0; b < n; b += kBlock) {
    // Four 32-bit uniforms in (0, 1) per cloud from two splitmix64 draws (Steele, Lea & Flood
    // 2014, OOPSLA) on the cloud's key: the scalar part; the unused tail of the last block
    // gets harmless values.
    const long e = std::min(n, b + kBlock);
    double u[4][kBlock], g[3][kBlock];
    const double scale = 0x1.0p-32;
    for (long i = 0; i < kBlock; ++i) {
      const std::uint64_t id = b + i < e ? p.id[std::size_t(b + i)] : 0;
      const std::uint64_t state = TracerStream::mix(id + 0x9e3779b97f4a7c15ULL) ^ key;
      for (int k = 0; k < 2; ++k) {
        const std::uint64_t r =
            TracerStream::mix(state + std::uint64_t(k + 1) * 0x9e3779b97f4a7c15ULL);
        u[2 * k][i] = (double(r >> 32) + 0.5) * scale;
        u[2 * k + 1][i] = (double(r & 0xffffffffULL) + 0.5) * scale;
      }
    }
    gaussians(u, sigma, g[0], g[1], g[2]);
    for (long i = 0; i < e - b; ++i) {
      p.vx[std::size_t(b + i)] += g[0][i];
      p.vy[std::size_t(b + i)] += g[1][i];
      p.vz[std::size_t(b + i)] += g[2][i];
    }
  }
}

} // namespace undertow::gas

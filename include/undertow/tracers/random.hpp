#pragma once
// A reproducible random stream per tracer, derived from (seed, tracer id) alone: the same
// tracer gets the same draws whatever the thread count, batch or shard that makes it.
// SplitMix64 (Steele, Lea & Flood 2014, OOPSLA "Fast splittable pseudorandom number
// generators") hashes the pair into a starting state and then steps it.
#include <cmath>
#include <cstdint>

namespace undertow::tracers {

class TracerStream {
public:
  TracerStream(std::uint64_t seed, std::uint64_t id, std::uint64_t purpose = 0)
      : state_(mix(mix(seed ^ 0x6a09e667f3bcc909ULL) ^ mix(id + 0x9e3779b97f4a7c15ULL) ^
                   mix(purpose + 0xbb67ae8584caa73bULL))) {}

  std::uint64_t next() {
    state_ += 0x9e3779b97f4a7c15ULL;
    return mix(state_);
  }
  // Uniform in the open interval (0, 1), 53 random bits.
  double uniform() { return (double(next() >> 11) + 0.5) * 0x1.0p-53; }
  // Standard normal by the Box-Muller transform (one value per two uniforms, always).
  double normal() {
    const double u1 = uniform(), u2 = uniform();
    return std::sqrt(-2 * std::log(u1)) * std::cos(2 * 3.141592653589793 * u2);
  }

  static std::uint64_t mix(std::uint64_t z) {
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
    return z ^ (z >> 31);
  }

private:
  std::uint64_t state_;
};

} // namespace undertow::tracers

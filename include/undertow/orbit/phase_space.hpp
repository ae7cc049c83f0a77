#pragma once
// Tracers as structure of arrays: positions kpc, velocities km/s (Galactocentric, inertial).
#include <cstddef>
#include <cstdint>
#include <vector>

namespace undertow::orbit {

struct PhaseSpace {
  std::vector<std::uint64_t> id;
  std::vector<double> x, y, z, vx, vy, vz;

  std::size_t size() const { return x.size(); }
  void resize(std::size_t n) {
    id.resize(n);
    for (auto* v : {&x, &y, &z, &vx, &vy, &vz})
      v->resize(n);
  }
  // Copies tracers [first, first + n) of other into this one (resized to n).
  void assign_range(const PhaseSpace& other, std::size_t first, std::size_t n);
  void store_range(const PhaseSpace& part, std::size_t first);
};

} // namespace undertow::orbit

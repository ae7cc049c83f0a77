#include "undertow/orbit/phase_space.hpp"

#include <algorithm>

namespace undertow::orbit {

void PhaseSpace::assign_range(const PhaseSpace& o, std::size_t first, std::size_t n) {
  resize(n);
  std::copy_n(o.id.begin() + first, n, id.begin());
  const std::vector<double>* src[] = {&o.x, &o.y, &o.z, &o.vx, &o.vy, &o.vz};
  std::vector<double>* dst[] = {&x, &y, &z, &vx, &vy, &vz};
  for (int k = 0; k < 6; ++k)
    std::copy_n(src[k]->begin() + first, n, dst[k]->begin());
}

void PhaseSpace::store_range(const PhaseSpace& part, std::size_t first) {
  std::copy(part.id.begin(), part.id.end(), id.begin() + first);
  const std::vector<double>* src[] = {&part.x, &part.y, &part.z, &part.vx, &part.vy, &part.vz};
  std::vector<double>* dst[] = {&x, &y, &z, &vx, &vy, &vz};
  for (int k = 0; k < 6; ++k)
    std::copy(src[k]->begin(), src[k]->end(), dst[k]->begin() + first);
}

} // namespace undertow::orbit

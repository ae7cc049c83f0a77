#include "undertow/gas/cloud_collisions.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <tuple>
#include <unordered_map>
#include <vector>

#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::gas {

void CloudCollisions::validate() const {
  if (!(radius_kpc > 0) || !std::isfinite(radius_kpc))
    throw detail::ParameterError("radius_kpc", "must be positive, got " + detail::num(radius_kpc));
  if (!(normal_restitution >= 0 && normal_restitution <= 1))
    throw detail::ParameterError("normal_restitution",
                                 "must be from 0 to 1, got " + detail::num(normal_restitution));
  if (!(tangential_restitution >= 0 && tangential_restitution <= 1))
    throw detail::ParameterError("tangential_restitution",
                                 "must be from 0 to 1, got " + detail::num(tangential_restitution));
}

CollisionPass collide_pairs(orbit::PhaseSpace& p, const CloudCollisions& c, double dt_myr) {
  c.validate();
  const std::size_t n = p.x.size();
  CollisionPass out;
  if (n < 2 || !(dt_myr > 0)) return out;
  const double dt = units::myr_to_internal(dt_myr); // kpc per (km/s): distance = v dt
  const double d2 = 4 * c.radius_kpc * c.radius_kpc;
  // cells wide enough that a pair colliding within dt sits in the same or adjacent cells
  double vmax = 0;
  for (std::size_t i = 0; i < n; ++i)
    vmax = std::max(vmax, std::sqrt(p.vx[i] * p.vx[i] + p.vy[i] * p.vy[i] + p.vz[i] * p.vz[i]));
  const double h = 2 * c.radius_kpc + 2 * vmax * dt;
  const auto key = [&](long i, long j, long k) {
    return (std::uint64_t(std::uint32_t(i)) * 73856093u) ^ (std::uint64_t(std::uint32_t(j)) << 21) ^
           (std::uint64_t(std::uint32_t(k)) << 42);
  };
  std::unordered_map<std::uint64_t, std::vector<std::size_t>> cells;
  std::vector<std::array<long, 3>> at(n);
  for (std::size_t i = 0; i < n; ++i) {
    at[i] = {long(std::floor(p.x[i] / h)), long(std::floor(p.y[i] / h)),
             long(std::floor(p.z[i] / h))};
    cells[key(at[i][0], at[i][1], at[i][2])].push_back(i);
  }
  // every pair that comes within 2a while approaching during dt: (contact time, ids, i, j)
  std::vector<std::tuple<double, std::uint64_t, std::uint64_t, std::size_t, std::size_t>> hits;
  for (std::size_t i = 0; i < n; ++i)
    for (long dx = -1; dx <= 1; ++dx)
      for (long dy = -1; dy <= 1; ++dy)
        for (long dz = -1; dz <= 1; ++dz) {
          const auto it = cells.find(key(at[i][0] + dx, at[i][1] + dy, at[i][2] + dz));
          if (it == cells.end()) continue;
          for (std::size_t j : it->second) {
            if (!(p.id[j] > p.id[i]) && !(p.id[j] == p.id[i] && j > i)) continue; // once per pair
            if (at[j][0] != at[i][0] + dx || at[j][1] != at[i][1] + dy || at[j][2] != at[i][2] + dz)
              continue; // a hash collision with a far cell
            const double rx = p.x[j] - p.x[i], ry = p.y[j] - p.y[i], rz = p.z[j] - p.z[i];
            const double ux = p.vx[j] - p.vx[i], uy = p.vy[j] - p.vy[i], uz = p.vz[j] - p.vz[i];
            const double ru = rx * ux + ry * uy + rz * uz;
            if (!(ru < 0)) continue; // not approaching
            const double uu = ux * ux + uy * uy + uz * uz, rr = rx * rx + ry * ry + rz * rz;
            // |r + u t|² = 4a²: the first root t = (-ru - sqrt(ru² - uu (rr - 4a²))) / uu
            const double disc = ru * ru - uu * (rr - d2);
            if (!(disc >= 0)) continue;
            const double t = rr <= d2 ? 0.0 : (-ru - std::sqrt(disc)) / uu;
            if (t > dt) continue;
            hits.emplace_back(t, std::min(p.id[i], p.id[j]), std::max(p.id[i], p.id[j]), i, j);
          }
        }
  std::sort(hits.begin(), hits.end());
  std::vector<char> done(n, 0);
  for (const auto& [t, ida, idb, i, j] : hits) {
    if (done[i] || done[j]) continue;
    done[i] = done[j] = 1;
    // the line of centres at contact
    double nx = p.x[j] - p.x[i] + (p.vx[j] - p.vx[i]) * t;
    double ny = p.y[j] - p.y[i] + (p.vy[j] - p.vy[i]) * t;
    double nz = p.z[j] - p.z[i] + (p.vz[j] - p.vz[i]) * t;
    const double nn = std::sqrt(nx * nx + ny * ny + nz * nz);
    if (!(nn > 0)) continue;
    nx /= nn, ny /= nn, nz /= nn;
    const double ux = p.vx[j] - p.vx[i], uy = p.vy[j] - p.vy[i], uz = p.vz[j] - p.vz[i];
    const double un = ux * nx + uy * ny + uz * nz;
    const double tx = ux - un * nx, ty = uy - un * ny, tz = uz - un * nz;
    // new relative velocity: -e_n u_n n + e_t u_t
    const double en = c.normal_restitution, et = c.tangential_restitution;
    const double wx = -en * un * nx + et * tx, wy = -en * un * ny + et * ty,
                 wz = -en * un * nz + et * tz;
    const double cx = 0.5 * (p.vx[i] + p.vx[j]), cy = 0.5 * (p.vy[i] + p.vy[j]),
                 cz = 0.5 * (p.vz[i] + p.vz[j]);
    const double before = 0.25 * (ux * ux + uy * uy + uz * uz),
                 after = 0.25 * (wx * wx + wy * wy + wz * wz);
    p.vx[i] = cx - 0.5 * wx, p.vy[i] = cy - 0.5 * wy, p.vz[i] = cz - 0.5 * wz;
    p.vx[j] = cx + 0.5 * wx, p.vy[j] = cy + 0.5 * wy, p.vz[j] = cz + 0.5 * wz;
    ++out.collisions;
    out.energy_lost += before - after; // per unit mass: two clouds, each (1/2)(u/2)²
  }
  return out;
}

} // namespace undertow::gas

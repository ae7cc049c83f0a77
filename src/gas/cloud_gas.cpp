#include "undertow/gas/cloud_gas.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <utility>

#include "undertow/detail/kernel.hpp"
#include "undertow/gas/stirring.hpp"

namespace undertow::gas {

void GasSettings::validate() const {
  collisions.validate();
  detail::non_negative(stirring_kms, "stirring_kms");
  if (stars) stars->validate();
}

GasState GasState::of_clouds(orbit::PhaseSpace clouds, double t_myr) {
  GasState g;
  const std::size_t n = clouds.size();
  g.clouds = n;
  g.birth_time_myr.assign(n, t_myr);
  g.birth_position.resize(3 * n);
  for (std::size_t i = 0; i < n; ++i) {
    g.birth_position[3 * i] = clouds.x[i], g.birth_position[3 * i + 1] = clouds.y[i];
    g.birth_position[3 * i + 2] = clouds.z[i];
  }
  g.parents.assign(2 * n, 0);
  std::uint64_t top = 0;
  for (std::uint64_t id : clouds.id)
    top = std::max(top, id);
  if (n > 0 && top == ~std::uint64_t(0))
    throw std::invalid_argument("a cloud id of 2^64 - 1 leaves no ids for stars");
  g.next_star_id = n > 0 ? top + 1 : 0;
  g.p = std::move(clouds);
  g.slot.resize(n);
  for (std::size_t i = 0; i < n; ++i)
    g.slot[i] = i;
  return g;
}

namespace {
// Entry i of the result is entry perm[i] of g, for the clouds; the stars stay as they are.
GasState permuted(const GasState& g, const std::vector<std::size_t>& perm) {
  GasState o = g;
  const std::size_t n = g.clouds;
  for (std::size_t i = 0; i < n; ++i) {
    const std::size_t k = perm[i];
    o.p.id[i] = g.p.id[k];
    o.p.x[i] = g.p.x[k], o.p.y[i] = g.p.y[k], o.p.z[i] = g.p.z[k];
    o.p.vx[i] = g.p.vx[k], o.p.vy[i] = g.p.vy[k], o.p.vz[i] = g.p.vz[k];
    o.birth_time_myr[i] = g.birth_time_myr[k];
    for (std::size_t c = 0; c < 3; ++c)
      o.birth_position[3 * i + c] = g.birth_position[3 * k + c];
    o.parents[2 * i] = g.parents[2 * k], o.parents[2 * i + 1] = g.parents[2 * k + 1];
    o.slot[i] = g.slot[k];
  }
  return o;
}
} // namespace

void GasState::sort_clouds_by_place(double cell_kpc) {
  std::vector<std::pair<std::int64_t, std::size_t>> key(clouds);
  for (std::size_t i = 0; i < clouds; ++i) {
    const double fx = std::floor(p.x[i] / cell_kpc), fy = std::floor(p.y[i] / cell_kpc);
    const auto cx = std::int64_t(std::clamp(fx, -1e6, 1e6)),
               cy = std::int64_t(std::clamp(fy, -1e6, 1e6));
    key[i] = {cx * 4000000 + cy, i};
  }
  std::sort(key.begin(), key.end());
  std::vector<std::size_t> perm(clouds);
  for (std::size_t i = 0; i < clouds; ++i)
    perm[i] = key[i].second;
  *this = permuted(*this, perm);
}

GasState GasState::in_starting_order() const {
  std::vector<std::size_t> perm(clouds);
  for (std::size_t i = 0; i < clouds; ++i)
    perm[slot[i]] = i;
  return permuted(*this, perm);
}

StepReport gas_step(GasState& g, const GasSettings& s, const CircularFlow& flow, double t_myr,
                    double dt_myr, std::uint64_t seed) {
  StepReport r;
  if (g.steps_since_sort++ % 16 == 0) g.sort_clouds_by_place(0.1);
  auto pass = collide_pairs(g.p, s.collisions, dt_myr, flow, g.clouds);
  r.collisions = pass.collisions;
  r.candidate_pairs = pass.candidate_pairs;
  r.energy_lost = pass.energy_lost;
  stir(g.p, g.clouds, s.stirring_kms, dt_myr, t_myr, seed);
  if (!s.stars) return r;
  // retire stars that are too old, keeping the order of the rest
  std::size_t keep = g.clouds;
  for (std::size_t i = g.clouds; i < g.p.size(); ++i) {
    if (t_myr - g.birth_time_myr[i] > s.stars->max_age_myr) continue;
    if (keep != i) {
      g.p.id[keep] = g.p.id[i];
      g.p.x[keep] = g.p.x[i], g.p.y[keep] = g.p.y[i], g.p.z[keep] = g.p.z[i];
      g.p.vx[keep] = g.p.vx[i], g.p.vy[keep] = g.p.vy[i], g.p.vz[keep] = g.p.vz[i];
      g.birth_time_myr[keep] = g.birth_time_myr[i];
      for (int k = 0; k < 3; ++k)
        g.birth_position[3 * keep + std::size_t(k)] = g.birth_position[3 * i + std::size_t(k)];
      g.parents[2 * keep] = g.parents[2 * i], g.parents[2 * keep + 1] = g.parents[2 * i + 1];
    }
    ++keep;
  }
  r.stars_retired = g.p.size() - keep;
  g.p.resize(keep);
  g.birth_time_myr.resize(keep);
  g.birth_position.resize(3 * keep);
  g.parents.resize(2 * keep);
  for (const Newborn& b : form_stars(pass.events, *s.stars, t_myr, seed)) {
    g.p.id.push_back(g.next_star_id++);
    g.p.x.push_back(b.x), g.p.y.push_back(b.y), g.p.z.push_back(b.z);
    g.p.vx.push_back(b.vx), g.p.vy.push_back(b.vy), g.p.vz.push_back(b.vz);
    g.birth_time_myr.push_back(b.birth_time_myr);
    g.birth_position.insert(g.birth_position.end(), {b.bx, b.by, b.bz});
    g.parents.insert(g.parents.end(), {b.parent_a, b.parent_b});
    ++r.stars_formed;
  }
  return r;
}

} // namespace undertow::gas

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
  g.acc.forget(n);
  return g;
}

namespace {
// Entries [0, perm.size()) of v (in groups of `stride`) become entries perm[0], perm[1], ...;
// the rest stay.
template <class T>
void permute_front(std::vector<T>& v, const std::vector<std::size_t>& perm, std::size_t stride,
                   std::vector<T>& tmp) {
  const std::size_t n = perm.size();
  tmp.resize(n * stride);
#pragma omp parallel for schedule(static)
  for (std::size_t i = 0; i < n; ++i)
    for (std::size_t c = 0; c < stride; ++c)
      tmp[stride * i + c] = v[stride * perm[i] + c];
  std::copy(tmp.begin(), tmp.end(), v.begin());
}
} // namespace

// Entry i becomes entry perm[i], for the clouds; the stars stay as they are.
void GasState::permute_clouds(const std::vector<std::size_t>& perm) {
  std::vector<double> d;
  std::vector<std::uint64_t> u;
  std::vector<std::size_t> z;
  if (acc.ax.size() != p.size()) acc.forget(p.size());
  for (auto* v :
       {&p.x, &p.y, &p.z, &p.vx, &p.vy, &p.vz, &birth_time_myr, &acc.ax, &acc.ay, &acc.az})
    permute_front(*v, perm, 1, d);
  permute_front(birth_position, perm, 3, d);
  permute_front(p.id, perm, 1, u);
  permute_front(parents, perm, 2, u);
  permute_front(slot, perm, 1, z);
}

void GasState::sort_clouds_by_place(double cell_kpc) {
  // Order by (x cell, y cell), ties by index: a stable counting sort over the occupied range of
  // cells when it is not much larger than the number of clouds, else a comparison sort.
  std::vector<std::int64_t> cx(clouds), cy(clouds);
  std::int64_t x0 = 0, x1 = -1, y0 = 0, y1 = -1;
  for (std::size_t i = 0; i < clouds; ++i) {
    cx[i] = std::int64_t(std::clamp(std::floor(p.x[i] / cell_kpc), -1e6, 1e6));
    cy[i] = std::int64_t(std::clamp(std::floor(p.y[i] / cell_kpc), -1e6, 1e6));
    if (i == 0) x0 = x1 = cx[i], y0 = y1 = cy[i];
    x0 = std::min(x0, cx[i]), x1 = std::max(x1, cx[i]);
    y0 = std::min(y0, cy[i]), y1 = std::max(y1, cy[i]);
  }
  std::vector<std::size_t> perm(clouds);
  const double cells = double(x1 - x0 + 1) * double(y1 - y0 + 1);
  if (clouds > 0 && cells <= 8.0 * double(clouds) + 4096) {
    const std::int64_t ny = y1 - y0 + 1;
    std::vector<std::size_t> start(std::size_t(cells) + 1, 0);
    for (std::size_t i = 0; i < clouds; ++i)
      ++start[std::size_t((cx[i] - x0) * ny + (cy[i] - y0)) + 1];
    for (std::size_t c = 1; c < start.size(); ++c)
      start[c] += start[c - 1];
    for (std::size_t i = 0; i < clouds; ++i)
      perm[start[std::size_t((cx[i] - x0) * ny + (cy[i] - y0))]++] = i;
  } else {
    std::vector<std::pair<std::int64_t, std::size_t>> key(clouds);
    for (std::size_t i = 0; i < clouds; ++i)
      key[i] = {cx[i] * 4000000 + cy[i], i};
    std::sort(key.begin(), key.end());
    for (std::size_t i = 0; i < clouds; ++i)
      perm[i] = key[i].second;
  }
  permute_clouds(perm);
}

GasState GasState::in_starting_order() const {
  std::vector<std::size_t> perm(clouds);
  for (std::size_t i = 0; i < clouds; ++i)
    perm[slot[i]] = i;
  GasState o = *this;
  o.permute_clouds(perm);
  return o;
}

std::size_t GasState::retire_stars(double t_myr, double max_age_myr, std::size_t slack) {
  if (acc.ax.size() != p.size()) acc.forget(p.size());
  std::size_t k = 0; // stars are in order of birth: the old ones come first
  while (clouds + k < p.size() && t_myr - birth_time_myr[clouds + k] > max_age_myr)
    ++k;
  if (k == 0 || k <= slack) return 0;
  const auto cut = [&](auto& v, std::size_t stride) {
    v.erase(v.begin() + long(stride * clouds), v.begin() + long(stride * (clouds + k)));
  };
  for (auto* v :
       {&p.x, &p.y, &p.z, &p.vx, &p.vy, &p.vz, &birth_time_myr, &acc.ax, &acc.ay, &acc.az})
    cut(*v, 1);
  cut(p.id, 1);
  cut(birth_position, 3);
  cut(parents, 2);
  return k;
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
  // Cutting the old stars out moves every younger one, so it waits until they are an eighth of
  // the stars; until then they orbit on unseen (retire_stars before anything reads the state).
  r.stars_retired = g.retire_stars(t_myr, s.stars->max_age_myr, g.stars() / 8);
  for (const Newborn& b : form_stars(pass.events, *s.stars, t_myr, seed)) {
    g.p.id.push_back(g.next_star_id++);
    g.p.x.push_back(b.x), g.p.y.push_back(b.y), g.p.z.push_back(b.z);
    g.p.vx.push_back(b.vx), g.p.vy.push_back(b.vy), g.p.vz.push_back(b.vz);
    g.birth_time_myr.push_back(b.birth_time_myr);
    g.birth_position.insert(g.birth_position.end(), {b.bx, b.by, b.bz});
    g.parents.insert(g.parents.end(), {b.parent_a, b.parent_b});
    for (auto* a : {&g.acc.ax, &g.acc.ay, &g.acc.az})
      a->push_back(NAN); // computed at the next step's start
    ++r.stars_formed;
  }
  return r;
}

} // namespace undertow::gas

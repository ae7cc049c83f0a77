// The gas state's bookkeeping: the clouds sorted by place (by counting over a compact range of
// cells, by comparison when the clouds are spread thinly) and back to their starting order.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>
#include <tuple>

#include "undertow/gas/cloud_gas.hpp"

using namespace undertow;

namespace {
gas::GasState disk(std::size_t n, double radius, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(-radius, radius), g(-30, 30);
  orbit::PhaseSpace p;
  p.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    p.id[i] = 1000 + 7 * i;
    p.x[i] = u(rng), p.y[i] = u(rng), p.z[i] = 0.01 * u(rng);
    p.vx[i] = g(rng), p.vy[i] = g(rng), p.vz[i] = g(rng);
  }
  return gas::GasState::of_clouds(p, 0);
}

// The expected order, written independently: by x cell, then y cell, then starting index.
void check_sorted(const gas::GasState& g, double cell) {
  const auto key = [&](std::size_t i) {
    return std::make_tuple(std::floor(g.p.x[i] / cell), std::floor(g.p.y[i] / cell), g.slot[i]);
  };
  for (std::size_t i = 1; i < g.clouds; ++i) {
    INFO("entry " << i);
    REQUIRE(key(i - 1) < key(i));
  }
}
} // namespace

TEST_CASE("Clouds sorted by place: ordered by cell and starting index, each cloud's records "
          "moved with it, and back to the starting order exactly",
          "[gas]") {
  for (const bool sparse : {false, true}) {
    auto g = disk(20000, 13, sparse ? 5 : 4);
    if (sparse) g.p.x[17] = 900; // spreads the cells far beyond the clouds: the comparison sort
    const gas::GasState start = g;
    g.sort_clouds_by_place(0.1);
    INFO((sparse ? "sparse" : "compact"));
    check_sorted(g, 0.1);
    for (std::size_t i = 0; i < g.clouds; ++i) {
      const std::size_t k = g.slot[i];
      REQUIRE(g.p.id[i] == start.p.id[k]);
      REQUIRE(g.p.vx[i] == start.p.vx[k]);
      REQUIRE(g.birth_position[3 * i + 1] == start.birth_position[3 * k + 1]);
    }
    const auto back = g.in_starting_order();
    CHECK(back.p.x == start.p.x);
    CHECK(back.p.vz == start.p.vz);
    CHECK(back.p.id == start.p.id);
    CHECK(back.slot == start.slot);
    CHECK(back.birth_position == start.birth_position);
  }
}

TEST_CASE("Old stars leave in bulk: none while they are no more than the slack, then all of "
          "them at once, the younger stars' records kept in order",
          "[gas]") {
  auto g = disk(10, 5, 6);
  for (std::size_t k = 0; k < 40; ++k) { // one star a Myr, born from t = 0 to 39 Myr
    g.p.id.push_back(5000 + k);
    for (auto* v : {&g.p.x, &g.p.y, &g.p.z, &g.p.vx, &g.p.vy, &g.p.vz})
      v->push_back(double(k));
    g.birth_time_myr.push_back(double(k));
    g.birth_position.insert(g.birth_position.end(), {double(k), -double(k), 0.0});
    g.parents.insert(g.parents.end(), {k, k + 1});
  }
  // at 45 Myr with a 20 Myr maximum age, the stars born before 25 Myr are too old: 25 of them
  CHECK(g.retire_stars(45, 20, 25) == 0);
  CHECK(g.stars() == 40);
  CHECK(g.retire_stars(45, 20, 24) == 25);
  REQUIRE(g.stars() == 15);
  REQUIRE(g.acc.ax.size() == g.p.size());
  for (std::size_t k = 0; k < 15; ++k) {
    const std::size_t i = g.clouds + k;
    CHECK(g.p.id[i] == 5025 + k);
    CHECK(g.p.vy[i] == double(25 + k));
    CHECK(g.birth_time_myr[i] == double(25 + k));
    CHECK(g.birth_position[3 * i + 1] == -double(25 + k));
    CHECK(g.parents[2 * i + 1] == 26 + k);
  }
  CHECK(g.p.id[9] == 1000 + 7 * 9); // the clouds untouched
  CHECK(g.retire_stars(45, 20) == 0);
}

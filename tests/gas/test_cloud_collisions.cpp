// Pairwise collisions of finite-size clouds: conservation, dissipation, Galilean invariance,
// independence of the input order, and the collision rate of kinetic theory.
#include <algorithm>
#include <catch2/catch.hpp>
#include <cmath>
#include <map>
#include <numeric>
#include <random>
#include <tuple>

#include <omp.h>

#include "undertow/detail/kernel.hpp"
#include "undertow/gas/cloud_collisions.hpp"
#include "undertow/units.hpp"

using namespace undertow;
using namespace undertow::gas;

namespace {
// n clouds uniform in a cube of side `side` (kpc) with isotropic Gaussian velocities of
// dispersion sigma (km/s) about a mean (vx0, 0, 0).
orbit::PhaseSpace box(std::size_t n, double side, double sigma, std::uint64_t seed,
                      double vx0 = 0) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(0, side);
  std::normal_distribution<double> g(0, sigma);
  orbit::PhaseSpace p;
  p.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    p.id[i] = i + 1;
    p.x[i] = u(rng), p.y[i] = u(rng), p.z[i] = u(rng);
    p.vx[i] = vx0 + g(rng), p.vy[i] = g(rng), p.vz[i] = g(rng);
  }
  return p;
}
double energy(const orbit::PhaseSpace& p) {
  double e = 0;
  for (std::size_t i = 0; i < p.x.size(); ++i)
    e += 0.5 * (p.vx[i] * p.vx[i] + p.vy[i] * p.vy[i] + p.vz[i] * p.vz[i]);
  return e;
}
std::array<double, 3> momentum(const orbit::PhaseSpace& p) {
  std::array<double, 3> m{};
  for (std::size_t i = 0; i < p.x.size(); ++i)
    m[0] += p.vx[i], m[1] += p.vy[i], m[2] += p.vz[i];
  return m;
}
} // namespace

TEST_CASE("Cloud collisions: momentum kept to round-off, kinetic energy never added, kept for "
          "e_n = e_t = 1, and take the energy the textbook inelastic collision takes "
          "(equal masses: (1 - e_n^2) u_n^2 / 4 per unit mass)",
          "[gas][collisions]") {
  // a head-on pair: u_n = 10 km/s
  orbit::PhaseSpace two;
  two.resize(2);
  two.id = {1, 2};
  two.x = {0, 0.0201}, two.y = {0, 0}, two.z = {0, 0};
  two.vx = {5, -5}, two.vy = {1, 1}, two.vz = {0, 0};
  CloudCollisions c;
  c.radius_kpc = 0.01, c.normal_restitution = 0.5, c.tangential_restitution = 1;
  const auto r = collide_pairs(two, c, 1.0);
  CHECK(r.collisions == 1);
  CHECK(two.vx[0] == Approx(-2.5));
  CHECK(two.vx[1] == Approx(2.5));
  CHECK(r.energy_lost == Approx((1 - 0.25) * 100 / 4));
  for (double en : {0.0, 0.3, 1.0})
    for (double et : {0.0, 0.5, 1.0}) {
      auto p = box(20000, 1.0, 8, 3);
      const double e0 = energy(p);
      const auto m0 = momentum(p);
      c.normal_restitution = en, c.tangential_restitution = et, c.radius_kpc = 0.004;
      const auto pass = collide_pairs(p, c, 5.0);
      INFO("e_n " << en << ", e_t " << et << ": " << pass.collisions << " collisions");
      REQUIRE(pass.collisions > 100);
      const auto m1 = momentum(p);
      for (int a = 0; a < 3; ++a)
        CHECK(std::fabs(m1[std::size_t(a)] - m0[std::size_t(a)]) < 1e-9);
      const double roundoff = 1e-13 * e0;
      CHECK(energy(p) <= e0 + roundoff);
      CHECK(e0 - energy(p) == Approx(pass.energy_lost).margin(roundoff));
      if (en == 1 && et == 1) CHECK(energy(p) == Approx(e0).epsilon(1e-13));
    }
}

TEST_CASE("Cloud collisions: Galilean invariant (a boost and a shift of the whole system "
          "change nothing relative), independent of the input order, and a vanishing radius "
          "leaves every velocity's bits unchanged",
          "[gas][collisions]") {
  CloudCollisions c;
  c.radius_kpc = 0.004;
  auto a = box(20000, 1.0, 8, 5);
  auto b = a;
  for (std::size_t i = 0; i < b.x.size(); ++i)
    b.vx[i] += 150, b.vy[i] -= 40, b.x[i] += 3.3, b.z[i] -= 0.7;
  const auto ra = collide_pairs(a, c, 5.0), rb = collide_pairs(b, c, 5.0);
  CHECK(ra.collisions == rb.collisions);
  double worst = 0;
  for (std::size_t i = 0; i < a.x.size(); ++i)
    worst = std::max({worst, std::fabs(b.vx[i] - 150 - a.vx[i]), std::fabs(b.vy[i] + 40 - a.vy[i]),
                      std::fabs(b.vz[i] - a.vz[i])});
  CHECK(worst < 1e-9);
  // reversed input order: the same velocity for every id
  auto base = box(20000, 1.0, 8, 6), rev = base;
  std::reverse(rev.id.begin(), rev.id.end());
  for (auto* v : {&rev.x, &rev.y, &rev.z, &rev.vx, &rev.vy, &rev.vz})
    std::reverse(v->begin(), v->end());
  collide_pairs(base, c, 5.0);
  collide_pairs(rev, c, 5.0);
  const std::size_t n = base.x.size();
  for (std::size_t i = 0; i < n; i += 37)
    CHECK(rev.vx[n - 1 - i] == base.vx[i]);
  // radius -> 0: no collision, not a bit changed
  auto z = box(5000, 1.0, 8, 7);
  const auto before = z.vx;
  c.radius_kpc = 1e-12;
  CHECK(collide_pairs(z, c, 5.0).collisions == 0);
  CHECK(z.vx == before);
  CHECK_THROWS_AS(
      [] {
        CloudCollisions bad;
        bad.radius_kpc = -1;
        orbit::PhaseSpace p;
        collide_pairs(p, bad, 1);
      }(),
      detail::ParameterError);
}

TEST_CASE("Cloud collisions: the number of collisions in a uniform Maxwellian box is "
          "N n sigma <v_rel> dt / 2 with sigma = pi (2a)^2 and <v_rel> = 4 s / sqrt(pi) "
          "(kinetic theory of gases, e.g. Reif 1965, sec. 12.2, from memory), within 5 %",
          "[gas][collisions]") {
  const double side = 2.0, s = 5, a = 0.004, dt_myr = 1.0;
  const std::size_t n_clouds = 100000;
  CloudCollisions c;
  c.radius_kpc = a;
  // count collisions of clouds at least 0.1 kpc inside the box (a complete neighbourhood)
  double counted = 0, expected = 0;
  const double n = double(n_clouds) / (side * side * side);
  const double rate =
      n * units::pi * 4 * a * a * 4 * s / std::sqrt(units::pi); // per cloud, per (kpc/(km/s))
  for (std::uint64_t seed = 11; seed < 16; ++seed) {
    auto p = box(n_clouds, side, s, seed);
    // random placement overlaps some pairs; a pass over a vanishing interval bounces the
    // approaching ones apart, as the passes before would have done in a run
    collide_pairs(p, c, 1e-9);
    const auto v0 = p.vx;
    collide_pairs(p, c, dt_myr);
    std::size_t inner = 0;
    for (std::size_t i = 0; i < n_clouds; ++i) {
      const bool in = std::min({p.x[i], p.y[i], p.z[i]}) > 0.1 &&
                      std::max({p.x[i], p.y[i], p.z[i]}) < side - 0.1;
      if (!in) continue;
      ++inner;
      counted += p.vx[i] != v0[i]; // this cloud collided
    }
    expected += double(inner) * rate * units::myr_to_internal(dt_myr);
  }
  INFO("collided " << counted << ", expected " << expected);
  REQUIRE(expected > 3000);
  // each cloud collides at most once per pass, which loses second collisions (about 1.5 % here)
  CHECK(counted / expected == Approx(1.0).margin(0.05));
}

namespace {
// n clouds in a patch of a disk rotating at 220 km/s (flat rotation, clockwise from +z) with a
// dispersion sigma about it; every 50th cloud counter-rotates, so the search's fast path is used.
orbit::PhaseSpace rotating_patch(std::size_t n, double sigma, std::uint64_t seed, double r0 = 7.8,
                                 double r1 = 8.2, double dphi = 0.05) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> R(r0, r1), phi(-dphi, dphi), z(-0.02, 0.02);
  std::normal_distribution<double> g(0, sigma);
  orbit::PhaseSpace p;
  p.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    const double r = R(rng), f = phi(rng);
    p.id[i] = 1000 + 7 * i;
    p.x[i] = -r * std::cos(f), p.y[i] = r * std::sin(f), p.z[i] = z(rng);
    const double v = (i % 50 == 0 ? -220 : 220) * std::min(1.0, std::sqrt(r)); // (v/R)(y, -x)
    p.vx[i] = v / r * p.y[i] + g(rng), p.vy[i] = -v / r * p.x[i] + g(rng), p.vz[i] = g(rng);
  }
  return p;
}

// The events a pass must give, found by testing every pair: first contact of straight paths
// within dt while approaching, taken in order of time (ties by ids), each cloud once.
std::vector<std::array<double, 3>> brute_force_events(const orbit::PhaseSpace& p, double a,
                                                      double dt_myr) {
  const double dt = units::myr_to_internal(dt_myr);
  std::vector<std::tuple<double, std::uint64_t, std::uint64_t, std::size_t, std::size_t>> all;
  for (std::size_t i = 0; i < p.size(); ++i)
    for (std::size_t j = i + 1; j < p.size(); ++j) {
      const double r[3] = {p.x[j] - p.x[i], p.y[j] - p.y[i], p.z[j] - p.z[i]};
      const double u[3] = {p.vx[j] - p.vx[i], p.vy[j] - p.vy[i], p.vz[j] - p.vz[i]};
      const double ru = r[0] * u[0] + r[1] * u[1] + r[2] * u[2];
      const double uu = u[0] * u[0] + u[1] * u[1] + u[2] * u[2];
      const double rr = r[0] * r[0] + r[1] * r[1] + r[2] * r[2];
      if (!(ru < 0)) continue;
      const double disc = ru * ru - uu * (rr - 4 * a * a);
      if (disc < 0) continue;
      const double t = rr <= 4 * a * a ? 0 : (-ru - std::sqrt(disc)) / uu;
      if (t <= dt)
        all.emplace_back(t, std::min(p.id[i], p.id[j]), std::max(p.id[i], p.id[j]), i, j);
    }
  std::sort(all.begin(), all.end());
  std::vector<char> done(p.size(), 0);
  std::vector<std::array<double, 3>> out;
  for (const auto& [t, ia, ib, i, j] : all) {
    if (done[i] || done[j]) continue;
    done[i] = done[j] = 1;
    out.push_back({double(ia), double(ib), units::internal_to_myr(t)});
  }
  return out;
}
} // namespace

TEST_CASE("Cloud collisions: the cell search finds exactly the collisions that testing every "
          "pair finds, with or without the circular flow as a guide, on 1 or 2 threads",
          "[gas][collisions]") {
  const double a = 0.003, dt = 0.5;
  CloudCollisions c;
  c.radius_kpc = a;
  std::vector<double> vc(3001, 220.0);
  vc[0] = 0;
  const CircularFlow flow(vc, 0.01);
  for (std::uint64_t seed : {21u, 22u, 23u}) {
    const auto p0 = rotating_patch(4000, 10, seed);
    const auto want = brute_force_events(p0, a, dt);
    REQUIRE(want.size() > 20);
    for (int threads : {1, 2})
      for (bool guided : {true, false}) {
        omp_set_num_threads(threads);
        auto p = p0;
        const auto got = collide_pairs(p, c, dt, guided ? flow : CircularFlow());
        INFO("seed " << seed << ", " << threads << " threads, guided " << guided);
        REQUIRE(got.events.size() == want.size());
        for (std::size_t k = 0; k < want.size(); ++k) {
          CHECK(double(got.events[k].id_a) == want[k][0]);
          CHECK(double(got.events[k].id_b) == want[k][1]);
          CHECK(got.events[k].t_myr == Approx(want[k][2]).margin(1e-12));
        }
      }
    omp_set_num_threads(2);
    // the guide only prunes the search: a flow-guided pass gives the same bits as an unguided one
    auto g = p0, u = p0;
    collide_pairs(g, c, dt, flow);
    collide_pairs(u, c, dt);
    CHECK(g.vx == u.vx);
    CHECK(g.vz == u.vz);
  }
}

TEST_CASE("Cloud collisions: near a steep inner rotation curve (v_c rising as sqrt(R) inside "
          "1 kpc, where the flow's global Lipschitz bound is useless but its local one is not) the "
          "flow-guided search still finds exactly what testing every pair finds",
          "[gas][collisions]") {
  const double a = 0.002, dt = 0.5;
  CloudCollisions c;
  c.radius_kpc = a;
  std::vector<double> vc(3001);
  for (std::size_t k = 0; k < vc.size(); ++k)
    vc[k] = 220 * std::min(1.0, std::sqrt(0.01 * double(k)));
  const CircularFlow flow(vc, 0.01);
  for (std::uint64_t seed : {31u, 32u}) {
    // a patch at R 0.5-1.5 kpc, and one at 0.05-0.25 kpc where the flow is too steep to help
    for (const auto& [r0, r1] : {std::pair{0.5, 1.5}, std::pair{0.05, 0.25}}) {
      const auto p0 = rotating_patch(3000, 10, seed, r0, r1, 0.02 / r0);
      const auto want = brute_force_events(p0, a, dt);
      INFO("seed " << seed << ", R from " << r0);
      REQUIRE(want.size() > 20);
      auto p = p0;
      const auto got = collide_pairs(p, c, dt, flow);
      REQUIRE(got.events.size() == want.size());
      for (std::size_t k = 0; k < want.size(); ++k) {
        CHECK(double(got.events[k].id_a) == want[k][0]);
        CHECK(double(got.events[k].id_b) == want[k][1]);
        CHECK(got.events[k].t_myr == Approx(want[k][2]).margin(1e-12));
      }
    }
  }
}

// Warmth and star formation of the cloud gas: the stirring's random walk, the approach-speed
// distribution of hard-sphere collisions, and the density law of collisional star formation.
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <random>

#include "undertow/gas/cloud_gas.hpp"
#include "undertow/gas/stirring.hpp"
#include "undertow/units.hpp"

using namespace undertow;
using namespace undertow::gas;

namespace {
orbit::PhaseSpace box(std::size_t n, double side, double sigma, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(0, side);
  std::normal_distribution<double> g(0, sigma);
  orbit::PhaseSpace p;
  p.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    p.id[i] = i;
    p.x[i] = u(rng), p.y[i] = u(rng), p.z[i] = u(rng);
    p.vx[i] = g(rng), p.vy[i] = g(rng), p.vz[i] = g(rng);
  }
  return p;
}
double variance(const std::vector<double>& v) {
  double m = 0, s = 0;
  for (double x : v)
    m += x;
  m /= double(v.size());
  for (double x : v)
    s += (x - m) * (x - m);
  return s / double(v.size() - 1);
}
} // namespace

TEST_CASE("Stirring: each velocity component random-walks with variance kms^2 per Myr (a sum "
          "of independent Gaussian kicks: the variances add), the same in a boosted frame",
          "[gas][stirring]") {
  const std::size_t n = 20000;
  auto p = box(n, 1, 0, 1);
  for (auto& v : p.vx)
    v = 0;
  auto boosted = p;
  for (auto& v : boosted.vy)
    v += 200;
  const double kms = 2, dt = 0.5;
  for (int k = 0; k < 100; ++k) {
    stir(p, n, kms, dt, 10 + k * dt, 9);
    stir(boosted, n, kms, dt, 10 + k * dt, 9);
  }
  // 50 Myr: variance 4 * 50 = 200 (km/s)^2, sampling error sqrt(2/n) = 1 %
  for (const auto* v : {&p.vx, &p.vy, &p.vz})
    CHECK(variance(*v) == Approx(200).epsilon(0.04));
  double worst = 0;
  for (std::size_t i = 0; i < n; ++i)
    worst = std::max(worst, std::fabs(boosted.vy[i] - 200 - p.vy[i]));
  CHECK(worst < 1e-10);
  // a different step time draws different kicks; the same time the same kicks
  auto a = box(100, 1, 0, 2), b = a, c = a;
  stir(a, 100, 1, 0.5, 3.0, 9);
  stir(b, 100, 1, 0.5, 3.0, 9);
  stir(c, 100, 1, 0.5, 3.5, 9);
  CHECK(a.vx == b.vx);
  CHECK(a.vx != c.vx);
}

TEST_CASE("Stirring: one step's kicks are Gaussian (tail fractions P(|g| > k sigma) = "
          "erfc(k / sqrt 2), closed form) and the three components uncorrelated, for a cloud count "
          "that leaves a partial block",
          "[gas][stirring]") {
  const std::size_t n = 400003;
  auto p = box(n, 1, 0, 3);
  for (auto* v : {&p.vx, &p.vy, &p.vz})
    std::fill(v->begin(), v->end(), 0.0);
  const double kms = 3, dt = 0.25, sigma = kms * std::sqrt(dt);
  stir(p, n, kms, dt, 7.5, 11);
  for (const auto* v : {&p.vx, &p.vy, &p.vz})
    for (double k : {0.5, 1.0, 2.0, 3.0}) {
      std::size_t beyond = 0;
      for (double g : *v)
        beyond += std::fabs(g) > k * sigma;
      const double f = double(beyond) / double(n), expect = std::erfc(k / std::sqrt(2.0));
      // 4 binomial standard errors
      CHECK(std::fabs(f - expect) < 4 * std::sqrt(expect * (1 - expect) / double(n)));
    }
  const auto corr = [&](const std::vector<double>& a, const std::vector<double>& b) {
    double s = 0;
    for (std::size_t i = 0; i < n; ++i)
      s += a[i] * b[i];
    return s / (double(n) * sigma * sigma);
  };
  // zero-mean Gaussians: the correlation's standard error is 1 / sqrt(n)
  CHECK(std::fabs(corr(p.vx, p.vy)) < 4 / std::sqrt(double(n)));
  CHECK(std::fabs(corr(p.vx, p.vz)) < 4 / std::sqrt(double(n)));
  CHECK(std::fabs(corr(p.vy, p.vz)) < 4 / std::sqrt(double(n)));
  // another seed draws independent kicks, and neighbouring ids' kicks are independent too
  auto o = box(n, 1, 0, 3);
  for (auto* v : {&o.vx, &o.vy, &o.vz})
    std::fill(v->begin(), v->end(), 0.0);
  stir(o, n, kms, dt, 7.5, 12);
  CHECK(std::fabs(corr(p.vx, o.vx)) < 4 / std::sqrt(double(n)));
  CHECK(std::fabs(corr(p.vz, o.vz)) < 4 / std::sqrt(double(n)));
  std::vector<double> next(p.vx.begin() + 1, p.vx.end());
  next.push_back(p.vx[0]);
  CHECK(std::fabs(corr(p.vx, next)) < 4 / std::sqrt(double(n)));
  // the kick of a cloud depends on its id, not on where it sits in the arrays
  auto q = box(n, 1, 0, 3);
  for (auto* v : {&q.vx, &q.vy, &q.vz})
    std::fill(v->begin(), v->end(), 0.0);
  std::reverse(q.id.begin(), q.id.end());
  stir(q, n, kms, dt, 7.5, 11);
  CHECK(q.vx[0] == p.vx[n - 1]);
  CHECK(q.vz[n - 1] == p.vz[0]);
  CHECK(q.vy[n / 2 + 77] == p.vy[n - 1 - (n / 2 + 77)]);
}

TEST_CASE("Star formation: the approach speeds of hard-sphere collisions in a Maxwellian gas "
          "exceed X with probability exp(-X^2 / (4 s^2)) (flux-weighted normal relative "
          "velocity of variance 2 s^2: kinetic theory, derived), and stars form at the contact "
          "with the pair's velocity and the chosen dispersion",
          "[gas][stars]") {
  const double s = 6, a = 0.004;
  CloudCollisions c;
  c.radius_kpc = a;
  std::vector<double> approach;
  std::vector<CollisionEvent> events;
  for (std::uint64_t seed = 1; seed <= 4; ++seed) {
    auto p = box(60000, 1.5, s, seed);
    collide_pairs(p, c, 1e-9); // separate the pairs that random placement overlapped
    const auto pass = collide_pairs(p, c, 0.5);
    for (const auto& e : pass.events) {
      if (e.t_myr > 0) approach.push_back(e.approach_kms); // contacts, not initial overlaps
      events.push_back(e);
    }
  }
  REQUIRE(approach.size() > 2000);
  for (double X : {4.0, 8.0, 12.0}) {
    double above = 0;
    for (double u : approach)
      above += u > X;
    const double want = std::exp(-X * X / (4 * s * s)), n = double(approach.size());
    INFO("X = " << X << ": " << above / n << " against " << want);
    CHECK(std::fabs(above / n - want) < 4 * std::sqrt(want * (1 - want) / n) + 0.005);
  }
  StarFormation sf;
  sf.threshold_kms = 8, sf.efficiency = 1, sf.dispersion_kms = 2;
  const auto born = form_stars(events, sf, 100, 3);
  std::size_t qualifying = 0;
  for (const auto& e : events)
    qualifying += e.approach_kms >= 8;
  CHECK(born.size() == qualifying);
  std::vector<double> dv;
  for (const auto& b : born) {
    const CollisionEvent* e = nullptr;
    for (const auto& x : events)
      if (x.id_a == b.parent_a && x.id_b == b.parent_b) e = &x;
    REQUIRE(e);
    CHECK(b.birth_time_myr == Approx(100 + e->t_myr));
    CHECK(b.bx == e->x);
    dv.push_back(b.vx - e->vx);
    if (dv.size() > 3000) break;
  }
  CHECK(std::sqrt(variance(dv)) == Approx(2).epsilon(0.08));
  sf.efficiency = 0.25;
  const double kept = double(form_stars(events, sf, 100, 3).size()) / double(qualifying);
  CHECK(kept == Approx(0.25).margin(4 * std::sqrt(0.25 * 0.75 / double(qualifying))));
}

TEST_CASE("Star formation: the rate per volume goes as the square of the cloud density, the law "
          "of binary collisions (Schmidt 1959, ApJ 129, 243, exponent 2 in volume density)",
          "[gas][stars]") {
  CloudCollisions c;
  c.radius_kpc = 0.004;
  StarFormation sf;
  sf.threshold_kms = 3, sf.efficiency = 0.5;
  double formed[2] = {0, 0};
  const std::size_t counts[2] = {160000, 320000};
  for (int k = 0; k < 2; ++k)
    for (std::uint64_t seed = 1; seed <= 4; ++seed) {
      auto p = box(counts[k], 2.0, 6, 100 + seed);
      collide_pairs(p, c, 1e-9);
      const auto pass = collide_pairs(p, c, 0.3);
      std::vector<CollisionEvent> later;
      for (const auto& e : pass.events)
        if (e.t_myr > 0) later.push_back(e);
      formed[k] += double(form_stars(later, sf, 0, seed).size());
    }
  INFO(formed[0] << " and " << formed[1] << " stars");
  REQUIRE(formed[0] > 1000);
  // doubling the density: 4 times the stars in the same volume and time, to Poisson error (and
  // the < 1 % each cloud loses by colliding at most once per pass)
  const double ratio = formed[1] / formed[0];
  const double err = ratio * std::sqrt(1 / formed[0] + 1 / formed[1]);
  CHECK(std::fabs(ratio - 4) < 3 * err + 0.04);
}

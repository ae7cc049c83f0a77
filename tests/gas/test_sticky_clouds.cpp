// Sticky-cloud collisions: the collision rule against the mechanics of inelastic impacts, the
// steady state of a cold disk, determinism, and the shock-like crowding of gas in a spiral.
#include <omp.h>

#include <algorithm>
#include <array>
#include <catch2/catch.hpp>
#include <cmath>
#include <fstream>
#include <random>
#include <sstream>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/gas/sticky_clouds.hpp"
#include "undertow/orbit/integrator.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/scenario/scenario.hpp"
#include "undertow/tracers/disk_population.hpp"

using namespace undertow;

namespace {

orbit::PhaseSpace clouds(std::size_t n) {
  orbit::PhaseSpace p;
  p.resize(n);
  for (std::size_t i = 0; i < n; ++i)
    p.id[i] = i;
  return p;
}

potential::Model kestrel(const char* file) {
  return potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/" + file);
}

// Clumping of the annulus 6.5-9.5 kpc: <N^2>/<N>^2 - 1 - 1/<N> over cells of 0.25 kpc (the
// Poisson part removed), the variance of the relative surface density: zero for a smooth disk.
double clumping(const orbit::PhaseSpace& p) {
  const int n = 80;
  std::vector<double> cells(std::size_t(n * n), 0);
  for (std::size_t i = 0; i < p.size(); ++i) {
    const int ix = int((p.x[i] + 10) / 0.25), iy = int((p.y[i] + 10) / 0.25);
    if (ix >= 0 && ix < n && iy >= 0 && iy < n) cells[std::size_t(iy * n + ix)] += 1;
  }
  double s1 = 0, s2 = 0, k = 0;
  for (int iy = 0; iy < n; ++iy)
    for (int ix = 0; ix < n; ++ix) {
      const double R = std::hypot(-10 + 0.25 * (ix + 0.5), -10 + 0.25 * (iy + 0.5));
      if (R < 6.5 || R > 9.5) continue;
      const double c = cells[std::size_t(iy * n + ix)];
      s1 += c, s2 += c * c, k += 1;
    }
  const double mean = s1 / k;
  return s2 / k / (mean * mean) - 1 - 1 / mean;
}

} // namespace

TEST_CASE("Two clouds in one cell collide as an inelastic impact with coefficient of restitution "
          "e: centre-of-mass velocity kept, relative velocity times e, kinetic energy lost "
          "(1 - e^2) mu v_rel^2 / 2",
          "[gas]") {
  // Reference: Newton's law of restitution for the impact of two bodies (e.g. Kleppner &
  // Kolenkow, An Introduction to Mechanics, chapter on momentum; from memory), here applied to
  // the whole relative velocity. Equal masses: mu = m / 2, per unit cloud mass 1/4.
  for (const double e : {0.0, 0.3, 0.8, 1.0}) {
    auto p = clouds(2);
    p.x = {0.01, 0.05};
    p.y = {0.02, 0.07};
    p.z = {0.0, 0.01};
    p.vx = {30, -10};
    p.vy = {5, 25};
    p.vz = {-2, 4};
    gas::StickyClouds s;
    s.restitution = e;
    const auto sum = gas::collide(p, gas::CircularFlow(), s);
    CHECK(sum.cells == 1);
    CHECK(sum.clouds == 2);
    CHECK(p.vx[0] + p.vx[1] == Approx(20).margin(1e-12));
    CHECK(p.vy[0] + p.vy[1] == Approx(30).margin(1e-12));
    CHECK(p.vz[0] + p.vz[1] == Approx(2).margin(1e-12));
    CHECK(p.vx[0] - p.vx[1] == Approx(e * 40).margin(1e-12));
    CHECK(p.vy[0] - p.vy[1] == Approx(e * -20).margin(1e-12));
    CHECK(p.vz[0] - p.vz[1] == Approx(e * -6).margin(1e-12));
    const double vrel2 = 40 * 40 + 20 * 20 + 6 * 6;
    CHECK(sum.energy_lost == Approx(0.25 * (1 - e * e) * vrel2));
  }
}

TEST_CASE("Clouds in different cells do not collide, and a lone cloud keeps its velocity",
          "[gas]") {
  auto p = clouds(3);
  p.x = {0.05, 0.55, 30.0}; // the third lies beyond the grid
  p.y = {0.05, 0.05, 0.0};
  p.z = {0, 0, 0};
  p.vx = {10, -10, 5};
  p.vy = {0, 0, 0};
  p.vz = {0, 0, 0};
  const auto before = p;
  gas::StickyClouds s;
  s.cell_kpc = 0.2;
  const auto sum = gas::collide(p, gas::CircularFlow(), s);
  CHECK(sum.cells == 0);
  CHECK(p.vx == before.vx);
}

TEST_CASE("Many clouds in one cell: momentum is kept and the random kinetic energy about the "
          "mean drops by exactly e^2 (the definition of the restitution coefficient)",
          "[gas]") {
  std::mt19937_64 rng(3);
  std::normal_distribution<double> g(0, 10);
  std::uniform_real_distribution<double> u(0.0, 0.19);
  auto p = clouds(500);
  for (std::size_t i = 0; i < p.size(); ++i) {
    p.x[i] = u(rng), p.y[i] = u(rng), p.z[i] = u(rng);
    p.vx[i] = 20 + g(rng), p.vy[i] = -5 + g(rng), p.vz[i] = g(rng);
  }
  const auto stats = [](const orbit::PhaseSpace& q) {
    double mx = 0, my = 0, mz = 0, k = 0;
    const double n = double(q.size());
    for (std::size_t i = 0; i < q.size(); ++i)
      mx += q.vx[i], my += q.vy[i], mz += q.vz[i];
    mx /= n, my /= n, mz /= n;
    for (std::size_t i = 0; i < q.size(); ++i)
      k += std::pow(q.vx[i] - mx, 2) + std::pow(q.vy[i] - my, 2) + std::pow(q.vz[i] - mz, 2);
    return std::array<double, 4>{mx, my, mz, k};
  };
  const auto a = stats(p);
  gas::StickyClouds s;
  s.restitution = 0.4;
  const auto sum = gas::collide(p, gas::CircularFlow(), s);
  const auto b = stats(p);
  CHECK(sum.cells == 1);
  for (int c = 0; c < 3; ++c)
    CHECK(b[c] == Approx(a[c]).margin(1e-10));
  CHECK(b[3] == Approx(0.16 * a[3]).epsilon(1e-12));
  CHECK(sum.energy_lost == Approx(0.5 * (1 - 0.16) * a[3]).epsilon(1e-12));
}

TEST_CASE("A cold gas disk on circular orbits is a steady state: collisions leave it as it is "
          "and it stays circular for 200 Myr",
          "[gas]") {
  // Reference: circular orbits of an axisymmetric potential, v_c^2 = R dPhi/dR (Binney &
  // Tremaine 2008, eq. 2.17); cold streams on them never cross, so nothing may dissipate.
  const auto m = kestrel("kestrel-axisymmetric.toml");
  tracers::DiskPopulation d;
  d.count = 5000;
  d.sigma_r_kms = 1e-9;
  d.sigma_z_kms = 1e-9;
  d.scale_height_kpc = 1e-9;
  d.asymmetric_drift = false;
  auto p = tracers::sample(m, d, 4, 0, d.count);
  const gas::CircularFlow flow(m, 30);
  gas::StickyClouds s;
  const auto before = p;
  (void)gas::collide(p, flow, s);
  double worst = 0;
  for (std::size_t i = 0; i < p.size(); ++i)
    worst = std::max(worst, std::hypot(p.vx[i] - before.vx[i], p.vy[i] - before.vy[i]));
  CHECK(worst < 0.05); // km/s: the tabulated flow against the sampled v_c, both from the model
  orbit::IntegrationSettings is;
  is.step_myr = 0.5;
  for (int k = 0; k < 200; ++k) {
    orbit::advance(m, p, k, k + 1, is);
    (void)gas::collide(p, flow, s);
  }
  double vr = 0;
  for (std::size_t i = 0; i < p.size(); ++i) {
    const double R = std::hypot(p.x[i], p.y[i]);
    vr = std::max(vr, std::fabs((p.x[i] * p.vx[i] + p.y[i] * p.vy[i]) / R));
  }
  CHECK(vr < 0.1); // km/s
}

TEST_CASE("A collision pass gives the same bits on 1 and 2 threads", "[gas]") {
  const auto m = kestrel("kestrel-axisymmetric.toml");
  tracers::DiskPopulation d;
  d.count = 20000;
  const auto p0 = tracers::sample(m, d, 9, 0, d.count);
  const gas::CircularFlow flow(m, 30);
  gas::StickyClouds s;
  auto a = p0, b = p0;
  omp_set_num_threads(1);
  const auto sa = gas::collide(a, flow, s);
  omp_set_num_threads(2);
  const auto sb = gas::collide(b, flow, s);
  CHECK(sa.cells > 1000);
  CHECK(sa.cells == sb.cells);
  CHECK(a.vx == b.vx);
  CHECK(a.vy == b.vy);
  CHECK(a.vz == b.vz);
}

TEST_CASE("In a spiral potential colliding clouds crowd into the arms far more than the same "
          "clouds without collisions",
          "[gas]") {
  // Reference: Roberts (1969, ApJ 158, 123): gas flowing through a spiral potential of a few
  // per cent of the axisymmetric force shocks and is compressed several-fold, while a
  // collisionless population of the same (low) dispersion responds nearly linearly.
  const auto m =
      potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/demo/truth/galaxy.toml");
  tracers::DiskPopulation d;
  d.count = 40000;
  d.r_min_kpc = 6;
  d.r_max_kpc = 10;
  d.scale_length_kpc = 5;
  d.sigma_r_kms = 5;
  d.sigma_z_kms = 3;
  auto stars = tracers::sample(m, d, 2, 0, d.count);
  auto cloud = stars;
  const gas::CircularFlow flow(m, 30);
  gas::StickyClouds s;
  orbit::IntegrationSettings is;
  is.step_myr = 0.5;
  orbit::advance(m, stars, 0, 400, is);
  for (int k = 0; k < 400; ++k) {
    orbit::advance(m, cloud, k, k + 1, is);
    (void)gas::collide(cloud, flow, s);
  }
  const double cs = clumping(stars), cg = clumping(cloud);
  INFO("clumping: collisionless " << cs << ", clouds " << cg);
  CHECK(cg > 1.5 * cs);
  CHECK(cg > 1.0); // rms relative surface-density contrast above 100 %
}

TEST_CASE("A [gas] table with a misspelled key, a restitution outside [0, 1] or an adaptive "
          "method is refused, naming the key",
          "[gas]") {
  std::ifstream in(std::string(UNDERTOW_SOURCE_DIR) + "/demo/spiral.toml");
  std::stringstream ss;
  ss << in.rdbuf();
  const std::string text = ss.str(), path = std::string(UNDERTOW_SOURCE_DIR) + "/demo/x.toml";
  const auto with = [&](const std::string& from, const std::string& to) {
    std::string t = text;
    const auto at = t.find(from);
    REQUIRE(at != std::string::npos);
    return t.replace(at, from.size(), to);
  };
  CHECK(scenario::parse_scenario(text, path).gas.has_value());
  CHECK_THROWS_WITH(scenario::parse_scenario(with("cell_kpc = 0.15", "cel_kpc = 0.15"), path),
                    Catch::Contains("gas.cel_kpc") && Catch::Contains("unknown key"));
  CHECK_THROWS_WITH(scenario::parse_scenario(with("restitution = 0.3", "restitution = 1.5"), path),
                    Catch::Contains("gas.restitution") && Catch::Contains("from 0 to 1"));
  CHECK_THROWS_WITH(
      scenario::parse_scenario(with("method = \"leapfrog\"", "method = \"dopri5\""), path),
      Catch::Contains("fixed-step method"));
}

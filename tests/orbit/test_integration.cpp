// Orbit integration against closed forms (Binney & Tremaine 2008, "Galactic Dynamics", ch. 3)
// and against the integrators' own defining properties (Hairer, Lubich & Wanner 2006,
// "Geometric Numerical Integration": time reversibility, bounded energy error).
#include <catch2/catch.hpp>
#include <cmath>
#include <omp.h>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/orbit/conserved.hpp"
#include "undertow/orbit/integrator.hpp"
#include "undertow/potential/model_file.hpp"

using namespace undertow;
using namespace undertow::orbit;
using potential::Model;

namespace {

Model single(potential::ComponentShape s) {
  Model m;
  m.components.push_back({"c", std::move(s)});
  return m;
}

PhaseSpace one(double x, double y, double z, double vx, double vy, double vz) {
  PhaseSpace p;
  p.resize(1);
  p.id[0] = 0;
  p.x[0] = x, p.y[0] = y, p.z[0] = z, p.vx[0] = vx, p.vy[0] = vy, p.vz[0] = vz;
  return p;
}

double dist(const PhaseSpace& a, const PhaseSpace& b, std::size_t i = 0) {
  return std::hypot(a.x[i] - b.x[i], a.y[i] - b.y[i], a.z[i] - b.z[i]);
}

Model demo(bool spiral) {
  Model m =
      potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/kestrel.toml");
  if (!spiral) m.patterns.clear();
  return m;
}

IntegrationSettings with(Method m, double step, double tol = 1e-12) {
  IntegrationSettings s;
  s.method = m;
  s.step_myr = step;
  s.tolerance = tol;
  return s;
}

} // namespace

TEST_CASE("Kepler orbit: after 100 periods T = 2 pi sqrt(a^3/GM) the orbit is back at its "
          "apocentre a(1+e) (Kepler's third law)",
          "[orbit]") {
  const double M = 1e11, a = 8, e = 0.5, GM = units::G * M;
  const double T = 2 * units::pi * std::sqrt(a * a * a / GM) * units::time_unit_myr; // Myr
  const double ra = a * (1 + e), va = std::sqrt(GM / a * (1 - e) / (1 + e));
  const Model m = single(potential::PointMass::make(M));
  const PhaseSpace start = one(ra, 0, 0, 0, va, 0);
  struct Case {
    Method method;
    double step, tol;
  };
  for (const Case& c :
       {Case{Method::symplectic4, T / 4000, 1e-6}, Case{Method::leapfrog, T / 20000, 1e-3},
        Case{Method::dopri5, T / 100, 1e-7}, Case{Method::rk78, T / 100, 1e-7},
        Case{Method::bulirsch_stoer, T / 100, 1e-7}}) {
    INFO(method_name(c.method));
    PhaseSpace p = start;
    REQUIRE(advance(m, p, 0, 100 * T, with(c.method, c.step, 1e-13)));
    CHECK(dist(p, start) / ra < c.tol);
    CHECK(std::hypot(p.x[0], p.y[0]) == Approx(ra).epsilon(c.tol));
  }
}

TEST_CASE("Isochrone: radial period 2 pi GM/(-2E)^{3/2} and azimuthal advance "
          "pi (1 + L/sqrt(L^2 + 4GMb)) per radial period (B&T 2008 eqs. 3.225, 3.230)",
          "[orbit]") {
  const double M = 1e11, b = 2, GM = units::G * M;
  const Model m = single(potential::Isochrone::make(M, b));
  const double r0 = 10, vt = 120; // at apocentre: purely tangential velocity
  const PhaseSpace start = one(r0, 0, 0, 0, vt, 0);
  const double E = 0.5 * vt * vt + m.axisymmetric_potential({r0, 0, 0});
  const double Tr = 2 * units::pi * GM / std::pow(-2 * E, 1.5) * units::time_unit_myr;
  const double L = r0 * vt;
  const double dpsi = units::pi * (1 + L / std::sqrt(L * L + 4 * GM * b));
  for (Method meth : {Method::dopri5, Method::symplectic4}) {
    INFO(method_name(meth));
    PhaseSpace p = start;
    REQUIRE(advance(m, p, 0, Tr, with(meth, meth == Method::dopri5 ? 1.0 : Tr / 5000, 1e-13)));
    const double r = std::hypot(p.x[0], p.y[0]);
    const double vr = (p.x[0] * p.vx[0] + p.y[0] * p.vy[0]) / r;
    CHECK(r == Approx(r0).epsilon(1e-9));
    CHECK(std::fabs(vr) < 1e-7 * vt);
    // advance in the standard azimuth atan2(y, x): the orbit turns counter-clockwise here
    double adv = std::atan2(p.y[0], p.x[0]);
    if (adv < 0) adv += 2 * units::pi;
    CHECK(adv == Approx(dpsi).epsilon(1e-9));
  }
}

TEST_CASE("Time reversal: forward then backward returns to the start (adaptive to 1e-10, "
          "symplectic to round-off)",
          "[orbit]") {
  const Model m = demo(true);
  const double vc = dynamics::circular_speed(m, 8.1);
  const PhaseSpace start = one(-8.1, 0.3, 0.05, 15, vc - 10, 8);
  for (Method meth : {Method::dopri5, Method::rk78, Method::bulirsch_stoer}) {
    INFO(method_name(meth));
    PhaseSpace p = start;
    REQUIRE(advance(m, p, 700, 1200, with(meth, 0.5, 1e-13)));
    REQUIRE(advance(m, p, 1200, 700, with(meth, 0.5, 1e-13)));
    CHECK(dist(p, start) / 8.1 < 1e-10);
  }
  for (Method meth : {Method::leapfrog, Method::symplectic4}) {
    INFO(method_name(meth));
    PhaseSpace p = start;
    REQUIRE(advance(m, p, 700, 1200, with(meth, 0.5)));
    REQUIRE(advance(m, p, 1200, 700, with(meth, 0.5)));
    CHECK(dist(p, start) / 8.1 < 1e-12); // 1000 steps of round-off
  }
}

TEST_CASE("Symplectic steppers: the energy error stays bounded over 10 Gyr, with no secular "
          "drift (Hairer, Lubich & Wanner 2006, ch. IX)",
          "[orbit]") {
  const Model m = demo(false);
  const double vc = dynamics::circular_speed(m, 8.1);
  PhaseSpace p = one(-8.1, 0, 0.2, 30, vc - 20, 15);
  const Invariant inv = conserved_quantity(m, 0, 1e4);
  REQUIRE(inv.kind == Invariant::Kind::energy);
  for (Method meth : {Method::leapfrog, Method::symplectic4}) {
    INFO(method_name(meth));
    PhaseSpace q = p;
    const double e0 = evaluate(inv, m, q, 0)[0];
    double first = 0, last = 0;
    for (int seg = 0; seg < 100; ++seg) { // 100 segments of 100 Myr
      REQUIRE(advance(m, q, seg * 100.0, (seg + 1) * 100.0, with(meth, 1.0)));
      const double err = std::fabs(evaluate(inv, m, q, (seg + 1) * 100.0)[0] / e0 - 1);
      if (seg < 10) first = std::max(first, err);
      if (seg >= 90) last = std::max(last, err);
    }
    CHECK(last < 2 * first); // bounded: the last Gyr is no worse than the first
    CHECK(last < (meth == Method::leapfrog ? 1e-4 : 1e-8));
  }
}

TEST_CASE("Jacobi integral is conserved by the symplectic steppers in a rotating spiral after "
          "its growth (B&T 2008 §3.3.2)",
          "[orbit]") {
  const Model m = demo(true); // grows over 0-600 Myr
  const double vc = dynamics::circular_speed(m, 8.1);
  PhaseSpace p = one(-8.1, 0, 0.1, 20, vc - 15, 10);
  REQUIRE(advance(m, p, 0, 600, with(Method::symplectic4, 0.5)));
  const Invariant inv = conserved_quantity(m, 600, 3600);
  REQUIRE(inv.kind == Invariant::Kind::jacobi);
  CHECK(conserved_quantity(m, 0, 3600).kind == Invariant::Kind::none);
  const double j0 = evaluate(inv, m, p, 600)[0];
  REQUIRE(advance(m, p, 600, 3600, with(Method::symplectic4, 0.5)));
  CHECK(std::fabs(evaluate(inv, m, p, 3600)[0] / j0 - 1) < 1e-9);
}

TEST_CASE("Adaptive integration in the rotating frame gives the same orbit as in the inertial "
          "frame",
          "[orbit]") {
  const Model m = demo(true);
  const double vc = dynamics::circular_speed(m, 8.1);
  const PhaseSpace start = one(-8.1, 0.5, 0.1, 20, vc - 15, 10);
  PhaseSpace a = start, b = start;
  auto s = with(Method::dopri5, 0.5, 1e-12);
  REQUIRE(advance(m, a, 100, 900, s));
  s.rotating_frame_speed = m.patterns[0].pattern_speed;
  REQUIRE(advance(m, b, 100, 900, s));
  CHECK(dist(a, b) / 8.1 < 1e-8);
  CHECK(std::fabs(a.vx[0] - b.vx[0]) < 1e-6);
}

TEST_CASE("Results are bit-identical for 1 and 2 threads and for any batch size "
          "(design.md §6)",
          "[orbit]") {
  const Model m = demo(true);
  PhaseSpace p;
  const std::size_t n = 1000;
  p.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    const double R = 3 + 10.0 * double(i) / n, a = 0.37 * double(i);
    p.id[i] = i;
    p.x[i] = -R * std::cos(a), p.y[i] = R * std::sin(a), p.z[i] = 0.01 * double(i % 17);
    p.vx[i] = 200 * std::sin(a) + double(i % 7), p.vy[i] = 200 * std::cos(a),
    p.vz[i] = double(i % 5);
  }
  for (Method meth : {Method::leapfrog, Method::symplectic4, Method::dopri5}) {
    INFO(method_name(meth));
    auto s = with(meth, 1.0, 1e-9);
    PhaseSpace ref = p;
    omp_set_num_threads(1);
    s.batch = 4096;
    REQUIRE(advance(m, ref, 0, 200, s));
    for (int threads : {1, 2}) {
      for (std::size_t batch : {std::size_t(37), std::size_t(256)}) {
        omp_set_num_threads(threads);
        s.batch = batch;
        PhaseSpace q = p;
        REQUIRE(advance(m, q, 0, 200, s));
        CHECK(q.x == ref.x);
        CHECK(q.vy == ref.vy);
        CHECK(q.z == ref.z);
      }
    }
  }
  omp_set_num_threads(2);
}

TEST_CASE("Leapfrog steps taken one call at a time with the accelerations carried give the bits "
          "of one advance(), in a rotating, growing spiral, for any batch size and thread count, "
          "and new tracers join with their accelerations computed afresh",
          "[orbit]") {
  Model m = demo(true);
  m.patterns[0].growth.start_myr = 0, m.patterns[0].growth.duration_myr = 50; // changes with t
  PhaseSpace p;
  const std::size_t n = 500;
  p.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    const double R = 4 + 8.0 * double(i) / n, a = 0.61 * double(i);
    p.id[i] = i;
    p.x[i] = -R * std::cos(a), p.y[i] = R * std::sin(a), p.z[i] = 0.02 * double(i % 11);
    p.vx[i] = 220 * std::sin(a) + double(i % 9), p.vy[i] = 220 * std::cos(a),
    p.vz[i] = double(i % 4);
  }
  auto s = with(Method::leapfrog, 0.5);
  PhaseSpace ref = p;
  REQUIRE(advance(m, ref, 0, 40, s));
  for (int threads : {1, 2}) {
    for (std::size_t batch : {std::size_t(37), std::size_t(4096)}) {
      omp_set_num_threads(threads);
      s.batch = batch;
      PhaseSpace q = p;
      CarriedAccelerations acc;
      acc.forget(n);
      for (std::size_t k = 0; k < 80; ++k)
        REQUIRE(advance_steps(m, q, 0, 40, k, 1, s, nullptr, &acc));
      CHECK(q.x == ref.x);
      CHECK(q.vy == ref.vy);
      CHECK(q.vz == ref.vz);
    }
  }
  omp_set_num_threads(2);
  // A tracer without a carried acceleration (NaN) gets it computed where it stands; the others
  // keep theirs: with half the tracers forgotten halfway, those give the bits of a fresh start
  // there.
  PhaseSpace a = p, b;
  CarriedAccelerations acc;
  acc.forget(n);
  for (std::size_t k = 0; k < 40; ++k)
    REQUIRE(advance_steps(m, a, 0, 40, k, 1, s, nullptr, &acc));
  b = a;
  for (std::size_t i = 0; i < n; i += 2)
    acc.ax[i] = acc.ay[i] = acc.az[i] = NAN;
  CarriedAccelerations fresh;
  fresh.forget(n);
  REQUIRE(advance_steps(m, b, 0, 40, 40, 1, s, nullptr, &fresh));
  REQUIRE(advance_steps(m, a, 0, 40, 40, 1, s, nullptr, &acc));
  for (std::size_t i = 0; i < n; i += 2)
    CHECK(a.vx[i] == b.vx[i]);
  for (std::size_t i = 1; i < n; i += 2) // carried from the end of the last step
    CHECK(std::abs(a.vx[i] - b.vx[i]) <= 1e-12 * std::abs(b.vx[i]));
}

// Ensemble integration through Boost.Odeint.
//
// Symplectic methods advance a batch of tracers as one state: q = (x[], y[], z[]) and
// p = (vx[], vy[], vz[]) are flat structure-of-arrays vectors, so odeint's range algebra runs
// contiguous loops and the force call evaluates the whole batch at once. McLachlan's stepper
// gives its force function no time, so time rides along as one more coordinate with unit
// "momentum" (extended phase space): each drift sub-step moves it exactly as it moves the
// positions, and the pattern's growth and rotation are seen at the right stage times.
// Internal time unit: kpc/(km/s), so that dx/dt = v and dv/dt = a with no factors.
#include "undertow/orbit/integrator.hpp"

#include <boost/numeric/odeint.hpp>
#include <cmath>
#include <mutex>

#include "undertow/error.hpp"
#include "undertow/orbit/frame.hpp"
#include "undertow/orbit/soa_algebra.hpp"
#include "undertow/units.hpp"

namespace undertow::orbit {
namespace {

namespace ode = boost::numeric::odeint;
using Vec = std::vector<double>;
using potential::Model;

constexpr double kMyr = units::time_unit_myr; // Myr per internal time unit

// Force on a batch of n tracers laid out as (x[n], y[n], z[n], ...).
struct BatchForce {
  const Model* m;
  std::size_t n;
  void eval(const Vec& q, Vec& a, double t_internal) const {
    const double* x = q.data();
    double* o = a.data();
    m->accelerations({x, n}, {x + n, n}, {x + 2 * n, n}, t_internal * kMyr, {o, n}, {o + n, n},
                     {o + 2 * n, n});
  }
};

struct VerletSystem {
  BatchForce f;
  void operator()(const Vec& q, const Vec& /*v*/, Vec& a, double t) const { f.eval(q, a, t); }
};

// q and p carry time as their last element (q[3n] = t, p[3n] = 1).
struct ExtendedSystem {
  BatchForce f;
  void operator()(const Vec& q, Vec& dpdt) const {
    f.eval(q, dpdt, q[3 * f.n]);
    dpdt[3 * f.n] = 0.0;
  }
};

void gather(const PhaseSpace& p, std::size_t first, std::size_t n, Vec& q, Vec& v) {
  for (std::size_t i = 0; i < n; ++i) {
    q[i] = p.x[first + i];
    q[n + i] = p.y[first + i];
    q[2 * n + i] = p.z[first + i];
    v[i] = p.vx[first + i];
    v[n + i] = p.vy[first + i];
    v[2 * n + i] = p.vz[first + i];
  }
}

void scatter(PhaseSpace& p, std::size_t first, std::size_t n, const Vec& q, const Vec& v) {
  for (std::size_t i = 0; i < n; ++i) {
    p.x[first + i] = q[i];
    p.y[first + i] = q[n + i];
    p.z[first + i] = q[2 * n + i];
    p.vx[first + i] = v[i];
    p.vy[first + i] = v[n + i];
    p.vz[first + i] = v[2 * n + i];
  }
}

// Steppers and state buffers are kept per thread and reused from batch to batch, so a long run
// does not allocate, fault in and release memory for every batch.
using Verlet = ode::velocity_verlet<Vec, Vec, double, Vec, double, double, SoaAlgebra,
                                    ode::default_operations, ode::always_resizer>;
using McLachlan = ode::symplectic_rkn_sb3a_mclachlan<Vec, Vec, double, Vec, Vec, double, SoaAlgebra,
                                                     ode::default_operations, ode::always_resizer>;

// Leapfrog on the tracers' own arrays with the acceleration carried between calls: the
// arithmetic of odeint's velocity_verlet::do_step_v1 (the same expressions in the same order,
// so the bits match the copying path below), without copying positions, velocities and
// accelerations into and out of a batch state, which cost as much as the kicks and drifts.
// Each step spans `stride` of the segment's steps of length dt: steps k0, k0 + stride, ...
void advance_batch_carried(const Model& m, PhaseSpace& p, std::size_t first, std::size_t n,
                           double t0, double dt, std::size_t k0, std::size_t steps,
                           std::size_t stride, CarriedAccelerations& c) {
  double *x = p.x.data() + first, *y = p.y.data() + first, *z = p.z.data() + first;
  double *vx = p.vx.data() + first, *vy = p.vy.data() + first, *vz = p.vz.data() + first;
  double *ax = c.ax.data() + first, *ay = c.ay.data() + first, *az = c.az.data() + first;
  thread_local Vec a1;
  a1.resize(3 * n);
  double *bx = a1.data(), *by = bx + n, *bz = by + n;
  const auto force = [&](double t_internal) {
    m.accelerations({x, n}, {y, n}, {z, n}, t_internal * kMyr, {bx, n}, {by, n}, {bz, n});
  };
  bool unknown = false;
  for (std::size_t i = 0; i < n; ++i)
    unknown = unknown || std::isnan(ax[i]);
  if (unknown) { // afresh for the whole batch, kept only where nothing was carried
    force(t0 + double(k0) * dt);
    for (std::size_t i = 0; i < n; ++i)
      if (std::isnan(ax[i])) ax[i] = bx[i], ay[i] = by[i], az[i] = bz[i];
  }
  const double D = double(stride) * dt; // exactly dt for stride 1: the bits of advance()
  const double h = 0.5 * D * D, hdt = 0.5 * D;
  // One component at a time, element by element: the loops vectorise.
  const auto drift = [n, D, h](double* __restrict q, const double* __restrict v,
                               const double* __restrict a) {
#pragma omp simd
    for (std::size_t i = 0; i < n; ++i)
      q[i] = 1.0 * q[i] + D * v[i] + h * a[i];
  };
  const auto kick = [n, hdt](double* __restrict v, double* __restrict a0,
                             const double* __restrict a1) {
#pragma omp simd
    for (std::size_t i = 0; i < n; ++i) {
      v[i] = 1.0 * v[i] + hdt * a0[i] + hdt * a1[i];
      a0[i] = a1[i];
    }
  };
  for (std::size_t j = 0; j < steps; ++j) {
    const std::size_t k = k0 + j * stride;
    drift(x, vx, ax), drift(y, vy, ay), drift(z, vz, az);
    force(t0 + double(k) * dt + D);
    kick(vx, ax, bx), kick(vy, ay, by), kick(vz, az, bz);
  }
}

void advance_batch_symplectic(const Model& m, PhaseSpace& p, std::size_t first, std::size_t n,
                              double t0, double dt, std::size_t k0, std::size_t steps,
                              Method method) {
  const bool extended = method == Method::symplectic4;
  thread_local Vec q, v;
  q.resize(3 * n + (extended ? 1 : 0));
  v.resize(q.size());
  gather(p, first, n, q, v);
  const BatchForce f{&m, n};
  // Each step starts at t0 + k dt computed afresh, so a run resumed at a segment boundary
  // repeats the same arithmetic as one that never stopped.
  if (method == Method::leapfrog) {
    thread_local Verlet st;
    st.reset(); // no acceleration carried over from another batch
    const VerletSystem sys{f};
    for (std::size_t k = k0; k < k0 + steps; ++k)
      st.do_step(sys, std::make_pair(std::ref(q), std::ref(v)), t0 + double(k) * dt, dt);
  } else {
    thread_local McLachlan st;
    const ExtendedSystem sys{f};
    v[3 * n] = 1.0;
    for (std::size_t k = k0; k < k0 + steps; ++k) {
      const double t = t0 + double(k) * dt;
      q[3 * n] = t;
      st.do_step(sys, std::make_pair(std::ref(q), std::ref(v)), t, dt);
    }
  }
  scatter(p, first, n, q, v);
}

using State6 = std::array<double, 6>;

// GCC 12 reports a false -Wmaybe-uninitialized inside odeint's copy of the Fehlberg stepper's
// scratch arrays (they are written before they are read); silenced for this function only.
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"

// One orbit with an adaptive stepper, in the inertial frame or in the frame rotating at w.
void advance_orbit_adaptive(const Model& m, PhaseSpace& p, std::size_t i, double t0, double t1,
                            const IntegrationSettings& s) {
  const bool rotating = s.rotating_frame_speed.has_value();
  const RotatingFrame frame{rotating ? *s.rotating_frame_speed : 0.0};
  PhaseSpace one;
  one.assign_range(p, i, 1);
  if (rotating) frame.to_rotating(one, t0 * kMyr);
  State6 st{one.x[0], one.y[0], one.z[0], one.vx[0], one.vy[0], one.vz[0]};
  const double w = frame.pattern_speed;
  const auto rhs = [&](const State6& y, State6& d, double t) {
    double x = y[0], yy = y[1], c = 1, sn = 0;
    if (rotating) { // inertial position of the rotating-frame point
      c = std::cos(w * t), sn = std::sin(w * t);
      x = c * y[0] + sn * y[1];
      yy = -sn * y[0] + c * y[1];
    }
    auto a = m.acceleration({x, yy, y[2]}, t * kMyr);
    if (rotating) {
      const double ax = c * a[0] - sn * a[1], ay = sn * a[0] + c * a[1];
      a[0] = ax - 2 * w * y[4] + w * w * y[0]; // Coriolis and centrifugal terms
      a[1] = ay + 2 * w * y[3] + w * w * y[1];
    }
    d = {y[3], y[4], y[5], a[0], a[1], a[2]};
  };
  const double dt0 = std::copysign(s.step_myr / kMyr, t1 - t0);
  switch (s.method) {
  case Method::dopri5:
    ode::integrate_adaptive(
        ode::make_controlled(s.tolerance, s.tolerance, ode::runge_kutta_dopri5<State6>()), rhs, st,
        t0, t1, dt0);
    break;
  case Method::rk78:
    ode::integrate_adaptive(
        ode::make_controlled(s.tolerance, s.tolerance, ode::runge_kutta_fehlberg78<State6>()), rhs,
        st, t0, t1, dt0);
    break;
  case Method::bulirsch_stoer: {
    ode::bulirsch_stoer<State6> bs(s.tolerance, s.tolerance);
    ode::integrate_adaptive(bs, rhs, st, t0, t1, dt0);
    break;
  }
  default:
    throw std::logic_error("not an adaptive method");
  }
  one.x[0] = st[0], one.y[0] = st[1], one.z[0] = st[2];
  one.vx[0] = st[3], one.vy[0] = st[4], one.vz[0] = st[5];
  if (rotating) frame.to_inertial(one, t1 * kMyr);
  p.store_range(one, i);
}
#pragma GCC diagnostic pop

} // namespace

std::size_t steps_for(double t0, double t1, double step) {
  if (!(step > 0) || !std::isfinite(step))
    throw InputError("integration step must be positive, got " + std::to_string(step));
  const double n = std::ceil(std::fabs(t1 - t0) / step * (1 - 1e-12));
  if (n > 1e12) throw InputError("integration needs more than 1e12 steps; use a larger step");
  return std::size_t(std::max(n, t1 == t0 ? 0.0 : 1.0));
}

bool advance(const Model& m, PhaseSpace& p, double t0_myr, double t1_myr,
             const IntegrationSettings& s, const ProgressFn& progress,
             const std::atomic<bool>* stop) {
  const std::size_t N = p.size();
  if (N == 0 || t0_myr == t1_myr) return true;
  std::mutex progress_mutex;
  std::size_t done = 0;
  const auto report = [&](std::size_t n) {
    if (!progress) return;
    std::lock_guard<std::mutex> lock(progress_mutex);
    done += n;
    progress(done);
  };
  bool stopped = false;
  if (is_symplectic(s.method)) {
    if (s.batch == 0) throw InputError("batch size must be positive");
    const std::size_t steps = steps_for(t0_myr, t1_myr, s.step_myr);
    const double dt = (t1_myr - t0_myr) / double(steps) / kMyr, t0 = t0_myr / kMyr;
    const long nb = long((N + s.batch - 1) / s.batch);
#pragma omp parallel for schedule(dynamic, 1) reduction(|| : stopped)
    for (long b = 0; b < nb; ++b) {
      if (stop && stop->load()) {
        stopped = true;
        continue;
      }
      const std::size_t first = std::size_t(b) * s.batch, n = std::min(s.batch, N - first);
      advance_batch_symplectic(m, p, first, n, t0, dt, 0, steps, s.method);
      report(n);
    }
  } else {
    const double t0 = t0_myr / kMyr, t1 = t1_myr / kMyr;
    const long chunk = 64;
    const long nc = long((N + chunk - 1) / chunk);
#pragma omp parallel for schedule(dynamic, 1) reduction(|| : stopped)
    for (long c = 0; c < nc; ++c) {
      if (stop && stop->load()) {
        stopped = true;
        continue;
      }
      const std::size_t first = std::size_t(c) * chunk, n = std::min<std::size_t>(chunk, N - first);
      for (std::size_t i = first; i < first + n; ++i)
        advance_orbit_adaptive(m, p, i, t0, t1, s);
      report(n);
    }
  }
  return !stopped;
}

void CarriedAccelerations::forget(std::size_t n) {
  for (auto* a : {&ax, &ay, &az})
    a->assign(n, NAN);
}

namespace {
// The tracers [begin, end) in batches of s.batch, over OpenMP threads; false when stopped.
template <class Batch>
bool over_batches(std::size_t begin, std::size_t end, std::size_t batch,
                  const std::atomic<bool>* stop, const Batch& advance_batch) {
  if (batch == 0) throw InputError("batch size must be positive");
  const long nb = long((end - begin + batch - 1) / batch);
  bool stopped = false;
#pragma omp parallel for schedule(dynamic, 1) reduction(|| : stopped)
  for (long b = 0; b < nb; ++b) {
    if (stop && stop->load()) {
      stopped = true;
      continue;
    }
    const std::size_t i0 = begin + std::size_t(b) * batch;
    advance_batch(i0, std::min(batch, end - i0));
  }
  return !stopped;
}
} // namespace

bool advance_steps(const Model& m, PhaseSpace& p, double t0_myr, double t1_myr, std::size_t first,
                   std::size_t count, const IntegrationSettings& s, const std::atomic<bool>* stop,
                   CarriedAccelerations* carried) {
  if (s.method == Method::leapfrog && carried)
    return advance_steps_strided(m, p, t0_myr, t1_myr, first, count, 1, 0, p.size(), s, *carried,
                                 stop);
  if (!is_symplectic(s.method))
    throw InputError("advance_steps needs a fixed-step method, not " + method_name(s.method));
  const std::size_t N = p.size();
  if (N == 0 || t0_myr == t1_myr || count == 0) return true;
  const std::size_t steps = steps_for(t0_myr, t1_myr, s.step_myr);
  if (first + count > steps) throw InputError("advance_steps: steps beyond the segment");
  const double dt = (t1_myr - t0_myr) / double(steps) / kMyr, t0 = t0_myr / kMyr;
  return over_batches(0, N, s.batch, stop, [&](std::size_t i0, std::size_t n) {
    advance_batch_symplectic(m, p, i0, n, t0, dt, first, count, s.method);
  });
}

bool advance_steps_strided(const Model& m, PhaseSpace& p, double t0_myr, double t1_myr,
                           std::size_t first, std::size_t count, std::size_t stride,
                           std::size_t begin, std::size_t end, const IntegrationSettings& s,
                           CarriedAccelerations& carried, const std::atomic<bool>* stop) {
  if (s.method != Method::leapfrog)
    throw InputError("carried accelerations need the leapfrog, not " + method_name(s.method));
  if (begin > end || end > p.size()) throw InputError("advance_steps: tracers beyond the state");
  if (stride == 0) throw InputError("advance_steps: a step must span at least one step");
  if (begin == end || t0_myr == t1_myr || count == 0) return true;
  const std::size_t steps = steps_for(t0_myr, t1_myr, s.step_myr);
  if (first + count * stride > steps) throw InputError("advance_steps: steps beyond the segment");
  const double dt = (t1_myr - t0_myr) / double(steps) / kMyr, t0 = t0_myr / kMyr;
  if (carried.ax.size() != p.size()) carried.forget(p.size());
  return over_batches(begin, end, s.batch, stop, [&](std::size_t i0, std::size_t n) {
    advance_batch_carried(m, p, i0, n, t0, dt, first, count, stride, carried);
  });
}

} // namespace undertow::orbit

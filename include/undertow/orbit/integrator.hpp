#pragma once
// Advances an ensemble of tracers through a galaxy model. Fixed-step symplectic methods
// advance batches of tracers as one structure-of-arrays state (one odeint state per batch);
// adaptive methods advance one orbit at a time. Batches run in parallel with OpenMP, and every
// tracer goes through the same arithmetic whatever its batch or thread: results are
// bit-identical for any thread count and batch size.
#include <atomic>
#include <cstddef>
#include <functional>
#include <optional>
#include <vector>

#include "undertow/orbit/method.hpp"
#include "undertow/orbit/phase_space.hpp"
#include "undertow/potential/model.hpp"

namespace undertow::orbit {

struct IntegrationSettings {
  Method method = Method::leapfrog;
  double step_myr = 0.1;    // fixed-step methods: the largest step; segments are split evenly
  double tolerance = 1e-10; // adaptive methods: relative and absolute error per step
  std::size_t batch = 4096; // tracers per batch (symplectic methods)
  // Adaptive methods only: integrate the equations of motion in the frame rotating at this
  // pattern speed (km/s/kpc) instead of the inertial frame. Fixed-step symplectic methods always
  // integrate in the inertial frame (the rotating-frame equations are not separable); the
  // snapshot writer can still express their output in the rotating frame.
  std::optional<double> rotating_frame_speed;
};

// Called after each finished batch or orbit with the number of tracers done so far.
using ProgressFn = std::function<void(std::size_t done)>;

// Advances p (inertial Galactocentric coordinates) from t0 to t1 (Myr; t1 < t0 integrates
// backward). Stops early, returning false, when *stop becomes true between batches.
bool advance(const potential::Model& m, PhaseSpace& p, double t0_myr, double t1_myr,
             const IntegrationSettings& s, const ProgressFn& progress = {},
             const std::atomic<bool>* stop = nullptr);

// Fixed-step methods only: the steps [first, first + count) of the steps_for(t0, t1) steps that
// advance() takes from t0 to t1, with the same arithmetic, so that a segment advanced a few
// steps at a time (with the gas's collisions in between) gives the bits of one advance() where
// nothing happens in between and the model does not change with time.
//
// With `carried` (leapfrog only), the acceleration at each tracer's position is kept from the
// end of one call to the start of the next, so that a step costs one force evaluation, not two,
// and the steps give the bits of one advance() even when the model changes with time. Entries
// that are NaN (new tracers; all of them after forget()) are computed afresh at the first
// step's start; velocities may change between calls, positions must not.
struct CarriedAccelerations {
  std::vector<double> ax, ay, az; // km/s per internal time unit, per tracer
  void forget(std::size_t n);     // n tracers, none known
};
bool advance_steps(const potential::Model& m, PhaseSpace& p, double t0_myr, double t1_myr,
                   std::size_t first, std::size_t count, const IntegrationSettings& s,
                   const std::atomic<bool>* stop = nullptr,
                   CarriedAccelerations* carried = nullptr);

// The leapfrog with carried accelerations for the tracers [begin, end) only, each of `count`
// steps spanning `stride` of the segment's steps (steps first, first + stride, ...): collisionless
// tracers that can take longer steps than the others (a run's stars beside its gas). With
// stride 1 and all tracers, the bits of advance_steps.
bool advance_steps_strided(const potential::Model& m, PhaseSpace& p, double t0_myr, double t1_myr,
                           std::size_t first, std::size_t count, std::size_t stride,
                           std::size_t begin, std::size_t end, const IntegrationSettings& s,
                           CarriedAccelerations& carried, const std::atomic<bool>* stop = nullptr);

// Number of fixed steps used for a segment, and their length.
std::size_t steps_for(double t0_myr, double t1_myr, double step_myr);

} // namespace undertow::orbit

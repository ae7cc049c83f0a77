#pragma once
// Dissipative gas response by sticky clouds (after Levinson & Roberts 1981, ApJ 245, 465, and
// Schwarz 1981, ApJ 247, 77): the tracers are gas clouds that move ballistically in the model
// and, every collision interval, collide inelastically with the clouds sharing their cell.
// Our collision rule: within a cell, each cloud's velocity relative to the local circular flow
// keeps a fraction e (the coefficient of restitution) of its difference from the cell's mean,
// so the cell's momentum is kept exactly and its random kinetic energy drops by 1 - e^2. For two
// clouds this is the textbook inelastic collision with restitution e applied to the whole
// relative velocity. Where streams converge (a spiral arm) their relative motion is destroyed:
// the gas shocks, and the post-shock clouds are where young stars form.
//
// The pass is deterministic and independent of the thread count: sums run over the clouds in
// id order, the update of each cloud depends only on its cell's sums.
#include <cstddef>
#include <vector>

#include "undertow/orbit/phase_space.hpp"
#include "undertow/potential/model.hpp"

namespace undertow::gas {

struct StickyClouds {
  double cell_kpc = 0.2;     // side of the cubic collision cells
  double interval_myr = 1.0; // time between collision passes
  double restitution = 0.3;  // e, from 0 (perfectly sticky) to 1 (elastic: no dissipation)
  double extent_kpc = 20;    // clouds beyond |x|, |y| of this, or |z| of 4 cells, never collide

  void validate() const; // throws detail::ParameterError naming the key
};

// The local circular flow: v_c(R) of the model's axisymmetric part, tabulated, in the sense of
// Galactic rotation (clockwise seen from the north Galactic pole). Deviations from it are what
// collisions damp, so a cold disk on circular orbits is left exactly as it is.
class CircularFlow {
public:
  CircularFlow() = default; // no flow: collisions damp velocities about the cell mean itself
  CircularFlow(const potential::Model& m, double r_max_kpc, double dr_kpc = 0.01);
  // (vx, vy) of the circular flow at (x, y), km/s
  void at(double x, double y, double& vx, double& vy) const;

private:
  std::vector<double> vc_; // at R = k * dr
  double dr_ = 0;
};

struct PassSummary {
  std::size_t cells = 0;  // cells holding two or more clouds
  std::size_t clouds = 0; // clouds in those cells
  double energy_lost = 0; // (km/s)^2 per unit cloud mass, summed over clouds
};

// One collision pass over p (positions kpc, velocities km/s, inertial frame).
PassSummary collide(orbit::PhaseSpace& p, const CircularFlow& flow, const StickyClouds& s);

} // namespace undertow::gas

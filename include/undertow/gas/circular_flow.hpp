#pragma once
// The local circular flow: v_c(R) of a model's axisymmetric part, tabulated, in the sense of
// Galactic rotation (clockwise seen from the north Galactic pole). The collision search uses it
// as a reference velocity field of known Lipschitz constant: clouds that move with it are
// neighbours for a whole step, so only their speed relative to it sets the search radius.
#include <cstddef>
#include <cstdint>
#include <vector>

#include "undertow/potential/model.hpp"

namespace undertow::gas {

class CircularFlow {
public:
  CircularFlow() = default; // no flow: the field is zero everywhere
  CircularFlow(const potential::Model& m, double r_max_kpc, double dr_kpc = 0.01);
  // From a table: v_c (km/s) at R = k dr_kpc, k = 0, 1, ...
  CircularFlow(std::vector<double> vc_kms, double dr_kpc);

  // (vx, vy) of the flow at the n points (x, y), km/s, and each point's entry of a
  // lipschitz_within table; linear in R between table points, the last value beyond the table
  // (so the field is continuous everywhere). Vectorised; points that are not finite get
  // values that mean nothing.
  void at(const double* x, const double* y, std::size_t n, double* vx, double* vy,
          std::uint32_t* bin) const;
  // The same flow with v_c(R) capped at k_max R, so that its Lipschitz constant is at most
  // about k_max even where a cusped bulge makes v_c / R unbounded.
  CircularFlow capped(double k_max_kms_kpc) const;
  // The field's Lipschitz bound near each radius: max of max(|dv_c/dR|, v_c / R) (the singular
  // values of the field's Jacobian) over the points within `reach` kpc, so that
  // |V(a) - V(b)| <= K |a - b| (km/s per kpc) for any a, b within reach of that radius. Entry k
  // holds it for every R in [k dr, (k + 1) dr), the last entry for every R beyond. Where clouds
  // orbit, far from a cusped centre, it is many times smaller than near the centre.
  std::vector<double> lipschitz_within(double reach_kpc) const;

private:
  std::vector<double> vc_; // at R = k * dr
  double dr_ = 0;
};

} // namespace undertow::gas

#pragma once
// Kinematic distances: where along a source's line of sight the rotation curve and the Sun's
// motion predict the measured v_LSR for a source on a circular orbit plus the fitted mean
// peculiar motion (common practice; Reid et al. 2009, ApJ 700, 137 include the mean motion, from
// memory). Inside the
// solar circle a line of sight meets each radius twice, so there are two (near and far) distances;
// a velocity beyond the terminal velocity has none, and the tangent point is the usual stand-in.
// Peculiar motions of a few km/s to a few tens of km/s move kinematic distances by up to a factor
// of two (common practice), which is why parallaxes matter.
#include "undertow/fit/kinematic_model.hpp"

namespace undertow::fit {

struct KinematicDistance {
  double near_kpc = NAN, far_kpc = NAN; // equal when only one distance fits
  double tangent_kpc = NAN;             // the extreme of v_LSR(d) inside the range, if any
  // No distance fits: inside the solar circle the velocity is beyond the terminal velocity (near
  // = far = the tangent point); outside it, a velocity of the wrong sign (near = far = NaN).
  bool beyond_terminal = false;
};

// ra, dec in deg, v_LSR in km/s; distances searched in (0, d_max_kpc].
KinematicDistance kinematic_distance(double ra_deg, double dec_deg, double vlsr_kms,
                                     const KinematicModel& m, const FullParams& p,
                                     double d_max_kpc = 25);

// The predicted v_LSR of a source at distance d moving with the rotation curve plus the mean
// peculiar motion of p (km/s).
double circular_vlsr(double ra_deg, double dec_deg, double d_kpc, const KinematicModel& m,
                     const FullParams& p);

} // namespace undertow::fit

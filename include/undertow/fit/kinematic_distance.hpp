#pragma once
// Kinematic distances: where along a source's line of sight the rotation curve and the Sun's
// motion predict the measured v_LSR for a source on a circular orbit (common practice). Inside the
// solar circle a line of sight meets each radius twice, so there are two (near and far) distances;
// a velocity beyond the terminal velocity has none, and the tangent point is the usual stand-in.
// Peculiar motions of a few km/s to a few tens of km/s move kinematic distances by up to a factor
// of two (common practice), which is why parallaxes matter.
#include "undertow/fit/kinematic_model.hpp"

namespace undertow::fit {

struct KinematicDistance {
  double near_kpc = NAN, far_kpc = NAN; // equal when only one distance fits
  double tangent_kpc = NAN;             // the extreme of v_LSR(d) inside the range, if any
  bool beyond_terminal = false;         // no distance fits; near = far = tangent point
};

// ra, dec in deg, v_LSR in km/s; distances searched in (0, d_max_kpc].
KinematicDistance kinematic_distance(double ra_deg, double dec_deg, double vlsr_kms,
                                     const KinematicModel& m, const FullParams& p,
                                     double d_max_kpc = 25);

// The predicted v_LSR of a source on a circular orbit at distance d (km/s).
double circular_vlsr(double ra_deg, double dec_deg, double d_kpc, const KinematicModel& m,
                     const FullParams& p);

} // namespace undertow::fit

#pragma once
// Heliocentric observables <-> Galactocentric phase space (docs/conventions.md): the Sun at
// distance R0 from the centre and height z_sun above the plane, the frame tilted about y so the
// centre stays at the origin (the convention of astropy's Galactocentric frame), circular speed
// Theta0 at the Sun and the solar motion (U, V, W) relative to the local circular orbit.
#include "undertow/sky/galactic.hpp"

namespace undertow::sky {

// k: km/s for 1 mas/yr at 1 kpc (common practice: 1 au/yr in km/s).
inline constexpr double kKappa = 4.740470463533348;

struct SolarFrame {
  double r0_kpc = 8.1;
  double z_sun_kpc = 0.0;
  double theta0_kms = 230.0;
  double u_sun_kms = 11.1, v_sun_kms = 12.24, w_sun_kms = 7.25; // Schoenrich et al. 2010

  void validate() const; // throws InputError naming the parameter
};

// What a survey measures of a source (angles in deg, parallax mas, proper motions mas/yr,
// heliocentric radial velocity km/s); the distance is given separately (kpc).
struct Observed {
  double ra_deg = 0, dec_deg = 0;
  double pmra_masyr = 0, pmdec_masyr = 0; // mu_alpha* = mu_alpha cos(dec)
  double vhelio_kms = 0;
};

struct Galactocentric {
  Vec3 r{}; // kpc
  Vec3 v{}; // km/s
};

Galactocentric to_galactocentric(const Observed& o, double distance_kpc, const SolarFrame& f);
// The inverse; returns the distance in kpc.
double from_galactocentric(const Galactocentric& g, const SolarFrame& f, Observed& o);

// Position of the Sun and its velocity in the Galactocentric frame.
Galactocentric sun(const SolarFrame& f);

} // namespace undertow::sky

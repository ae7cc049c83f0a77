#pragma once
// Units at every interface: kpc, km/s, Myr, Msun, deg, mas, mas/yr.
// Potentials are in (km/s)^2, accelerations in (km/s)^2/kpc, densities in Msun/kpc^3.
// The only conversions of the code base live here.

#include <numbers>

namespace undertow::units {

// Gravitational constant in kpc (km/s)^2 / Msun (common practice: CODATA G with the
// IAU 2015 nominal solar mass parameter GM_sun = 1.3271244e20 m^3/s^2).
inline constexpr double G = 4.300917e-6;

inline constexpr double pi = std::numbers::pi;
inline constexpr double deg = pi / 180.0; // radians per degree

// One kpc/(km/s) expressed in Myr: kpc = 3.0856775814913673e16 km (IAU 2012 au and
// the parsec definition), Myr = 3.15576e13 s (Julian years).
inline constexpr double kpc_km = 3.0856775814913673e16;
inline constexpr double myr_s = 3.15576e13;
inline constexpr double time_unit_myr = kpc_km / myr_s; // ≈ 977.79 Myr

// A pattern speed in km/s/kpc times a time in Myr gives an angle in radians via this factor.
inline constexpr double kms_per_kpc_times_myr = 1.0 / time_unit_myr;

inline constexpr double myr_to_internal(double t_myr) {
  return t_myr / time_unit_myr;
}
inline constexpr double internal_to_myr(double t) {
  return t * time_unit_myr;
}

// 1 Msun/pc^3 in Msun/kpc^3.
inline constexpr double msun_pc3 = 1e9;

} // namespace undertow::units

#pragma once
// ICRS <-> Galactic coordinates by the Hipparcos definition (ESA 1997, The Hipparcos and Tycho
// Catalogues, vol. 1, §1.5.3): north Galactic pole at RA 192.85948 deg, Dec +27.12825 deg, and
// the north celestial pole at Galactic longitude 122.93192 deg. Angles in radians here; the
// public catalog interfaces use degrees.
#include <array>

namespace undertow::sky {

using Vec3 = std::array<double, 3>;
using Mat3 = std::array<Vec3, 3>;

// Rows are the Galactic x (l = 0, b = 0), y (l = 90 deg) and z (b = 90 deg) axes in ICRS.
const Mat3& icrs_to_galactic_matrix();

Vec3 unit_vector(double lon, double lat);
// The unit vector toward ICRS (ra, dec), given in degrees, in heliocentric Galactic axes.
Vec3 galactic_direction(double ra_deg, double dec_deg);
void to_angles(const Vec3& v, double& lon, double& lat); // lon in [0, 2 pi)

void icrs_to_galactic(double ra, double dec, double& l, double& b);
void galactic_to_icrs(double l, double b, double& ra, double& dec);

// Proper motions: mu_alpha* = mu_alpha cos(dec) and mu_delta to mu_l* = mu_l cos(b) and mu_b,
// any unit (the rotation of the tangent plane is unitless).
void icrs_to_galactic_pm(double ra, double dec, double pmra_star, double pmdec, double& pml_star,
                         double& pmb);
void galactic_to_icrs_pm(double l, double b, double pml_star, double pmb, double& pmra_star,
                         double& pmdec);

// Both at once, when the position is converted anyway.
void icrs_to_galactic_with_pm(double ra, double dec, double pmra_star, double pmdec, double& l,
                              double& b, double& pml_star, double& pmb);
void galactic_to_icrs_with_pm(double l, double b, double pml_star, double pmb, double& ra,
                              double& dec, double& pmra_star, double& pmdec);

// Unit vectors toward increasing longitude (east) and latitude (north) at (lon, lat).
void tangent_basis(double lon, double lat, Vec3& east, Vec3& north);
double dot(const Vec3& a, const Vec3& b);

Vec3 mul(const Mat3& m, const Vec3& v);
Vec3 mul_transposed(const Mat3& m, const Vec3& v);

} // namespace undertow::sky

#include "undertow/sky/galactic.hpp"

#include <cmath>

#include "undertow/units.hpp"

namespace undertow::sky {
namespace {

Vec3 cross(const Vec3& a, const Vec3& b) {
  return {a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]};
}

// Built from the three defining angles: z is the pole; the celestial pole's component
// perpendicular to it points to Galactic longitude l_NCP in the Galactic plane.
Mat3 build() {
  const double ag = 192.85948 * units::deg, dg = 27.12825 * units::deg, ln = 122.93192 * units::deg;
  const Vec3 z = unit_vector(ag, dg);
  const Vec3 u{-std::sin(dg) * z[0] / std::cos(dg), -std::sin(dg) * z[1] / std::cos(dg),
               (1 - std::sin(dg) * z[2]) / std::cos(dg)};
  const Vec3 w = cross(z, u); // longitude l_NCP + 90 deg
  Vec3 x, y;
  for (int k = 0; k < 3; ++k) {
    x[k] = std::cos(ln) * u[k] - std::sin(ln) * w[k];
    y[k] = std::sin(ln) * u[k] + std::cos(ln) * w[k];
  }
  return {x, y, z};
}

} // namespace

const Mat3& icrs_to_galactic_matrix() {
  static const Mat3 m = build();
  return m;
}

Vec3 unit_vector(double lon, double lat) {
  return {std::cos(lat) * std::cos(lon), std::cos(lat) * std::sin(lon), std::sin(lat)};
}

void to_angles(const Vec3& v, double& lon, double& lat) {
  lon = std::atan2(v[1], v[0]);
  if (lon < 0) lon += 2 * units::pi;
  lat = std::atan2(v[2], std::hypot(v[0], v[1]));
}

Vec3 mul(const Mat3& m, const Vec3& v) {
  return {m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
          m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
          m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2]};
}

Vec3 mul_transposed(const Mat3& m, const Vec3& v) {
  return {m[0][0] * v[0] + m[1][0] * v[1] + m[2][0] * v[2],
          m[0][1] * v[0] + m[1][1] * v[1] + m[2][1] * v[2],
          m[0][2] * v[0] + m[1][2] * v[1] + m[2][2] * v[2]};
}

void icrs_to_galactic(double ra, double dec, double& l, double& b) {
  to_angles(mul(icrs_to_galactic_matrix(), unit_vector(ra, dec)), l, b);
}

void galactic_to_icrs(double l, double b, double& ra, double& dec) {
  to_angles(mul_transposed(icrs_to_galactic_matrix(), unit_vector(l, b)), ra, dec);
}

void tangent_basis(double lon, double lat, Vec3& e, Vec3& n) {
  e = {-std::sin(lon), std::cos(lon), 0};
  n = {-std::sin(lat) * std::cos(lon), -std::sin(lat) * std::sin(lon), std::cos(lat)};
}

double dot(const Vec3& a, const Vec3& b) {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

void icrs_to_galactic_with_pm(double ra, double dec, double pa, double pd, double& l, double& b,
                              double& pl, double& pb) {
  Vec3 e, n;
  tangent_basis(ra, dec, e, n);
  const Vec3 t{pa * e[0] + pd * n[0], pa * e[1] + pd * n[1], pa * e[2] + pd * n[2]};
  const Vec3 tg = mul(icrs_to_galactic_matrix(), t);
  icrs_to_galactic(ra, dec, l, b);
  Vec3 eg, ng;
  tangent_basis(l, b, eg, ng);
  pl = dot(tg, eg);
  pb = dot(tg, ng);
}

void galactic_to_icrs_with_pm(double l, double b, double pl, double pb, double& ra, double& dec,
                              double& pa, double& pd) {
  Vec3 e, n;
  tangent_basis(l, b, e, n);
  const Vec3 t{pl * e[0] + pb * n[0], pl * e[1] + pb * n[1], pl * e[2] + pb * n[2]};
  const Vec3 ti = mul_transposed(icrs_to_galactic_matrix(), t);
  galactic_to_icrs(l, b, ra, dec);
  Vec3 ei, ni;
  tangent_basis(ra, dec, ei, ni);
  pa = dot(ti, ei);
  pd = dot(ti, ni);
}

void icrs_to_galactic_pm(double ra, double dec, double pa, double pd, double& pl, double& pb) {
  double l, b;
  icrs_to_galactic_with_pm(ra, dec, pa, pd, l, b, pl, pb);
}

void galactic_to_icrs_pm(double l, double b, double pl, double pb, double& pa, double& pd) {
  double ra, dec;
  galactic_to_icrs_with_pm(l, b, pl, pb, ra, dec, pa, pd);
}

Vec3 galactic_direction(double ra_deg, double dec_deg) {
  return mul(icrs_to_galactic_matrix(), unit_vector(ra_deg * units::deg, dec_deg * units::deg));
}

} // namespace undertow::sky

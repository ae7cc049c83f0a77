#include "undertow/plot/colours.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

namespace undertow::plot {
namespace {

// D65 reference white (CIE 15:2004) and linear sRGB -> XYZ from the sRGB primaries and that
// white (IEC 61966-2-1:1999; the matrix to 7 digits, whose rows sum to the white point). The
// inverse is computed, so that the two directions undo each other to round-off.
constexpr double kXn = 0.95047, kYn = 1.0, kZn = 1.08883;
using M3 = std::array<std::array<double, 3>, 3>;
constexpr M3 kToXyz{{{0.4124564, 0.3575761, 0.1804375},
                     {0.2126729, 0.7151522, 0.0721750},
                     {0.0193339, 0.1191920, 0.9503041}}};
const M3& to_rgb() {
  static const M3 inv = [] {
    const auto& a = kToXyz;
    M3 c{};
    for (int i = 0; i < 3; ++i)
      for (int j = 0; j < 3; ++j) // cofactor of a[j][i], for the transpose
        c[i][j] = a[(j + 1) % 3][(i + 1) % 3] * a[(j + 2) % 3][(i + 2) % 3] -
                  a[(j + 1) % 3][(i + 2) % 3] * a[(j + 2) % 3][(i + 1) % 3];
    const double det = a[0][0] * c[0][0] + a[0][1] * c[1][0] + a[0][2] * c[2][0];
    for (auto& row : c)
      for (double& v : row)
        v /= det;
    return c;
  }();
  return inv;
}

double to_linear(double c) {
  return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);
}
double from_linear(double c) {
  return c <= 0.0031308 ? 12.92 * c : 1.055 * std::pow(c, 1 / 2.4) - 0.055;
}
// CIE 1976: f(t) = t^(1/3) above (6/29)^3, else the linear segment; and its inverse.
constexpr double kDelta = 6.0 / 29.0;
double f(double t) {
  return t > kDelta * kDelta * kDelta ? std::cbrt(t) : t / (3 * kDelta * kDelta) + 4.0 / 29.0;
}
double f_inv(double t) {
  return t > kDelta ? t * t * t : 3 * kDelta * kDelta * (t - 4.0 / 29.0);
}

} // namespace

std::array<int, 3> Rgb::bytes() const {
  const auto q = [](double c) { return int(std::lround(std::clamp(c, 0.0, 1.0) * 255)); };
  return {q(r), q(g), q(b)};
}

Rgb lab_to_srgb(const Lab& c) {
  const double fy = (c.L + 16) / 116, fx = fy + c.a / 500, fz = fy - c.b / 200;
  const double X = kXn * f_inv(fx), Y = kYn * f_inv(fy), Z = kZn * f_inv(fz);
  const auto& M = to_rgb();
  const double r = M[0][0] * X + M[0][1] * Y + M[0][2] * Z;
  const double g = M[1][0] * X + M[1][1] * Y + M[1][2] * Z;
  const double b = M[2][0] * X + M[2][1] * Y + M[2][2] * Z;
  const auto out = [](double v) {
    return std::clamp(from_linear(std::clamp(v, 0.0, 1.0)), 0.0, 1.0);
  };
  return {out(r), out(g), out(b)};
}

Lab srgb_to_lab(const Rgb& c) {
  const double r = to_linear(c.r), g = to_linear(c.g), b = to_linear(c.b);
  const double X = kToXyz[0][0] * r + kToXyz[0][1] * g + kToXyz[0][2] * b;
  const double Y = kToXyz[1][0] * r + kToXyz[1][1] * g + kToXyz[1][2] * b;
  const double Z = kToXyz[2][0] * r + kToXyz[2][1] * g + kToXyz[2][2] * b;
  const double fx = f(X / kXn), fy = f(Y / kYn), fz = f(Z / kZn);
  return {116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)};
}

Rgb sequential(double t) {
  t = std::clamp(t, 0.0, 1.0);
  // Lightness linear in t; hue from 265 deg (blue) down through 190 (teal) to 85 (sand); chroma
  // lower at the dark and light ends, where sRGB has little room, so no point leaves the gamut.
  const double L = 18 + 76 * t;
  const double hue = (265 - 180 * t) * std::numbers::pi / 180;
  const double chroma = 24 * std::sin(std::numbers::pi * (0.1 + 0.8 * t)) + 4;
  return lab_to_srgb({L, chroma * std::cos(hue), chroma * std::sin(hue)});
}

Rgb series(Series s) {
  // Okabe & Ito (2008): blue, vermillion, bluish green, orange, reddish purple, sky blue, yellow.
  const auto c = [](int r, int g, int b) { return Rgb{r / 255.0, g / 255.0, b / 255.0}; };
  switch (s) {
  case Series::ink:
    return kInk;
  case Series::measured:
    return c(213, 94, 0); // vermillion
  case Series::simulated:
    return c(0, 114, 178); // blue
  case Series::model:
    return c(0, 158, 115); // bluish green
  case Series::accent:
    return c(204, 121, 167); // reddish purple
  case Series::fit:
    return c(230, 159, 0); // orange
  case Series::band:
    return c(86, 180, 233); // sky blue
  case Series::mute:
    return Rgb{0.55, 0.56, 0.58};
  }
  return kInk;
}

} // namespace undertow::plot

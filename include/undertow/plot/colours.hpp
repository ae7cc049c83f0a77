#pragma once
// Colours of undertow's figures, defined here and nowhere else.
//
// - `sequential(t)`, t in [0, 1]: the sequential map for images (densities, likelihood maps). It is
//   built in CIE 1976 L*a*b* (CIE 15:2004) with a lightness L* rising linearly from 18 to 94,
//   following Kovesi (2015, "Good colour maps: how to design them", arXiv:1509.03700): equal
//   steps in t are near-equal perceived steps, and because lightness alone orders the map it reads
//   the same in greyscale and to readers with any form of colour blindness. Its hue turns from
//   deep blue through teal to a pale sand, along the blue-yellow axis that protanopes and
//   deuteranopes keep. Converted to sRGB by IEC 61966-2-1:1999 (D65 white).
// - `series(k)`: colours for points and lines, the eight of Okabe & Ito (2008, "Color Universal
//   Design"), chosen to stay distinct to colour-blind readers, in an order of our own.
#include <array>
#include <string>

namespace undertow::plot {

struct Rgb {
  double r = 0, g = 0, b = 0; // sRGB, each in [0, 1]
  std::array<int, 3> bytes() const;
};

struct Lab {
  double L = 0, a = 0, b = 0;
};

// IEC 61966-2-1 sRGB <-> CIE L*a*b* with the D65 white; out-of-gamut colours are clipped.
Rgb lab_to_srgb(const Lab& c);
Lab srgb_to_lab(const Rgb& c);

Rgb sequential(double t); // t clamped to [0, 1]

// The series colours by role, so every figure uses them alike.
enum class Series { ink, measured, simulated, model, accent, fit, band, mute };
Rgb series(Series s);

// Text, axes and frames.
inline constexpr Rgb kInk{0.16, 0.17, 0.20};
inline constexpr Rgb kPaper{1, 1, 1};
inline constexpr Rgb kGrid{0.88, 0.89, 0.91};

} // namespace undertow::plot

#pragma once
// Marks shared by the face-on maps: the Galactic centre as a cross and the Sun as a circled dot
// at (−R0, 0) (docs/conventions.md), in ink.
#include "undertow/plot/colours.hpp"
#include "undertow/plot/figure.hpp"

namespace undertow::plot {

// half: the cross's half size, kpc. Leaves the line width at 0.6 points.
inline void centre_and_sun(Figure& fig, double r0_kpc, double half) {
  fig.colour(kInk);
  fig.line_width(0.8);
  fig.line({-half, half}, {0, 0});
  fig.line({0, 0}, {-half, half});
  fig.points({-r0_kpc}, {0}, 2.0, false);
  fig.points({-r0_kpc}, {0}, 0.5);
  fig.line_width(0.6);
}

} // namespace undertow::plot

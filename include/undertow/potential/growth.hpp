#pragma once
// Smooth growth of a pattern's amplitude, the polynomial of Dehnen (2000, AJ 119, 800, eq. 4):
// g = (3/16) xi^5 - (5/8) xi^3 + (15/16) xi + 1/2, xi = 2 (t - t_start) / t_grow - 1,
// with g = 0 before t_start and g = 1 after t_start + t_grow. g and dg/dt are continuous.
namespace undertow::potential {

struct Growth {
  double start_myr = 0;    // the pattern is absent before this time
  double duration_myr = 0; // 0: switched on at start_myr (a step)

  double factor(double t_myr) const {
    if (duration_myr <= 0) return t_myr >= start_myr ? 1.0 : 0.0;
    const double xi = 2 * (t_myr - start_myr) / duration_myr - 1;
    if (xi <= -1) return 0.0;
    if (xi >= 1) return 1.0;
    const double x2 = xi * xi;
    return ((3.0 / 16 * x2 - 5.0 / 8) * x2 + 15.0 / 16) * xi + 0.5;
  }
  double end_myr() const { return start_myr + duration_myr; }
};

} // namespace undertow::potential

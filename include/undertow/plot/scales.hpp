#pragma once
// Axis ranges from data.
#include <utility>
#include <vector>

namespace undertow::plot {

// The q-quantile (0..1) of the finite values, linear between order statistics; NaN when none.
double quantile(std::vector<double> v, double q);
// [lo, hi] covering the finite values of all lists, widened by `pad` of its width on each side;
// (-1, 1) around the value when all values are equal, (0, 1) when there are none.
std::pair<double, double> range_of(const std::vector<std::vector<double>>& lists,
                                   double pad = 0.05);

// The largest of 1, 2, 2.5 and 5 times a power of ten that is at most x (> 0).
double round_step(double x);

} // namespace undertow::plot

#pragma once
// Mean and sample standard deviation of a list of numbers, for the tests' pull checks.
#include <cmath>
#include <vector>

namespace undertow::test {

struct MeanSd {
  double mean = 0, sd = 0;
};

inline MeanSd mean_sd(const std::vector<double>& v) {
  MeanSd m;
  for (double x : v)
    m.mean += x;
  m.mean /= double(v.size());
  double var = 0;
  for (double x : v)
    var += (x - m.mean) * (x - m.mean);
  m.sd = std::sqrt(var / double(v.size() - 1));
  return m;
}

} // namespace undertow::test

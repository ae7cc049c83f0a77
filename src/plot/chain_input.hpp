#pragma once
// The kept chain of a kinematic fit (fit.h5): walkers' positions after burn-in, by parameter.
#include <string>
#include <vector>

#include "undertow/plot/inputs.hpp"

namespace undertow::plot {

struct Chain {
  std::vector<std::string> names;
  std::size_t walkers = 0, steps = 0, burn = 0;
  std::vector<double> positions; // rows = step * walkers + walker, one column per parameter
  double at(std::size_t step, std::size_t walker, std::size_t p) const {
    return positions[(step * walkers + walker) * names.size() + p];
  }
};

Chain read_chain(const H5Input& in);

} // namespace undertow::plot

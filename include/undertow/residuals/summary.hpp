#pragma once
// Summary statistics of peculiar motions with bootstrap errors (Efron 1979, Ann. Statist. 7, 1),
// overall and per group, and the residual tables written from them.
#include <array>
#include <cstdint>
#include <string>
#include <vector>

#include "undertow/io/table.hpp"
#include "undertow/residuals/peculiar.hpp"

namespace undertow::residuals {

struct Summary {
  std::string group; // "all" for the whole catalog
  std::size_t n = 0;
  std::array<double, 3> mean{}, mean_err{}, dispersion{}, dispersion_err{};
};

struct Moments {
  double mean = 0, dispersion = 0, mean_err = 0, dispersion_err = 0;
};
// Mean and dispersion (sample standard deviation) of v with bootstrap errors from `resamples`
// resamplings drawn from the stream (seed, stream).
Moments bootstrap_moments(const std::vector<double>& v, int resamples, std::uint64_t seed,
                          std::uint64_t stream);

std::vector<Summary> summarise(const ResidualResult& r, int resamples, std::uint64_t seed);

io::Table source_table(const ResidualResult& r);
io::Table summary_table(const std::vector<Summary>& s);

} // namespace undertow::residuals

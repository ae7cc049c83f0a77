#pragma once
// The two designs a sweep expands into rows of parameter values: the full grid (first parameter
// slowest, as nested loops read) and the Latin hypercube (McKay, Beckman & Conover 1979,
// Technometrics 21, 239): n points, each parameter's range cut into n equal strata, every
// stratum of every parameter used by exactly one point, a uniform draw inside it.
#include <cstdint>
#include <vector>

#include <toml++/toml.h>

#include "undertow/sweep/sweep_file.hpp"

namespace undertow::sweep {

std::vector<toml::array> grid_rows(const std::vector<Parameter>& params);

// Unit-cube points: u[i][j] in (0, 1), with floor(u[i][j] * n) a permutation of 0..n-1 over i
// for each j. Reproducible from (seed, n, dims) alone.
std::vector<std::vector<double>> latin_hypercube(std::size_t n, std::size_t dims,
                                                 std::uint64_t seed);

// The design's rows for a Latin-hypercube sweep: the unit points mapped onto each range
// (linearly, or in log(value) for scale = "log"), rounded to 10 significant digits.
std::vector<toml::array> latin_hypercube_rows(const std::vector<Parameter>& params, std::size_t n,
                                              std::uint64_t seed);

} // namespace undertow::sweep

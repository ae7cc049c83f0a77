#include "undertow/sweep/design.hpp"

#include <cmath>
#include <cstdio>
#include <numeric>

#include "undertow/tracers/random.hpp"

namespace undertow::sweep {

std::vector<toml::array> grid_rows(const std::vector<Parameter>& params) {
  std::vector<toml::array> rows{toml::array{}};
  for (const auto& p : params) {
    std::vector<toml::array> next;
    next.reserve(rows.size() * p.values.size());
    for (const auto& r : rows)
      for (const auto& v : p.values) {
        toml::array row = r;
        v.visit([&](const auto& x) { row.push_back(x); });
        next.push_back(std::move(row));
      }
    rows = std::move(next);
  }
  return rows;
}

std::vector<std::vector<double>> latin_hypercube(std::size_t n, std::size_t dims,
                                                 std::uint64_t seed) {
  std::vector<std::vector<double>> u(n, std::vector<double>(dims));
  for (std::size_t j = 0; j < dims; ++j) {
    // One stream per parameter: adding a parameter leaves the others' columns unchanged.
    tracers::TracerStream rng(seed, j, 0x4c4853);
    std::vector<std::size_t> perm(n);
    std::iota(perm.begin(), perm.end(), std::size_t(0));
    for (std::size_t i = n; i > 1; --i) // Fisher-Yates shuffle (Knuth, TAOCP vol. 2, 3.4.2)
      std::swap(perm[i - 1], perm[std::size_t(rng.uniform() * double(i)) % i]);
    for (std::size_t i = 0; i < n; ++i) {
      const double x = (double(perm[i]) + rng.uniform()) / double(n);
      // Keep the draw strictly inside its stratum, whatever the rounding.
      const double lo = double(perm[i]) / double(n), hi = double(perm[i] + 1) / double(n);
      u[i][j] = std::min(std::max(x, std::nextafter(lo, 1.0)), std::nextafter(hi, 0.0));
    }
  }
  return u;
}

std::vector<toml::array> latin_hypercube_rows(const std::vector<Parameter>& params, std::size_t n,
                                              std::uint64_t seed) {
  const auto u = latin_hypercube(n, params.size(), seed);
  std::vector<toml::array> rows(n);
  for (std::size_t i = 0; i < n; ++i)
    for (std::size_t j = 0; j < params.size(); ++j) {
      const auto& p = params[j];
      const double v = p.log_scale ? p.from * std::pow(p.to / p.from, u[i][j])
                                   : p.from + u[i][j] * (p.to - p.from);
      char b[32];
      std::snprintf(b, sizeof b, "%.10g", v);
      rows[i].push_back(std::strtod(b, nullptr));
    }
  return rows;
}

} // namespace undertow::sweep

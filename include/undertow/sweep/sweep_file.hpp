#pragma once
// A sweep file (docs/sweeps.md): a base scenario and the values to vary, by key path, as a grid
// or as a Latin hypercube over ranges. Reading it checks only the file itself; the plan then
// builds every point's scenario and checks that through the scenario reader.
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include <toml++/toml.h>

#include "undertow/error.hpp"

namespace undertow::sweep {

struct Parameter {
  std::string key;         // key path into the scenario (key_path.hpp)
  toml::array values;      // grid: the values, in order
  double from = 0, to = 0; // Latin hypercube: the range
  bool log_scale = false;  // Latin hypercube: strata equal in log(value)
  SourcePlace place;       // of the parameter's entry in the sweep file
};

struct SweepSpec {
  std::string path; // of the sweep file
  std::string name, description;
  std::string base_path, reference_path; // resolved against the sweep file's folder
  enum class Design { grid, latin_hypercube } design = Design::grid;
  std::size_t points = 0;     // Latin hypercube: number of points
  std::uint64_t seed = 1;     // Latin hypercube: seed of the design
  std::size_t replicates = 1; // runs per parameter point, with seeds derived per replicate
  bool keep_orbits = false;   // keep each point's orbits.h5 (large) after it finished
  std::vector<Parameter> parameters;
};

SweepSpec load_sweep_file(const std::string& path);
SweepSpec parse_sweep_file(const std::string& text, const std::string& path);

// Values from..to: count of them (linear or geometric), or from, from+step, ... up to to.
// Whole numbers stay TOML integers when from, to (and step) are integers.
toml::array range_values(const toml::node& from, const toml::node& to, const toml::node* count,
                         const toml::node* step, bool log_scale);

} // namespace undertow::sweep

#pragma once
// A sweep's plan: every point numbered, each a complete scenario with a stable id, in one
// human-readable file <folder>/plan.toml. The id is a digest of the point's scenario text, so
// planning the same sweep again gives the same ids, and a point whose scenario did not change
// keeps its results when the sweep grows. Layout of the folder: docs/sweeps.md.
#include <cstddef>
#include <string>
#include <vector>

#include <toml++/toml.h>

#include "undertow/scenario/scenario.hpp"
#include "undertow/sweep/sweep_file.hpp"

namespace undertow::sweep {

struct Point {
  std::size_t number = 0; // position in the plan (shards are cut by number)
  std::string id;         // 12 hex digits of the scenario text's FNV-1a digest
  bool reference = false; // the reference model (Δ ln L is measured against it)
  std::size_t replicate = 0;
  toml::array values;   // one per parameter, in the plan's parameter order
  std::string scenario; // complete scenario text; paths relative to the point's folder
};

struct Plan {
  std::string folder; // as given
  std::string file;   // plan.toml, for messages
  std::string name, description, sweep_file, design;
  std::vector<std::string> parameters;
  std::size_t replicates = 1;
  bool keep_orbits = false;
  std::string base, reference;       // scenario texts (galaxy inlined, paths rebased)
  std::vector<Point> points;         // by number; the reference, if any, is number 0
  std::vector<std::string> warnings; // from make_plan, for the person planning
};

// Builds every point's scenario and checks it with the scenario reader, so that a misspelled
// key path or a bad value is reported (naming the sweep file's parameter) before anything runs.
Plan make_plan(const SweepSpec& spec, const std::string& folder);
void write_plan(const Plan& p); // <folder>/plan.toml, atomically
// Reads <folder>/plan.toml (or the plan file itself) and, with build, rebuilds each point's
// scenario; an id that no longer matches its values means the plan was edited by hand.
Plan read_plan(const std::string& folder_or_file, bool build = true);
// Rebuilds (and checks) the scenarios of these points only: a task running one shard of a
// large plan then does work in proportion to its shard, not to the plan.
void build_points(Plan& p, const std::vector<std::size_t>& numbers);

// The input files a point's scenario names (catalogs, a tracer file), as written in it:
// relative to the point's folder, or absolute.
std::vector<std::string> input_files(const Point& q);

std::string point_folder(const Plan& p, const Point& q);  // <folder>/points/<id>
std::string scenario_path(const Plan& p, const Point& q); // <folder>/points/<id>/scenario.toml
scenario::Scenario point_scenario(const Plan& p, const Point& q);
// "key = value, key = value" (and the replicate), for logs and tables.
std::string describe(const Plan& p, const Point& q);

} // namespace undertow::sweep

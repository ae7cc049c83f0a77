#pragma once
// A scenario: one TOML file holding a whole run (docs/scenarios.md). This part: the
// run, the galaxy, the tracers, the integration and the snapshot output. Unknown keys are
// errors, with file, line and key path.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "undertow/orbit/integrator.hpp"
#include "undertow/potential/model.hpp"
#include "undertow/tracers/disk_population.hpp"

namespace undertow::scenario {

struct TracerSource {
  enum class Kind { disk, file } kind = Kind::disk;
  tracers::DiskPopulation disk;
  std::string file; // resolved path, for Kind::file
};

struct Output {
  std::vector<double> times_myr; // output times, ascending (or descending when integrating back)
  enum class Frame { inertial, rotating } frame = Frame::inertial;
  double frame_pattern_speed = 0; // km/s/kpc, for Frame::rotating
  std::string frame_pattern;      // label of the pattern the frame turns with
};

struct Scenario {
  std::string path; // as given
  std::string text; // verbatim, recorded in every output
  std::string name;
  std::string description;
  std::uint64_t seed = 1;
  std::string model_path; // when the galaxy is a separate file
  std::string model_text; // verbatim text of that file (or empty)
  potential::Model model;
  TracerSource tracers;
  orbit::IntegrationSettings integration;
  double start_myr = 0, end_myr = 0;
  double max_radius_kpc = 500; // tracers outside are refused at the start and flagged later
  Output output;
};

Scenario load_scenario(const std::string& path);
Scenario parse_scenario(const std::string& text, const std::string& path);

} // namespace undertow::scenario

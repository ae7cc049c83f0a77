#pragma once
// A scenario: one TOML file holding a whole run (docs/scenarios.md). This part: the
// run, the galaxy, the tracers, the integration and the snapshot output. Unknown keys are
// errors, with file, line and key path.
#include <array>
#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "undertow/fit/distance_prior.hpp"
#include "undertow/gas/cloud_gas.hpp"
#include "undertow/observe/observation_file.hpp"
#include "undertow/orbit/integrator.hpp"
#include "undertow/potential/model.hpp"
#include "undertow/residuals/peculiar.hpp"
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
};

// [comparison]: the measured catalog and how it is compared with the simulation.
struct Comparison {
  std::string catalog;                                // resolved path
  std::map<std::string, std::string> catalog_columns; // ours -> the catalog's (catalog.hpp)
  residuals::ResidualSettings::Distance distance = residuals::ResidualSettings::Distance::inverse;
  double edsd_length_kpc = 1.35;
  fit::DistancePrior prior; // for distance = "posterior-median"
  double parallax_snr_min = 0;
  int draws = residuals::kDefaultDraws, bootstrap = residuals::kDefaultBootstrap;
  std::uint64_t seed = 1;
  bool nearest = true;
  std::size_t neighbours = 30, min_neighbours = 5, prediction_sources = 5000;
  double radius_kpc = 1.0;
  std::vector<double> radius_bins_kpc, azimuth_bins_deg;
  // the verdict (compare/verdict.hpp; docs/scenarios.md)
  std::size_t realisations = 4;        // K: the model run with tracer seeds seed, seed + 1, ...
  std::size_t verdict_sources = 20000; // simulated young sources the verdict draws on
  std::string tails = "student";       // "student", "gaussian" or "robust" (compare/verdict.hpp)
  double robust_dof = 4;
  double floor_min_kms = 0, floor_max_kms = 15; // σ_int's uniform prior; equal: fixed
  bool marginalise_sun = false;
  std::array<double, 3> sun_velocity_err_kms{}; // a Gaussian prior without a fit, (U, Θ0+V, W)
  bool marginalise_r0 = false;
  double r0_err_kpc = 0; // R0's prior width: the fit's posterior, or given
  // Realisation r of K turns every spiral pattern by lo + (hi - lo)(r + 1/2)/K degrees (the arm
  // phase spread over a range, stratified); empty: the model's own phase.
  std::optional<std::array<double, 2>> arm_phase_range_deg;
};

struct Scenario {
  std::string path; // as given
  std::string text; // verbatim, recorded in every output
  std::string name;
  std::string description;
  std::uint64_t seed = 1;
  std::string model_path; // when the galaxy is a separate file
  std::string model_text; // verbatim text of that file (or empty)
  // Odd but valid settings, one line each ("file:line: key: what"), for the commands to print.
  std::vector<std::string> warnings;
  potential::Model model;
  TracerSource tracers;
  std::optional<gas::GasSettings> gas; // [gas]: the tracers are colliding gas clouds
  orbit::IntegrationSettings integration;
  double start_myr = 0, end_myr = 0;
  double max_radius_kpc = 500; // tracers outside are refused at the start and flagged later
  Output output;
  std::optional<observe::ObservationSpec> observation;
  std::optional<Comparison> comparison;
  // Canonical text of the tables each stage of a whole run depends on (for reusing stages).
  std::string orbit_key, observation_key, comparison_key;
};

Scenario load_scenario(const std::string& path);
Scenario parse_scenario(const std::string& text, const std::string& path);

} // namespace undertow::scenario

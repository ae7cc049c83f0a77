#pragma once
// Mock observation of a simulation from the Sun: a selection model (distance range, Galactic
// latitude and declination limits, a parallax signal-to-noise limit, a maximum number, and
// optionally young-source weights), an error model (fixed, fractional, or copied per source
// from a measured catalog by nearest position on the sky), and a mock catalog written in
// exactly the measured-catalog format (docs/observation.md).
#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "undertow/io/snapshot.hpp"
#include "undertow/potential/model.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/sky/lsr.hpp"
#include "undertow/sky/solar_frame.hpp"

namespace undertow::observe {

struct Selection {
  double distance_min_kpc = 0.0, distance_max_kpc = 1e9; // true heliocentric distance
  double latitude_max_deg = 90;                          // |b| at most this
  double dec_min_deg = -90, dec_max_deg = 90;
  double parallax_snr_min = 0; // on the observed parallax, as a survey would
  // A distance range as a real survey applies it: on the observed parallax (mas), after the
  // errors are drawn; the true-distance range above then only bounds the volume searched.
  double parallax_min_mas = -1e300, parallax_max_mas = 1e300;
  std::size_t max_sources = 0; // 0: no limit
};

// Young sources. Either the stars a gas run formed ([gas.stars]) whose age lies in a window
// (masers a few Myr, OB stars and young clusters up to 10-20 Myr: common practice), or, for
// runs without star formation, a Schmidt-type weight: with a star-formation rate ∝ ρⁿ and
// tracers that already sample the density, a tracer's weight is ρ^(n-1), averaged over the
// snapshots within the age window before the observed time.
struct YoungWeights {
  std::optional<std::array<double, 2>> star_age_myr; // stars aged [lo, hi] Myr, weight 1
  double exponent = 1.4;      // n (common practice: the Kennicutt-Schmidt slope)
  double age_window_myr = 30; // how far back star formation is counted
  // What density: "model" (the contrast 1 + ρ_patterns / ρ_axisymmetric at the tracer: the
  // tracers sample the axisymmetric galaxy already, so only the patterns' enhancement is a
  // weight) or "tracers" (the tracers' own surface density on a grid of cell_kpc: cold tracers
  // crowd into the arms much as gas does).
  enum class Density { model, tracers } density = Density::model;
  double cell_kpc = 0.25;
};

struct ErrorModel {
  // distance: the mock catalog gives distances (Gaussian errors sigma_d = fraction × d), no
  // parallaxes, as a catalog of photometric or spectroscopic distances does
  enum class Kind { fixed, fractional, distance, catalog } kind = Kind::fixed;
  double parallax_mas = 0.02;     // fixed: sigma_parallax
  double parallax_fraction = 0.1; // fractional: sigma_parallax / parallax
  double distance_fraction = 0.1; // distance: sigma_d / d
  double pm_masyr = 0.1;          // proper-motion errors (fixed and fractional)
  double vlsr_kms = 5.0;          // LSR velocity error (fixed and fractional)
  residuals::Catalog reference;   // catalog: errors copied from the nearest of its sources (a
                                  // catalog of distances gives its fractional distance error)
};

struct ObservationSettings {
  sky::SolarFrame sun;
  std::string sun_source = "fixed values"; // where the Sun's parameters came from, for outputs
  // from a fit: the posterior covariance of the Sun's velocity (U, Θ0 + V, W), (km/s)², row-major;
  // R0's posterior standard deviation (kpc) and its covariance with that velocity (km/s kpc)
  std::optional<std::array<double, 9>> sun_velocity_cov;
  double r0_err_kpc = 0;
  std::array<double, 3> sun_velocity_r0_cov{};
  sky::LsrForm lsr = sky::LsrForm::apex;
  Selection selection;
  std::optional<YoungWeights> young;
  ErrorModel errors;
  std::uint64_t seed = 1;
};

struct MockResult {
  residuals::Catalog catalog;
  std::size_t candidates = 0; // tracers inside the geometric selection
  std::size_t rejected_snr = 0;
  std::size_t rejected_parallax = 0;     // outside the observed-parallax range
  std::vector<std::uint64_t> tracer_ids; // of the mock sources, in catalog order
};

// The Sun an observation uses, every digit, and where it came from: "R0 = 8.1 kpc, z☉ = 0 kpc,
// Θ0 = 228 km/s, (U☉, V☉, W☉) = (11.1, 12.24, 7.25) km/s, LSR apex, from fixed values".
std::string describe_sun(const ObservationSettings& s);

// Whether tracer i lies in the survey's volume and sky (true distance range, declination,
// latitude), with its true observables o and distance d (kpc).
bool in_survey_volume(const orbit::PhaseSpace& t, std::size_t i, const ObservationSettings& s,
                      sky::Observed& o, double& d);

// Weights per tracer of snaps.back() (the observed snapshot) from the snapshots before it.
std::vector<double> young_weights(const potential::Model& m, const std::vector<io::Snapshot>& snaps,
                                  const YoungWeights& y);

// Observes `observed` (inertial frame); weights may be empty (all tracers equal).
MockResult observe(const io::Snapshot& observed, const std::vector<double>& weights,
                   const ObservationSettings& s);

} // namespace undertow::observe

#pragma once
// The whole arm-geometry job on a catalog (docs/arms.md): its groups (arm segments) fitted one by
// one for pitch, radius and width with distances marginalised (and, on request, naively at 1/ϖ
// for comparison), then the number of arms from the fitted segments; the results as tables
// (CSV, ECSV, FITS, Markdown, LaTeX), arms.h5 with the posterior samples, and summary.txt.
#include <array>
#include <atomic>
#include <optional>
#include <string>
#include <vector>

#include "undertow/arms/arm_count.hpp"
#include "undertow/io/table.hpp"

namespace undertow::arms {

struct ArmFitSettings {
  // one (fixed values) or draws from a kinematic fit, in ascending R0
  std::vector<fit::Geometry> geometries;
  // the middle one: where the arms' azimuth is reported, and the groups are checked
  const fit::Geometry& nominal() const { return geometries[geometries.size() / 2]; }
  std::string geometry_source = "fixed values";
  std::vector<std::string> groups;             // empty: every group label in the catalog
  std::optional<double> reference_azimuth_deg; // one ψ_ref for all segments
  // the segments' azimuth window (ψ, degrees); default: each segment's span at the measured
  // distances, widened by a quarter of it and at least 5 deg on each side
  std::optional<std::array<double, 2>> azimuth_range_deg;
  SightLines lines;
  SegmentPriors priors;
  SegmentSampling sampling;
  bool naive = false; // also fit each segment at 1/ϖ
  int max_arms = 8;
};

struct ArmFit {
  std::string catalog;
  std::vector<SegmentResult> segments, naive; // naive: empty unless asked
  std::optional<ArmCountResult> count;        // with two segments or more
  // the fitted sources: name and group, and Galactocentric x, y (kpc) at the measured distance
  // and at the measured value ± 1σ (near, far; the far end at the distance range's limit when
  // ϖ − σ <= 0), for the face-on figure
  io::Table sources;
  std::vector<std::string> notes;            // sources left out, warnings
  std::vector<std::string> catalog_warnings; // from reading the catalog (Catalog::warnings)
  double seconds = 0;
};

// Throws InputError for bad settings (naming the option) and for a group that cannot be fitted.
ArmFit run_arm_fit(const residuals::Catalog& c, const ArmFitSettings& s,
                   const std::atomic<bool>* stop = nullptr);

io::Table segment_table(const ArmFit& f);
io::Table naive_table(const ArmFit& f);
io::Table count_table(const ArmCountResult& c);
io::Table membership_table(const ArmFit& f);
std::string arm_summary(const ArmFit& f, const ArmFitSettings& s);

// Writes the folder (io/staged_folder.hpp), replacing an earlier arm fit there but refusing any
// other non-empty folder; returns the files.
std::vector<std::string> write_arm_outputs(const std::string& folder, const ArmFit& f,
                                           const ArmFitSettings& s);

} // namespace undertow::arms

#pragma once
// Global comparison of measured and simulated peculiar motions, component by component and
// over subsets (all sources, radius bins, azimuth bins, the catalog's groups): location and
// scale on both sides, their difference with its pull (difference over its error), and KS and AD
// p-values.
#include <array>
#include <cstdint>
#include <string>
#include <vector>

#include "undertow/io/table.hpp"
#include "undertow/residuals/peculiar.hpp"

namespace undertow::compare {

struct SampleStats {
  std::size_t n = 0;
  double mean = 0, mean_err = 0, median = 0, dispersion = 0, robust_dispersion = 0;
};

struct ComponentComparison {
  SampleStats measured, simulated;
  double difference = 0, difference_err = 0,
         pull = 0; // measured - simulated; pull = difference / difference_err
  double ks_p = 1, ad_p = 1;
};

ComponentComparison compare_samples(const std::vector<double>& measured,
                                    const std::vector<double>& simulated, int resamples,
                                    std::uint64_t seed, std::uint64_t stream);

struct Binning {
  std::vector<double> radius_edges_kpc; // empty: no radius bins
  std::vector<double> azimuth_edges_deg;
};

// The comparison of one subset of sources (all, a radius or azimuth bin, a group), per component
// U_s, V_s, W_s.
struct SubsetComparison {
  std::string label;
  std::array<ComponentComparison, 3> uvw;
};

// Results as values: every table, summary line and HDF5 attribute is written from these.
struct GlobalComparison {
  std::vector<SubsetComparison> subsets; // "all" first when it has enough sources
  std::vector<std::string> notes;        // subsets left out, and how groups are compared
  // The subset of all sources; throws std::logic_error when it was left out.
  const SubsetComparison& all() const;
};

// Groups compare the group's measured sources with the simulated sources of the same label, or
// with all simulated ones when none carry it. Subsets with fewer than 3 sources on either side
// are left out, with a note.
GlobalComparison compare_globally(const residuals::ResidualResult& measured,
                                  const residuals::ResidualResult& simulated, const Binning& bins,
                                  int resamples, std::uint64_t seed);
// The table view: one row per (subset, component).
io::Table global_table(const GlobalComparison& g);
inline io::Table global_table(const residuals::ResidualResult& measured,
                              const residuals::ResidualResult& simulated, const Binning& bins,
                              int resamples, std::uint64_t seed) {
  return global_table(compare_globally(measured, simulated, bins, resamples, seed));
}

} // namespace undertow::compare

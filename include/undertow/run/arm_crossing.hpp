#pragma once
// A gas run's clouds seen across the arms at one radius, against the steady flow of an
// isothermal gas (gas/spiral_shock.hpp): the clouds in a ring about R binned by arm phase
// (ArmCrests), with their density, mean speed across the arms and mean V_s per bin, and the
// same bins averaged over the steady profile, weighted by its density as the clouds' means are.
// The velocity drop across the arm (largest minus smallest bin mean of the speed across) is the
// one number to compare.
#include <string>
#include <vector>

#include "undertow/gas/spiral_shock.hpp"
#include "undertow/io/snapshot.hpp"
#include "undertow/io/table.hpp"
#include "undertow/potential/model.hpp"

namespace undertow::run {

struct CrossingBins {
  std::vector<double> edges;              // kpc across the arms from the potential trough, bins + 1
  std::vector<double> count;              // clouds per bin (the reference: 0)
  std::vector<double> density;            // over the mean of all bins
  std::vector<double> across, across_err; // speed across the arms, km/s (u0 included)
  std::vector<double> vs, vs_err;         // V_s, km/s, relative to the circular speed
  double drop = 0, drop_err = 0;          // km/s
};

struct CloudCrossing {
  CrossingBins clouds, steady;
  std::size_t used = 0;  // clouds in the ring with an arm phase
  double dispersion = 0; // km/s, the clouds' dispersion of the speed across about bin means
  double time_myr = 0;
};

// Clouds (not stars) of snapshot s in the ring |R - p.radius| < half_width_kpc, binned over one
// arm spacing. Errors are standard errors of the bin means.
CrossingBins cloud_bins(const io::Snapshot& s, const potential::Model& m,
                        const gas::ShockProblem& p, double half_width_kpc, int bins,
                        double& dispersion, std::size_t& used);
// The steady profile averaged over the same bins (density-weighted means).
CrossingBins steady_bins(const gas::ShockProblem& p, const gas::ShockProfile& f,
                         const std::vector<double>& edges);

CloudCrossing compare_crossing(const io::Snapshot& s, const potential::Model& m,
                               const gas::ShockProblem& p, const gas::ShockProfile& f,
                               double half_width_kpc, int bins);

io::Table crossing_table(const gas::ShockProblem& p, const CloudCrossing& c);
std::string describe_crossing(const gas::ShockProblem& p, const CloudCrossing& c);

} // namespace undertow::run

#pragma once
// The lag against age: the mean peculiar motion (U_s toward the centre, V_s in the sense of
// rotation) and its dispersion of a gas run's stars, by age and by arm phase. Two versions side
// by side: the stars themselves (true positions and velocities, inside the survey's volume, the
// same rotation curve as the residuals) and the same stars through the mock survey (selection,
// errors, distances as the comparison treats them). In the steady shock of a tightly wound arm
// gas lags just downstream of the arm and leads further on (Roberts 1969, ApJ 158, 123), so
// whether young stars lag depends on where they formed and how long ago: this table is the run's
// direct answer.
#include <vector>

#include "undertow/io/snapshot.hpp"
#include "undertow/io/table.hpp"
#include "undertow/observe/observation.hpp"
#include "undertow/potential/model.hpp"
#include "undertow/residuals/peculiar.hpp"

namespace undertow::run {

// The arm crests of a model's spiral patterns: the minima of their summed potential around
// rings, at one time. phase() is the signed azimuthal offset from the nearest crest in units of
// the local arm spacing, in [-1/2, 1/2), positive ahead of the crest in the sense of rotation.
class ArmCrests {
public:
  ArmCrests(const potential::Model& m, double t_myr, double r_max_kpc = 25);
  bool empty() const { return empty_; }
  double phase(double x, double y) const; // NaN where a ring has no crest

private:
  double dr_ = 0.1;
  std::vector<std::vector<double>> crests_; // azimuths (rad) per ring
  bool empty_ = true;
};

struct LagTables {
  io::Table by_age;
  io::Table by_phase; // no rows without spiral patterns
};

// stars: the observed snapshot of a run with star formation; young: the age window (Myr) of the
// stars put in the arm-phase table.
LagTables lag_by_age(const io::Snapshot& stars, const potential::Model& m,
                     const observe::ObservationSettings& obs, const residuals::ResidualSettings& rs,
                     std::array<double, 2> young, int bootstrap, std::uint64_t seed);

} // namespace undertow::run

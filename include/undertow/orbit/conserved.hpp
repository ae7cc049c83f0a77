#pragma once
// Conserved quantities used to judge an integration: the energy in a static model, the Jacobi
// integral E - Omega_p L in a model with one rotating pattern (B&T 2008 §3.3.2).
#include <optional>
#include <string>
#include <vector>

#include "undertow/orbit/phase_space.hpp"
#include "undertow/potential/model.hpp"

namespace undertow::orbit {

struct Invariant {
  enum class Kind { energy, jacobi, none } kind = Kind::none;
  double pattern_speed = 0; // for jacobi
  std::string why_none;     // when kind == none
};

// Which quantity is conserved over [t0, t1] in this model, if any.
Invariant conserved_quantity(const potential::Model& m, double t0_myr, double t1_myr);

// Per tracer, (km/s)^2. L = y vx - x vy is the angular momentum in the sense of rotation.
std::vector<double> evaluate(const Invariant& inv, const potential::Model& m, const PhaseSpace& p,
                             double t_myr);

struct ErrorSummary {
  double median = 0, max = 0;
  std::vector<std::size_t> worst; // indices of the largest relative errors, largest first
  std::vector<double> worst_error;
};
// Relative errors |I1 - I0| / |I0| per tracer, and their summary.
std::vector<double> relative_errors(const std::vector<double>& i0, const std::vector<double>& i1);
ErrorSummary summarise(const std::vector<double>& rel, std::size_t n_worst = 5);

} // namespace undertow::orbit

#pragma once
// What every likelihood of a parallax (or distance) catalog needs per source, computed once
// (structure of arrays): the line of sight n and the ICRS east and north directions e, q in
// heliocentric Galactic axes, the LSR correction of v_LSR, the measured values and their covariance
// (parallax with both proper motions, the two proper motions), and Gauss-Legendre nodes in true
// parallax u = 1/d over the measured parallax ± 7σ (widened by a zero point's range) cut to the
// prior's distance range. The kinematic fit (fit/likelihood.hpp) and the verdict against a
// simulation (compare/verdict.hpp) both integrate over these nodes.
#include <cstddef>
#include <vector>

#include "undertow/fit/distance_prior.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/sky/lsr.hpp"

namespace undertow::fit {

struct MeasuredSources {
  std::size_t n = 0;
  int nodes = 0;
  std::vector<double> nx, ny, nz, ex, ey, ez, qx, qy, qz, lsr;
  // ϖ, μα*, μδ, v_LSR, ϖ offset; for a source whose catalog gives its distance, w is that
  // distance (kpc), its error stands in cww and sw, and off, cwa and cwd are zero
  std::vector<double> w, a, dd, v, off;
  std::vector<double> cww, cwa, cwd, caa, cad, cdd, cvv, sw; // covariance; sw = σ_ϖ (or σ_d)
  std::vector<unsigned char> distance_given;                 // 1: w is a distance
  // n × nodes: u (mas), d = 1/u (kpc), the true value of the measured quantity (u, or d where
  // the distance is given), ln(quadrature weight × the Jacobian to d × d²)
  std::vector<double> node_u, node_d, node_m, node_lnw;
  std::vector<double> node_table; // ln ρ of a tabulated prior at the nodes (table prior only)

  // Validates the prior. The zero point's range [offset_min, offset_max] (mas) widens the nodes.
  // Throws InputError naming the catalog line of a source whose parallax leaves no probability
  // inside the prior's distance range, or a node count outside [4, 1024].
  MeasuredSources(const residuals::Catalog& c, const DistancePrior& prior, int nodes,
                  sky::LsrForm lsr, double offset_min, double offset_max);
};

inline constexpr int kMaxNodes = 1024;

// Whether a source's parallax leaves probability inside the prior's distance range: the
// measured value ± 7σ (widened by the zero point's range) meets [1/d_max, 1/d_min].
bool parallax_within_prior(const residuals::Source& s, const DistancePrior& prior,
                           double offset_min, double offset_max);

} // namespace undertow::fit

#pragma once
// A model's radial profile in its midplane as one table: circular speed (total and per
// component), Omega, kappa, nu, Oort A and B, escape speed, enclosed mass, midplane density.
#include <optional>
#include <string>
#include <vector>

#include "undertow/dynamics/resonances.hpp"
#include "undertow/io/table.hpp"
#include "undertow/potential/model.hpp"

namespace undertow::dynamics {

// radii in kpc, each > 0. escape_to_kpc: see escape_speed(); for a model whose potential does
// not vanish at infinity and no escape_to_kpc the escape-speed column is left out (with a note).
io::Table model_profile(const potential::Model& m, const std::vector<double>& radii,
                        std::optional<double> escape_to_kpc = {});

std::vector<double> radius_grid(double from_kpc, double to_kpc, double step_kpc);

// Plain-text summary of resonance radii, one line each.
std::string format_number_kpc(double r);

std::string describe_resonances(const std::vector<Resonance>& res, double pattern_speed, int arms,
                                const std::string& label);

} // namespace undertow::dynamics

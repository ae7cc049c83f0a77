#pragma once
#include <string>
#include <vector>

#include "undertow/potential/model.hpp"

namespace undertow::dynamics {

// Rescales the masses of the components with these labels by one common factor so that the
// circular speed at R0 equals Theta0. v_c^2 is linear in each component's mass, so the factor
// is exact. Returns it; throws InputError when no positive factor can reach Theta0.
double calibrate(potential::Model& m, double r0_kpc, double theta0_kms,
                 const std::vector<std::string>& labels);

} // namespace undertow::dynamics

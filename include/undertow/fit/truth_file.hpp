#pragma once
// Truth files (TOML, docs/fit.md): a documented kinematic truth from which 'undertow
// mock-kinematics' simulates a catalog through the mock observation (fit::simulate_catalog).
// Every parameter of the model is a fixed number; unknown keys stop the reading at their line.
#include <string>

#include "undertow/fit/simulate.hpp"

namespace undertow::fit {

KinematicTruth load_truth_file(const std::string& path);
KinematicTruth parse_truth_file(const std::string& text, const std::string& name);

} // namespace undertow::fit

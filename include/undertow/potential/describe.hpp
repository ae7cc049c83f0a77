#pragma once
// A model's parameters as (key, value) pairs in model-file units, for provenance records.
#include <string>
#include <utility>
#include <vector>

#include "undertow/potential/model.hpp"

namespace undertow::potential {

using Parameters = std::vector<std::pair<std::string, double>>;

Parameters parameters(const Component& c);
Parameters parameters(const Pattern& p);

} // namespace undertow::potential

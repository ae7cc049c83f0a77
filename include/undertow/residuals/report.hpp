#pragma once
// Writes the residual tables of a catalog: <prefix>-sources and <prefix>-summary as CSV,
// Markdown and LaTeX, and <prefix>.h5 with both tables as groups. Every file is written
// atomically; the warnings and exclusions go into the tables' notes.
#include <string>
#include <vector>

#include "undertow/residuals/summary.hpp"

namespace undertow::residuals {

std::vector<std::string> write_report(const std::string& prefix, const ResidualResult& r,
                                      const std::vector<Summary>& s, const std::string& settings);

} // namespace undertow::residuals

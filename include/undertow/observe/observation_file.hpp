#pragma once
// Observation files (TOML, docs/observation.md): where the Sun is, what the survey selects, how
// young sources are weighted and what errors it has. The same tables serve inside scenarios.
#include <optional>
#include <string>

#include "undertow/observe/observation.hpp"

namespace toml {
inline namespace v3 {
class table;
}
} // namespace toml

namespace undertow::observe {

struct ObservationSpec {
  ObservationSettings settings;
  std::optional<double> time_myr; // the snapshot to observe; default the last
};

// Theta0 defaults to the model's circular speed at R0.
ObservationSpec observation_from_table(const toml::table& t, const std::string& file,
                                       const std::string& context, const potential::Model& m);
ObservationSpec load_observation_file(const std::string& path, const potential::Model& m);

} // namespace undertow::observe

#pragma once
// The galaxy model a snapshot file was made with, rebuilt from the texts it records: the model
// file's text when the scenario named one, otherwise the scenario's own [galaxy] table.
#include "undertow/io/snapshot.hpp"
#include "undertow/potential/model.hpp"

namespace undertow::scenario {

potential::Model model_of(const io::Provenance& p, const std::string& snapshot_path);

} // namespace undertow::scenario

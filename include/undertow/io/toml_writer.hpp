#pragma once
// TOML text from a toml++ table, written so that a person can read it and a parser gets the same
// values back bit for bit: floats in their shortest round-trip form (std::to_chars), keys in a
// fixed (sorted) order, sub-tables after plain values. Comments of the source are not kept.
#include <string>

#include <toml++/toml.h>

namespace undertow::io {

std::string toml_text(const toml::table& t);
// One value (number, string, boolean, array or inline table) as it would follow "key = ".
std::string toml_value_text(const toml::node& n);

} // namespace undertow::io

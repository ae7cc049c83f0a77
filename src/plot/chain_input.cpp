#include "chain_input.hpp"

#include <sstream>

#include "undertow/error.hpp"

namespace undertow::plot {

Chain read_chain(const H5Input& in) {
  Chain c;
  std::stringstream ss(in.attribute("chain", "parameters"));
  for (std::string s; std::getline(ss, s, ',');)
    c.names.push_back(s);
  const auto group = io::h5::open_group(in.file(), "chain");
  c.walkers = std::size_t(io::h5::get_attr_int(in.file(), group.id(), "walkers"));
  c.steps = std::size_t(io::h5::get_attr_int(in.file(), group.id(), "steps"));
  c.burn = std::size_t(io::h5::get_attr_int(in.file(), group.id(), "burn_in_steps"));
  std::size_t rows = 0;
  c.positions = in.doubles("chain/positions", c.names.size(), &rows);
  if (rows != c.walkers * c.steps || c.burn >= c.steps || c.names.empty())
    throw InputError(in.path() + ": /chain/positions has " + std::to_string(rows) +
                     " rows, not walkers x steps = " + std::to_string(c.walkers * c.steps) +
                     " (or the burn-in is the whole chain)");
  return c;
}

} // namespace undertow::plot

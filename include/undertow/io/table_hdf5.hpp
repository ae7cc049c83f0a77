#pragma once
// A table as an HDF5 group: one dataset per column (with its units and symbol), the row labels
// as a string dataset, the title and notes as attributes.
#include <string>

#include "undertow/io/hdf5.hpp"
#include "undertow/io/table.hpp"

namespace undertow::io {

void write_table_group(const h5::File& f, const std::string& group, const Table& t);

} // namespace undertow::io

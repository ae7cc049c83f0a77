#pragma once
// A table as ECSV 1.0 (Enhanced Character Separated Values, astropy APE 6: Aldcroft 2014, and
// its 1.0 specification): a YAML header of commented lines naming each column's type, unit
// (FITS notation, unit_notation.hpp) and symbol, the title and notes as metadata, then the
// values separated by spaces with every digit kept.
#include <ostream>

#include "undertow/io/table.hpp"

namespace undertow::io {

void write_table_ecsv(std::ostream& os, const Table& t);

} // namespace undertow::io

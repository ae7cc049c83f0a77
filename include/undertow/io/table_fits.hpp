#pragma once
// A table as a FITS binary table (Pence et al. 2010, A&A 524, A42, §7.3), through CFITSIO: an
// empty primary HDU, then one BINTABLE extension with a 64-bit float column per table column
// (TUNITn in FITS notation, unit_notation.hpp), the row labels as a character column, the title
// and notes as COMMENT cards. Values are stored as IEEE doubles, every bit kept (NaN where
// a table has no value). No DATE or CHECKSUM cards (CFITSIO stamps the time into CHECKSUM's
// comment): the same table gives the same bytes.
// Written under a temporary name and renamed into place.
#include <string>

#include "undertow/io/table.hpp"

namespace undertow::io {

// extname: the extension's name (EXTNAME); empty: the file's stem.
void write_table_fits(const std::string& path, const Table& t, std::string extname = "");

} // namespace undertow::io

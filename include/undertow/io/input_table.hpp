#pragma once
// A table read from a file: CSV, ECSV or a FITS binary table, told apart by their content (a
// FITS file starts with "SIMPLE  =", an ECSV file with "# %ECSV"), read strictly into one model
// of named columns of text cells with an optional unit each. Every error names the file and the
// place (line for CSV and ECSV, row for FITS) and the column.
//   CSV: a header row names the columns; '#' lines and blank lines are skipped; fields with
//        commas or quotes are quoted (RFC 4180).
//   ECSV: version 1.0 (astropy APE 6): the YAML header's columns, units and delimiter, then the
//        body like CSV with that delimiter.
//   FITS: the first binary-table extension (Pence et al. 2010, A&A 524, A42, §7.3), scalar
//        numeric and character columns; floating-point numbers become the shortest text that
//        reads back to the same double, so all three formats give the same values bit for bit;
//        integers keep every digit (64-bit source ids).
#include <cstdint>
#include <functional>
#include <istream>
#include <string>
#include <vector>

#include "undertow/error.hpp"

namespace undertow::io {

enum class TableFileKind { csv, ecsv, fits };

class InputTable {
public:
  // Any of the three, by content.
  static InputTable read_file(const std::string& path);
  // CSV or ECSV text (by its first line); source_name names it in messages.
  static InputTable parse(const std::string& text, const std::string& source_name);
  static TableFileKind kind_of_file(const std::string& path);

  const std::string& file() const { return file_; }
  TableFileKind kind() const { return kind_; }
  std::size_t rows() const { return cells_.size(); }
  std::size_t columns() const { return header_.size(); }
  const std::string& name(std::size_t col) const { return header_[col]; }
  bool has_column(const std::string& name) const;
  std::size_t column(const std::string& name) const; // throws naming the missing column
  // The column's unit as the file gives it (ECSV and FITS; empty when none or CSV).
  const std::string& unit(std::size_t col) const { return units_[col]; }
  const std::string& cell(std::size_t row, std::size_t col) const { return cells_[row][col]; }
  // The line of a row in the file (CSV, ECSV), or its row number (FITS, 1-based).
  int line_of(std::size_t row) const { return lines_[row]; }
  // A finite number; otherwise InputError at the row's place, column name.
  double number(std::size_t row, std::size_t col) const;
  std::uint64_t whole(std::size_t row, std::size_t col) const;
  SourcePlace place(std::size_t row, std::size_t col) const;
  SourcePlace header_place(std::size_t col) const; // where the column is declared
  int header_line() const { return header_line_; } // 0 for FITS

  // For the readers of each format.
  InputTable(std::string file, TableFileKind kind) : file_(std::move(file)), kind_(kind) {}
  void set_header(std::vector<std::string> names, std::vector<std::string> units, int line);
  void add_row(std::vector<std::string> cells, int line);
  void finish() const; // throws when there is no header or no row

private:
  std::string file_;
  TableFileKind kind_ = TableFileKind::csv;
  int header_line_ = 0;
  std::vector<std::string> header_, units_;
  std::vector<std::vector<std::string>> cells_;
  std::vector<int> lines_;
};

// The readers, one per format (input_table.cpp dispatches).
InputTable parse_csv(const std::string& text, const std::string& source_name);
InputTable parse_ecsv(const std::string& text, const std::string& source_name);
InputTable read_fits_table(const std::string& path);
// The fields of one delimited line: quoted fields may hold the delimiter, and "" is one quote.
std::vector<std::string> split_fields(const std::string& line, char delimiter);
// A delimited body after `line` lines: blank and '#' lines skipped, the first row handed to
// on_header (with its line), the others added as rows; then t.finish().
void read_delimited(InputTable& t, std::istream& in, int line, char delimiter,
                    const std::function<void(std::vector<std::string>, int)>& on_header);

} // namespace undertow::io

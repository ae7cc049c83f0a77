#pragma once
// Strict CSV reading: a header row names the columns; lines starting with '#' and blank lines
// are skipped; every value is checked, and every error names file, line and column.
#include <string>
#include <vector>

#include "undertow/error.hpp"

namespace undertow::io {

class CsvTable {
public:
  static CsvTable read_file(const std::string& path);
  static CsvTable parse(const std::string& text, const std::string& source_name);

  const std::string& file() const { return file_; }
  std::size_t rows() const { return cells_.size(); }
  bool has_column(const std::string& name) const;
  std::size_t column(const std::string& name) const; // throws naming the missing column
  const std::string& cell(std::size_t row, std::size_t col) const { return cells_[row][col]; }
  int line_of(std::size_t row) const { return lines_[row]; }
  // A finite number; otherwise InputError at file:line, column name.
  double number(std::size_t row, std::size_t col) const;
  std::uint64_t whole(std::size_t row, std::size_t col) const;
  SourcePlace place(std::size_t row, std::size_t col) const;

private:
  std::string file_;
  int header_line_ = 0;
  std::vector<std::string> header_;
  std::vector<std::vector<std::string>> cells_;
  std::vector<int> lines_;
};

} // namespace undertow::io

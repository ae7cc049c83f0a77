#include "undertow/io/input_table.hpp"

#include <cerrno>
#include <cmath>
#include <cstdlib>
#include <fstream>

#include "undertow/io/text_file.hpp"

namespace undertow::io {

TableFileKind InputTable::kind_of_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  char head[9] = {};
  in.read(head, 9);
  if (std::string(head, std::size_t(in.gcount())) == "SIMPLE  =") return TableFileKind::fits;
  const auto ends = [&](const std::string& e) {
    return path.size() >= e.size() && path.compare(path.size() - e.size(), e.size(), e) == 0;
  };
  for (const char* e : {".fits", ".fit", ".fts", ".fits.gz", ".fit.gz", ".fts.gz"})
    if (ends(e)) return TableFileKind::fits; // gzipped, or not FITS: CFITSIO says which
  return TableFileKind::csv;                 // CSV or ECSV: parse() looks at the first line
}

InputTable InputTable::read_file(const std::string& path) {
  if (kind_of_file(path) == TableFileKind::fits) return read_fits_table(path);
  return parse(read_text_file(path), path);
}

InputTable InputTable::parse(const std::string& text, const std::string& source_name) {
  if (text.rfind("# %ECSV", 0) == 0) return parse_ecsv(text, source_name);
  return parse_csv(text, source_name);
}

void InputTable::set_header(std::vector<std::string> names, std::vector<std::string> units,
                            int line) {
  header_line_ = line;
  for (std::size_t i = 0; i < names.size(); ++i) {
    if (names[i].empty())
      throw InputError(SourcePlace{file_, line, 0, {}}, "empty column name in the header");
    for (std::size_t j = 0; j < i; ++j)
      if (names[j] == names[i])
        throw InputError(SourcePlace{file_, line, 0, names[i]}, "column named twice in the header");
  }
  header_ = std::move(names);
  units_ = std::move(units);
  units_.resize(header_.size());
}

void InputTable::add_row(std::vector<std::string> cells, int line) {
  if (cells.size() != header_.size())
    throw InputError(
        SourcePlace{file_, kind_ == TableFileKind::fits ? 0 : line, 0, {}},
        (kind_ == TableFileKind::fits ? "row " + std::to_string(line) + " has " : "row has ") +
            std::to_string(cells.size()) + " fields, the header has " +
            std::to_string(header_.size()));
  cells_.push_back(std::move(cells));
  lines_.push_back(line);
}

void InputTable::finish() const {
  if (header_.empty()) throw InputError(SourcePlace{file_, 0, 0, {}}, "empty file: no header row");
  if (cells_.empty()) throw InputError(SourcePlace{file_, header_line_, 0, {}}, "no data rows");
}

bool InputTable::has_column(const std::string& name) const {
  for (const auto& h : header_)
    if (h == name) return true;
  return false;
}

std::size_t InputTable::column(const std::string& name) const {
  for (std::size_t i = 0; i < header_.size(); ++i)
    if (header_[i] == name) return i;
  throw InputError(SourcePlace{file_, header_line_, 0, name}, "missing column");
}

SourcePlace InputTable::place(std::size_t row, std::size_t col) const {
  if (kind_ == TableFileKind::fits) // no lines in a binary table: its row number
    return SourcePlace{file_, 0, 0, "row " + std::to_string(lines_[row]) + ", " + header_[col]};
  return SourcePlace{file_, lines_[row], 0, header_[col]};
}

SourcePlace InputTable::header_place(std::size_t col) const {
  return SourcePlace{file_, header_line_, 0, header_[col]};
}

double InputTable::number(std::size_t row, std::size_t col) const {
  const std::string& s = cells_[row][col];
  if (s.empty()) throw InputError(place(row, col), "empty value");
  char* end = nullptr;
  errno = 0;
  const double v = std::strtod(s.c_str(), &end);
  if (end == s.c_str() || *end != '\0')
    throw InputError(place(row, col), "not a number: '" + s + "'");
  if (!std::isfinite(v) || errno == ERANGE)
    throw InputError(place(row, col), "not a finite number: '" + s + "'");
  return v;
}

std::uint64_t InputTable::whole(std::size_t row, std::size_t col) const {
  const std::string& s = cells_[row][col];
  char* end = nullptr;
  errno = 0;
  const unsigned long long v = std::strtoull(s.c_str(), &end, 10);
  if (s.empty() || s[0] == '-' || end == s.c_str() || *end != '\0' || errno == ERANGE)
    throw InputError(place(row, col), "not a whole number: '" + s + "'");
  return v;
}

} // namespace undertow::io

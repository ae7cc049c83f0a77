#include "undertow/io/csv.hpp"

#include "undertow/io/text_file.hpp"

#include <cerrno>
#include <cmath>
#include <cstdlib>
#include <sstream>

namespace undertow::io {
namespace {

std::string trim(const std::string& s) {
  const auto b = s.find_first_not_of(" \t\r");
  if (b == std::string::npos) return "";
  const auto e = s.find_last_not_of(" \t\r");
  return s.substr(b, e - b + 1);
}

std::vector<std::string> split(const std::string& line) {
  std::vector<std::string> out;
  std::string cur;
  bool quoted = false;
  for (char c : line) {
    if (c == '"')
      quoted = !quoted;
    else if (c == ',' && !quoted) {
      out.push_back(trim(cur));
      cur.clear();
    } else
      cur += c;
  }
  out.push_back(trim(cur));
  return out;
}

} // namespace

CsvTable CsvTable::read_file(const std::string& path) {
  return parse(read_text_file(path), path);
}

CsvTable CsvTable::parse(const std::string& text, const std::string& source) {
  CsvTable t;
  t.file_ = source;
  std::istringstream in(text);
  std::string line;
  int n = 0;
  while (std::getline(in, line)) {
    ++n;
    const std::string s = trim(line);
    if (s.empty() || s[0] == '#') continue;
    auto cells = split(s);
    if (t.header_.empty()) {
      t.header_ = cells;
      t.header_line_ = n;
      for (std::size_t i = 0; i < cells.size(); ++i) {
        if (cells[i].empty())
          throw InputError(SourcePlace{source, n, 0, {}}, "empty column name in the header");
        for (std::size_t j = 0; j < i; ++j)
          if (cells[j] == cells[i])
            throw InputError(SourcePlace{source, n, 0, cells[i]},
                             "column named twice in the header");
      }
      continue;
    }
    if (cells.size() != t.header_.size())
      throw InputError(SourcePlace{source, n, 0, {}}, "row has " + std::to_string(cells.size()) +
                                                          " fields, the header has " +
                                                          std::to_string(t.header_.size()));
    t.cells_.push_back(std::move(cells));
    t.lines_.push_back(n);
  }
  if (t.header_.empty())
    throw InputError(SourcePlace{source, 0, 0, {}}, "empty file: no header row");
  if (t.cells_.empty())
    throw InputError(SourcePlace{source, t.header_line_, 0, {}}, "no data rows");
  return t;
}

bool CsvTable::has_column(const std::string& name) const {
  for (const auto& h : header_)
    if (h == name) return true;
  return false;
}

std::size_t CsvTable::column(const std::string& name) const {
  for (std::size_t i = 0; i < header_.size(); ++i)
    if (header_[i] == name) return i;
  throw InputError(SourcePlace{file_, header_line_, 0, name}, "missing column");
}

SourcePlace CsvTable::place(std::size_t row, std::size_t col) const {
  return SourcePlace{file_, lines_[row], 0, header_[col]};
}

double CsvTable::number(std::size_t row, std::size_t col) const {
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

std::uint64_t CsvTable::whole(std::size_t row, std::size_t col) const {
  const std::string& s = cells_[row][col];
  char* end = nullptr;
  errno = 0;
  const unsigned long long v = std::strtoull(s.c_str(), &end, 10);
  if (s.empty() || s[0] == '-' || end == s.c_str() || *end != '\0' || errno == ERANGE)
    throw InputError(place(row, col), "not a whole number: '" + s + "'");
  return v;
}

} // namespace undertow::io

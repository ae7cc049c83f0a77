#include "undertow/io/table_ecsv.hpp"

#include "undertow/io/unit_notation.hpp"

namespace undertow::io {

namespace {

// A YAML single-quoted scalar: any text on one line, quotes doubled (YAML 1.2, §7.3.2).
std::string yaml_text(const std::string& s) {
  std::string q = "'";
  for (char c : s) {
    if (c == '\n' || c == '\r')
      q += ' ';
    else
      q += c == '\'' ? std::string("''") : std::string(1, c);
  }
  return q + "'";
}

// A value in the space-separated body: quoted, with quotes doubled, when it holds a space, a
// quote or nothing (ECSV's CSV dialect with ' ' as delimiter).
std::string body_text(const std::string& s) {
  if (!s.empty() && s.find_first_of(" \"\t\n\r") == std::string::npos) return s;
  std::string q = "\"";
  for (char c : s) {
    if (c == '\n' || c == '\r')
      q += ' ';
    else
      q += c == '"' ? std::string("\"\"") : std::string(1, c);
  }
  return q + "\"";
}

} // namespace

void write_table_ecsv(std::ostream& os, const Table& t) {
  const bool labels = !t.label_header.empty() && t.row_labels.size() == t.rows.size();
  os << "# %ECSV 1.0\n# ---\n# datatype:\n";
  if (labels) os << "# - {name: " << yaml_text(t.label_header) << ", datatype: string}\n";
  for (const auto& c : t.columns) {
    os << "# - {name: " << yaml_text(c.name);
    if (!c.unit.empty()) os << ", unit: " << yaml_text(fits_unit(c.unit));
    os << ", datatype: float64";
    if (!c.plain.empty()) os << ", description: " << yaml_text(c.plain);
    os << "}\n";
  }
  if (!t.title.empty() || !t.notes.empty()) {
    os << "# meta:\n";
    if (!t.title.empty()) os << "#   title: " << yaml_text(t.title) << "\n";
    if (!t.notes.empty()) {
      os << "#   notes:\n";
      for (const auto& n : t.notes)
        os << "#   - " << yaml_text(n) << "\n";
    }
  }
  os << "# schema: astropy-2.0\n";
  if (labels) os << body_text(t.label_header) << " ";
  for (std::size_t c = 0; c < t.columns.size(); ++c)
    os << (c ? " " : "") << body_text(t.columns[c].name);
  os << "\n";
  for (std::size_t r = 0; r < t.rows.size(); ++r) {
    if (labels) os << body_text(t.row_labels[r]) << " ";
    for (std::size_t c = 0; c < t.columns.size(); ++c)
      os << (c ? " " : "") << exact_number(t.rows[r][c]);
    os << "\n";
  }
}

} // namespace undertow::io

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

} // namespace

void write_table_ecsv(std::ostream& os, const Table& t) {
  const bool labels = t.has_text_columns();
  os << "# %ECSV 1.0\n# ---\n# datatype:\n";
  if (labels)
    for (const auto& h : t.text_headers)
      os << "# - {name: " << yaml_text(h) << ", datatype: string}\n";
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
  if (labels)
    for (const auto& h : t.text_headers)
      os << delimited_field(h, ' ') << " ";
  for (std::size_t c = 0; c < t.columns.size(); ++c)
    os << (c ? " " : "") << delimited_field(t.columns[c].name, ' ');
  os << "\n";
  for (std::size_t r = 0; r < t.rows.size(); ++r) {
    if (labels)
      for (const auto& x : t.text_rows[r])
        os << delimited_field(x, ' ') << " ";
    for (std::size_t c = 0; c < t.columns.size(); ++c)
      os << (c ? " " : "") << exact_number(t.rows[r][c]);
    os << "\n";
  }
}

} // namespace undertow::io

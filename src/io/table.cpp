#include "undertow/io/table.hpp"

#include <cctype>
#include <charconv>
#include <cmath>
#include <filesystem>
#include <cstdio>
#include <stdexcept>

#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/table_ecsv.hpp"
#include "undertow/io/table_fits.hpp"

namespace undertow::io {

void Table::add_row(std::vector<double> row) {
  if (row.size() != columns.size())
    throw std::logic_error("table '" + title + "': row has " + std::to_string(row.size()) +
                           " values for " + std::to_string(columns.size()) + " columns");
  rows.push_back(std::move(row));
}

void Table::add_row(std::vector<std::string> texts, std::vector<double> row) {
  if (texts.size() != text_headers.size())
    throw std::logic_error("table '" + title + "': row has " + std::to_string(texts.size()) +
                           " texts for " + std::to_string(text_headers.size()) + " text columns");
  if (text_rows.size() != rows.size())
    throw std::logic_error("table '" + title + "': rows without texts before a row with them");
  add_row(std::move(row));
  text_rows.push_back(std::move(texts));
}

std::vector<std::string> Table::text_column(std::size_t k) const {
  std::vector<std::string> out;
  for (const auto& r : text_rows)
    out.push_back(r.at(k));
  return out;
}

TableFormat table_format_from_name(const std::string& name) {
  if (name == "csv") return TableFormat::csv;
  if (name == "markdown" || name == "md") return TableFormat::markdown;
  if (name == "latex" || name == "tex") return TableFormat::latex;
  if (name == "ecsv") return TableFormat::ecsv;
  if (name == "fits") return TableFormat::fits;
  throw InputError("unknown table format '" + name + "' (csv, ecsv, fits, markdown, latex)");
}

TableFormat machine_format_of_path(const std::string& path) {
  const auto ext = std::filesystem::path(path).extension().string();
  if (ext == ".ecsv") return TableFormat::ecsv;
  if (ext == ".fits" || ext == ".fit" || ext == ".fts") return TableFormat::fits;
  return TableFormat::csv;
}

void write_table_file(const std::string& path, const Table& t, TableFormat f) {
  if (f == TableFormat::fits) return write_table_fits(path, t);
  AtomicFile out(path);
  write_table(out.stream(), t, f);
  out.commit();
}

std::vector<std::string> write_table_files(const std::string& stem, const Table& t) {
  const std::pair<const char*, TableFormat> formats[] = {{".csv", TableFormat::csv},
                                                         {".ecsv", TableFormat::ecsv},
                                                         {".md", TableFormat::markdown},
                                                         {".tex", TableFormat::latex},
                                                         {".fits", TableFormat::fits}};
  std::vector<std::string> written;
  for (const auto& [ext, fmt] : formats) {
    write_table_file(stem + ext, t, fmt);
    written.push_back(stem + ext);
  }
  return written;
}

std::string exact_number(double v) {
  if (std::isnan(v)) return "nan";
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  char b[32];
  const auto r = std::to_chars(b, b + sizeof b, v); // shortest text that reads back to v
  return std::string(b, r.ptr);
}

std::string delimited_field(const std::string& s, char delimiter) {
  const bool spaced = delimiter == ' ';
  const std::string special = std::string(1, delimiter) + (spaced ? "\"\n\r\t" : "\"\n\r");
  if (s.find_first_of(special) == std::string::npos &&
      (spaced ? !s.empty() : s.empty() || (s.front() != ' ' && s.back() != ' ')))
    return s;
  std::string q = "\"";
  for (char c : s) {
    if (c == '"')
      q += "\"\"";
    else
      q += spaced && (c == '\n' || c == '\r') ? ' ' : c;
  }
  return q + "\"";
}

std::string format_number(double v, int precision) {
  if (std::isnan(v)) return "nan";
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  char b[64];
  std::snprintf(b, sizeof b, "%.*g", precision, v);
  return b;
}

namespace {

// Units and numbers as LaTeX: "Msun/pc^3" -> "M$_\odot$/pc$^{3}$", 1.5e+10 -> 1.5\times10^{10}.
std::string latex_unit(const std::string& u) {
  std::string out;
  for (std::size_t i = 0; i < u.size(); ++i) {
    if (u.compare(i, 4, "Msun") == 0) {
      out += "M$_\\odot$";
      i += 3;
    } else if (u[i] == '^') {
      std::size_t j = i + 1;
      while (j < u.size() && (std::isdigit(static_cast<unsigned char>(u[j])) || u[j] == '-'))
        ++j;
      out += "$^{" + u.substr(i + 1, j - i - 1) + "}$";
      i = j - 1;
    } else {
      out += u[i];
    }
  }
  return out;
}

std::string latex_number(const std::string& s) {
  const auto e = s.find('e');
  if (e == std::string::npos) return s;
  const int ex = std::stoi(s.substr(e + 1));
  return s.substr(0, e) + "\\times10^{" + std::to_string(ex) + "}";
}

std::string latex_text(const std::string& s) {
  std::string o;
  for (char c : s) {
    if (c == '_' || c == '&' || c == '%' || c == '#') o += '\\';
    o += c;
  }
  return o;
}

std::string header(const Column& c, bool latex) {
  if (latex)
    return (c.latex.empty() ? c.name : "$" + c.latex + "$") +
           (c.unit.empty() ? "" : " (" + latex_unit(c.unit) + ")");
  return (c.plain.empty() ? c.name : c.plain) + (c.unit.empty() ? "" : " [" + c.unit + "]");
}

} // namespace

void write_table(std::ostream& os, const Table& t, TableFormat f) {
  const bool labels = t.has_text_columns();
  const auto cell = [&](std::size_t r, std::size_t c) {
    return format_number(t.rows[r][c], t.columns[c].precision);
  };
  switch (f) {
  case TableFormat::csv: // every digit: the numbers read back to the same doubles
    if (!t.title.empty()) os << "# " << t.title << "\n";
    for (const auto& n : t.notes)
      os << "# " << n << "\n";
    if (labels)
      for (const auto& h : t.text_headers)
        os << delimited_field(h, ',') << ",";
    for (std::size_t c = 0; c < t.columns.size(); ++c)
      os << (c ? "," : "") << delimited_field(t.columns[c].name, ',');
    os << "\n";
    for (std::size_t r = 0; r < t.rows.size(); ++r) {
      if (labels)
        for (const auto& x : t.text_rows[r])
          os << delimited_field(x, ',') << ",";
      for (std::size_t c = 0; c < t.columns.size(); ++c)
        os << (c ? "," : "") << exact_number(t.rows[r][c]);
      os << "\n";
    }
    break;
  case TableFormat::ecsv:
    write_table_ecsv(os, t);
    break;
  case TableFormat::fits:
    throw InputError("a FITS table is binary: write it to a file (-o FILE)");
  case TableFormat::markdown:
    if (!t.title.empty()) os << "**" << t.title << "**\n\n";
    os << "|";
    if (labels)
      for (const auto& h : t.text_headers)
        os << " " << h << " |";
    for (const auto& c : t.columns)
      os << " " << header(c, false) << " |";
    os << "\n|";
    if (labels)
      for (std::size_t k = 0; k < t.text_headers.size(); ++k)
        os << ":---|";
    for (std::size_t c = 0; c < t.columns.size(); ++c)
      os << "---:|";
    os << "\n";
    for (std::size_t r = 0; r < t.rows.size(); ++r) {
      os << "|";
      if (labels)
        for (const auto& x : t.text_rows[r])
          os << " " << x << " |";
      for (std::size_t c = 0; c < t.columns.size(); ++c) // no value: a dash, for people
        os << " " << (std::isnan(t.rows[r][c]) ? "—" : cell(r, c)) << " |";
      os << "\n";
    }
    if (!t.notes.empty()) os << "\n";
    for (const auto& n : t.notes)
      os << n << "\n";
    break;
  case TableFormat::latex:
    os << "% " << t.title << "\n\\begin{tabular}{" << (labels ? std::string(t.text_headers.size(), 'l') : "")
       << std::string(t.columns.size(), 'r') << "}\n\\toprule\n";
    if (labels)
      for (const auto& h : t.text_headers)
        os << latex_text(h) << " & ";
    for (std::size_t c = 0; c < t.columns.size(); ++c)
      os << (c ? " & " : "") << header(t.columns[c], true);
    os << " \\\\\n\\midrule\n";
    for (std::size_t r = 0; r < t.rows.size(); ++r) {
      if (labels)
        for (const auto& x : t.text_rows[r])
          os << latex_text(x) << " & ";
      for (std::size_t c = 0; c < t.columns.size(); ++c)
        os << (c ? " & " : "")
           << (std::isnan(t.rows[r][c]) ? "---" : "$" + latex_number(cell(r, c)) + "$");
      os << " \\\\\n";
    }
    os << "\\bottomrule\n\\end{tabular}\n";
    for (const auto& n : t.notes)
      os << "% " << n << "\n";
    break;
  }
}

} // namespace undertow::io

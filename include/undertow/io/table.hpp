#pragma once
// One table model for every table undertow writes: columns carry a name, a symbol and a unit;
// writers render it as CSV, ECSV, FITS (table_fits.hpp), Markdown or LaTeX (booktabs). CSV, ECSV
// and FITS keep every digit (the numbers read back to the same doubles); Markdown and LaTeX,
// which people read, round to each column's precision.
#include <ostream>
#include <string>
#include <vector>

namespace undertow::io {

struct Column {
  std::string name;  // machine name, used as the CSV header: e.g. "vc_kms"
  std::string latex; // LaTeX symbol (math mode): e.g. "v_{c}", "\\kappa"
  std::string plain; // symbol for plain text and Markdown: e.g. "v_c", "κ"
  std::string unit;  // e.g. "km/s"; empty for dimensionless
  int precision = 6; // significant digits in Markdown and LaTeX
};

struct Table {
  std::string title;
  std::vector<Column> columns;
  std::vector<std::vector<double>> rows;
  // Text columns before the numbers ("name"; "subset", "component"): their headers, and per row
  // one text for each (text_rows[r][k] under text_headers[k]).
  std::vector<std::string> text_headers;
  std::vector<std::vector<std::string>> text_rows;
  std::vector<std::string> notes; // printed under the table (Markdown, LaTeX) or as # lines (CSV)

  void add_row(std::vector<double> row);
  // A row with its texts, one per text header.
  void add_row(std::vector<std::string> texts, std::vector<double> row);
  // Whether the text columns are written: headers set and every row has its texts.
  bool has_text_columns() const {
    return !text_headers.empty() && text_rows.size() == rows.size();
  }
  // The texts of text column k, one per row.
  std::vector<std::string> text_column(std::size_t k) const;
};

enum class TableFormat { csv, ecsv, markdown, latex, fits };
TableFormat table_format_from_name(const std::string& name); // throws InputError
// A machine-readable format by a file's extension: .ecsv, .fits (.fit, .fts), else CSV.
TableFormat machine_format_of_path(const std::string& path);
// The names table_format_from_name knows, for command-line checks.
inline std::vector<std::string> table_format_names() {
  return {"csv", "ecsv", "fits", "markdown", "md", "latex", "tex"};
}

// Text formats; FITS, which is binary, throws InputError (write it to a file).
void write_table(std::ostream& os, const Table& t, TableFormat f);
// One file in format f, atomically.
void write_table_file(const std::string& path, const Table& t, TableFormat f);
// Writes <stem>.csv, .ecsv, .md, .tex and .fits, each atomically; returns their paths.
std::vector<std::string> write_table_files(const std::string& stem, const Table& t);
std::string format_number(double v, int precision);
// The shortest text that reads back to v exactly ("nan", "inf", "-inf" for those).
std::string exact_number(double v);
// A field of delimited text (RFC 4180, with ',' or, as in ECSV's body, ' ' between fields):
// quoted, with quotes doubled, when it holds the delimiter, a quote, a line break or a leading or
// trailing space, or, space-delimited, a tab or nothing. Space-delimited rows are one line each,
// so a line break there becomes a space.
std::string delimited_field(const std::string& s, char delimiter);

} // namespace undertow::io

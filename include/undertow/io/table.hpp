#pragma once
// One table model for every table undertow writes: columns carry a name, a symbol and a unit;
// writers render it as CSV, Markdown or LaTeX (booktabs) without changing a number.
#include <ostream>
#include <string>
#include <vector>

namespace undertow::io {

struct Column {
  std::string name;  // machine name, used as the CSV header: e.g. "vc_kms"
  std::string latex; // LaTeX symbol (math mode): e.g. "v_{c}", "\\kappa"
  std::string plain; // symbol for plain text and Markdown: e.g. "v_c", "κ"
  std::string unit;  // e.g. "km/s"; empty for dimensionless
  int precision = 6; // significant digits
};

struct Table {
  std::string title;
  std::vector<Column> columns;
  std::vector<std::vector<double>> rows;
  std::string label_header;            // when set, a first text column ("name", "group")
  std::vector<std::string> row_labels; // one per row
  std::vector<std::string> notes; // printed under the table (Markdown, LaTeX) or as # lines (CSV)

  void add_row(std::vector<double> row);
};

enum class TableFormat { csv, markdown, latex };
TableFormat table_format_from_name(const std::string& name); // throws InputError

void write_table(std::ostream& os, const Table& t, TableFormat f);
// Writes <stem>.csv, <stem>.md and <stem>.tex, each atomically; returns their paths.
std::vector<std::string> write_table_files(const std::string& stem, const Table& t);
std::string format_number(double v, int precision);

} // namespace undertow::io

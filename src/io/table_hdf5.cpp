#include "undertow/io/table_hdf5.hpp"

namespace undertow::io {

void write_table_group(const h5::File& f, const std::string& group, const Table& t) {
  auto g = h5::create_group(f, group);
  h5::set_attr(f, g.id(), "title", t.title);
  std::string notes;
  for (const auto& n : t.notes)
    notes += n + "\n";
  h5::set_attr(f, g.id(), "notes", notes);
  if (t.has_text_columns())
    for (std::size_t k = 0; k < t.text_headers.size(); ++k)
      h5::write_strings(f, g.id(), t.text_headers[k], t.text_column(k), "row labels");
  for (std::size_t c = 0; c < t.columns.size(); ++c) {
    std::vector<double> col;
    for (const auto& r : t.rows)
      col.push_back(r[c]);
    h5::write_doubles(f, g.id(), t.columns[c].name, col, 1, t.columns[c].unit, t.columns[c].plain);
  }
}

} // namespace undertow::io

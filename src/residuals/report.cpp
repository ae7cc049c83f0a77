#include "undertow/residuals/report.hpp"

#include "undertow/io/table_hdf5.hpp"

namespace undertow::residuals {

std::vector<std::string> write_report(const std::string& prefix, const ResidualResult& r,
                                      const std::vector<Summary>& s, const std::string& settings) {
  io::Table src = source_table(r), sum = summary_table(s);
  for (const auto& e : r.excluded)
    sum.notes.push_back("left out: " + e);
  for (const auto& w : r.warnings)
    sum.notes.push_back("warning: " + w);
  sum.notes.push_back("settings: " + settings);
  std::vector<std::string> written = io::write_table_files(prefix + "-sources", src);
  for (auto& f : io::write_table_files(prefix + "-summary", sum))
    written.push_back(f);
  io::h5::File::write_atomically(prefix + ".h5", [&](const io::h5::File& f) {
    io::h5::set_attr(f, f.id(), "undertow_format", std::string("residuals"));
    io::h5::set_attr(f, f.id(), "tool_version", std::string(UNDERTOW_VERSION));
    io::h5::set_attr(f, f.id(), "settings", settings);
    io::write_table_group(f, "sources", src);
    io::write_table_group(f, "summary", sum);
  });
  written.push_back(prefix + ".h5");
  return written;
}

} // namespace undertow::residuals

#include "undertow/residuals/report.hpp"

#include "undertow/io/atomic_file.hpp"
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
  std::vector<std::string> written;
  const std::pair<const char*, io::TableFormat> formats[] = {{".csv", io::TableFormat::csv},
                                                             {".md", io::TableFormat::markdown},
                                                             {".tex", io::TableFormat::latex}};
  for (const auto& [name, table] : {std::pair{"-sources", &src}, std::pair{"-summary", &sum}})
    for (const auto& [ext, fmt] : formats) {
      const std::string path = prefix + name + ext;
      io::AtomicFile f(path);
      io::write_table(f.stream(), *table, fmt);
      f.commit();
      written.push_back(path);
    }
  // the HDF5 file is built in memory and written with checked I/O (see io/snapshot.cpp)
  std::vector<char> bytes;
  {
    const auto f = io::h5::File::create_in_memory(prefix + ".h5");
    io::h5::set_attr(f, f.id(), "undertow_format", std::string("residuals"));
    io::h5::set_attr(f, f.id(), "tool_version", std::string(UNDERTOW_VERSION));
    io::h5::set_attr(f, f.id(), "settings", settings);
    io::write_table_group(f, "sources", src);
    io::write_table_group(f, "summary", sum);
    bytes = f.image();
  }
  io::AtomicFile h(prefix + ".h5");
  h.stream().write(bytes.data(), std::streamsize(bytes.size()));
  h.commit();
  written.push_back(prefix + ".h5");
  return written;
}

} // namespace undertow::residuals

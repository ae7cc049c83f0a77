#pragma once
// What a figure reads: datasets of undertow's HDF5 outputs, with errors that name the file, the
// missing dataset and the figure that needs it.
#include <string>
#include <vector>

#include "undertow/io/hdf5.hpp"

namespace undertow::plot {

class H5Input {
public:
  // figure: the figure's name, for the error message.
  H5Input(const std::string& path, std::string figure);
  bool has(const std::string& dataset) const; // "group/name", every level checked
  std::vector<double> doubles(const std::string& dataset, std::size_t cols = 1,
                              std::size_t* rows = nullptr) const;
  std::vector<std::string> strings(const std::string& dataset) const;
  // The same, required to have `rows` rows (as another dataset it is read beside).
  std::vector<double> doubles_n(const std::string& dataset, std::size_t rows) const;
  std::string attribute(const std::string& object, const std::string& name) const;
  const std::string& path() const { return file_.path(); }
  const io::h5::File& file() const { return file_; }

private:
  [[noreturn]] void missing(const std::string& dataset) const;
  io::h5::File file_;
  std::string figure_;
};

} // namespace undertow::plot

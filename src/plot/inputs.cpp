#include "undertow/plot/inputs.hpp"

#include <filesystem>

#include "undertow/error.hpp"

namespace undertow::plot {
namespace {
io::h5::File open(const std::string& path, const std::string& figure) {
  if (!std::filesystem::is_regular_file(path))
    throw InputError(path + ": no such file (figure '" + figure + "' needs it)");
  return io::h5::File::open_read(path);
}
} // namespace

H5Input::H5Input(const std::string& path, std::string figure)
    : file_(open(path, figure)), figure_(std::move(figure)) {}

bool H5Input::has(const std::string& dataset) const {
  std::size_t pos = 0;
  while (true) {
    pos = dataset.find('/', pos + 1);
    const std::string part = dataset.substr(0, pos);
    if (!io::h5::exists(file_, part)) return false;
    if (pos == std::string::npos) return true;
  }
}

void H5Input::missing(const std::string& dataset) const {
  throw InputError(file_.path() + ": no dataset /" + dataset + " (figure '" + figure_ +
                   "' needs it)");
}

std::vector<double> H5Input::doubles(const std::string& dataset, std::size_t cols,
                                     std::size_t* rows) const {
  if (!has(dataset)) missing(dataset);
  return io::h5::read_doubles(file_, file_.id(), dataset, cols, rows);
}

std::vector<double> H5Input::doubles_n(const std::string& dataset, std::size_t rows) const {
  auto v = doubles(dataset);
  if (v.size() != rows)
    throw InputError(file_.path() + ": /" + dataset + " has " + std::to_string(v.size()) +
                     " rows, not " + std::to_string(rows) +
                     " like the datasets beside it (figure '" + figure_ + "')");
  return v;
}

std::vector<std::string> H5Input::strings(const std::string& dataset) const {
  if (!has(dataset)) missing(dataset);
  return io::h5::read_strings(file_, file_.id(), dataset);
}

std::string H5Input::attribute(const std::string& object, const std::string& name) const {
  if (!has(object)) missing(object);
  io::h5::Handle o(H5Oopen(file_.id(), object.c_str(), H5P_DEFAULT), H5Oclose);
  if (!io::h5::has_attr(o.id(), name))
    throw InputError(file_.path() + ": /" + object + " has no attribute '" + name + "' (figure '" +
                     figure_ + "' needs it)");
  return io::h5::get_attr_string(file_, o.id(), name);
}

} // namespace undertow::plot

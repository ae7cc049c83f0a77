#include "undertow/io/hdf5.hpp"

#include <algorithm>

#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"

namespace undertow::io::h5 {
namespace {

[[noreturn]] void fail(const File& f, const std::string& what) {
  throw InputError(SourcePlace{f.path(), 0, 0, {}}, what);
}
hid_t check(hid_t id, const File& f, const std::string& what) {
  if (id < 0) fail(f, what);
  return id;
}
void check(herr_t rc, const File& f, const std::string& what, int) {
  if (rc < 0) fail(f, what);
}

Handle string_type() {
  hid_t t = H5Tcopy(H5T_C_S1);
  H5Tset_size(t, H5T_VARIABLE);
  H5Tset_cset(t, H5T_CSET_UTF8);
  return Handle(t, H5Tclose);
}

void write_units(const File& f, hid_t ds, const std::string& units, const std::string& desc) {
  if (!units.empty()) set_attr(f, ds, "units", units);
  if (!desc.empty()) set_attr(f, ds, "description", desc);
}

template <class T>
void write_array(const File& f, hid_t parent, const std::string& name, const T* data,
                 std::size_t rows, std::size_t cols, hid_t mem_type, hid_t file_type) {
  hsize_t dims[2] = {rows, cols};
  const int rank = cols > 1 ? 2 : 1;
  Handle space(check(H5Screate_simple(rank, dims, nullptr), f, "cannot make a dataspace"),
               H5Sclose);
  Handle plist(H5Pcreate(H5P_DATASET_CREATE), H5Pclose);
  H5Pset_obj_track_times(plist.id(), false); // no clock in the file: same data, same bytes
  if (rows > 0) {
    hsize_t chunk[2] = {std::min<hsize_t>(rows, 65536), cols};
    H5Pset_chunk(plist.id(), rank, chunk);
    H5Pset_shuffle(plist.id());
    H5Pset_deflate(plist.id(), 4);
  }
  Handle ds(check(H5Dcreate2(parent, name.c_str(), file_type, space.id(), H5P_DEFAULT, plist.id(),
                             H5P_DEFAULT),
                  f, "cannot create dataset " + name),
            H5Dclose);
  if (rows > 0)
    check(H5Dwrite(ds.id(), mem_type, H5S_ALL, H5S_ALL, H5P_DEFAULT, data), f,
          "cannot write dataset " + name + " (disk full?)", 0);
}

template <class T>
std::vector<T> read_array(const File& f, hid_t parent, const std::string& name, hid_t mem_type,
                          std::size_t expect_cols, std::size_t* rows_out) {
  if (H5Lexists(parent, name.c_str(), H5P_DEFAULT) <= 0) fail(f, "missing dataset '" + name + "'");
  Handle ds(check(H5Dopen2(parent, name.c_str(), H5P_DEFAULT), f, "cannot open dataset " + name),
            H5Dclose);
  Handle space(H5Dget_space(ds.id()), H5Sclose);
  const int rank = H5Sget_simple_extent_ndims(space.id());
  hsize_t dims[2] = {0, 1};
  if (rank < 1 || rank > 2) fail(f, "dataset '" + name + "' has rank " + std::to_string(rank));
  H5Sget_simple_extent_dims(space.id(), dims, nullptr);
  const std::size_t cols = rank == 2 ? dims[1] : 1;
  if (cols != expect_cols)
    fail(f, "dataset '" + name + "' has " + std::to_string(cols) + " columns, expected " +
                std::to_string(expect_cols));
  std::vector<T> out(dims[0] * cols);
  if (!out.empty())
    check(H5Dread(ds.id(), mem_type, H5S_ALL, H5S_ALL, H5P_DEFAULT, out.data()), f,
          "cannot read dataset " + name, 0);
  if (rows_out) *rows_out = dims[0];
  return out;
}

} // namespace

Handle& Handle::operator=(Handle&& o) noexcept {
  if (this != &o) {
    if (id_ >= 0 && close_) close_(id_);
    id_ = o.id_;
    close_ = o.close_;
    o.id_ = -1;
  }
  return *this;
}
Handle::~Handle() {
  if (id_ >= 0 && close_) close_(id_);
}

void quiet() {
  H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr);
}

File File::create_in_memory(const std::string& name) {
  quiet();
  File f;
  f.path_ = name;
  Handle fapl(H5Pcreate(H5P_FILE_ACCESS), H5Pclose);
  Handle fcpl(H5Pcreate(H5P_FILE_CREATE), H5Pclose);
  H5Pset_obj_track_times(fcpl.id(), false); // for the root group
  H5Pset_fapl_core(fapl.id(), 16 << 20, 0);
  f.h_ = Handle(check(H5Fcreate(name.c_str(), H5F_ACC_TRUNC, fcpl.id(), fapl.id()), f,
                      "cannot create an HDF5 file in memory"),
                H5Fclose);
  return f;
}

std::vector<char> File::image() const {
  flush();
  const ssize_t n = H5Fget_file_image(h_.id(), nullptr, 0);
  if (n < 0) fail(*this, "cannot get the file image");
  std::vector<char> buf(static_cast<std::size_t>(n));
  if (H5Fget_file_image(h_.id(), buf.data(), buf.size()) < 0)
    fail(*this, "cannot get the file image");
  return buf;
}

void write_bytes_atomically(const std::string& path, const std::vector<char>& bytes) {
  AtomicFile out(path);
  out.stream().write(bytes.data(), std::streamsize(bytes.size()));
  out.commit();
}

File File::open_read(const std::string& path) {
  quiet();
  File f;
  f.path_ = path;
  f.h_ = Handle(
      check(H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT), f, "cannot open as an HDF5 file"),
      H5Fclose);
  return f;
}

void File::flush() const {
  check(H5Fflush(h_.id(), H5F_SCOPE_GLOBAL), *this, "flush failed (disk full?)", 0);
}

Handle create_group(const File& f, const std::string& name) {
  Handle gcpl(H5Pcreate(H5P_GROUP_CREATE), H5Pclose);
  H5Pset_obj_track_times(gcpl.id(), false);
  return Handle(check(H5Gcreate2(f.id(), name.c_str(), H5P_DEFAULT, gcpl.id(), H5P_DEFAULT), f,
                      "cannot create group " + name),
                H5Gclose);
}

Handle open_group(const File& f, const std::string& name) {
  if (!exists(f, name)) fail(f, "missing group '" + name + "'");
  return Handle(check(H5Gopen2(f.id(), name.c_str(), H5P_DEFAULT), f, "cannot open group " + name),
                H5Gclose);
}

bool exists(const File& f, const std::string& name) {
  return H5Lexists(f.id(), name.c_str(), H5P_DEFAULT) > 0;
}

std::vector<std::string> children(const File& f, const std::string& group) {
  Handle g = open_group(f, group);
  H5G_info_t info;
  H5Gget_info(g.id(), &info);
  std::vector<std::string> names;
  for (hsize_t i = 0; i < info.nlinks; ++i) {
    const ssize_t len =
        H5Lget_name_by_idx(g.id(), ".", H5_INDEX_NAME, H5_ITER_INC, i, nullptr, 0, H5P_DEFAULT);
    std::string s(std::size_t(len), '\0');
    H5Lget_name_by_idx(g.id(), ".", H5_INDEX_NAME, H5_ITER_INC, i, s.data(), std::size_t(len) + 1,
                       H5P_DEFAULT);
    names.push_back(s);
  }
  std::sort(names.begin(), names.end());
  return names;
}

void set_attr(const File& f, hid_t obj, const std::string& name, const std::string& value) {
  Handle t = string_type();
  Handle space(H5Screate(H5S_SCALAR), H5Sclose);
  Handle a(check(H5Acreate2(obj, name.c_str(), t.id(), space.id(), H5P_DEFAULT, H5P_DEFAULT), f,
                 "cannot create attribute " + name),
           H5Aclose);
  const char* p = value.c_str();
  check(H5Awrite(a.id(), t.id(), &p), f, "cannot write attribute " + name, 0);
}

namespace {
template <class T>
void set_scalar(const File& f, hid_t obj, const std::string& name, T v, hid_t type) {
  Handle space(H5Screate(H5S_SCALAR), H5Sclose);
  Handle a(check(H5Acreate2(obj, name.c_str(), type, space.id(), H5P_DEFAULT, H5P_DEFAULT), f,
                 "cannot create attribute " + name),
           H5Aclose);
  check(H5Awrite(a.id(), type, &v), f, "cannot write attribute " + name, 0);
}
Handle open_attr(const File& f, hid_t obj, const std::string& name) {
  if (H5Aexists(obj, name.c_str()) <= 0) fail(f, "missing attribute '" + name + "'");
  return Handle(H5Aopen(obj, name.c_str(), H5P_DEFAULT), H5Aclose);
}
} // namespace

void set_attr(const File& f, hid_t obj, const std::string& name, double v) {
  set_scalar(f, obj, name, v, H5T_NATIVE_DOUBLE);
}
void set_attr(const File& f, hid_t obj, const std::string& name, std::int64_t v) {
  set_scalar(f, obj, name, v, H5T_NATIVE_INT64);
}
void set_attr(const File& f, hid_t obj, const std::string& name, std::uint64_t v) {
  set_scalar(f, obj, name, v, H5T_NATIVE_UINT64);
}

bool has_attr(hid_t obj, const std::string& name) {
  return H5Aexists(obj, name.c_str()) > 0;
}

std::string get_attr_string(const File& f, hid_t obj, const std::string& name) {
  Handle a = open_attr(f, obj, name);
  Handle t = string_type();
  char* p = nullptr;
  check(H5Aread(a.id(), t.id(), &p), f, "cannot read attribute " + name, 0);
  std::string s = p ? p : "";
  H5free_memory(p);
  return s;
}
double get_attr_double(const File& f, hid_t obj, const std::string& name) {
  Handle a = open_attr(f, obj, name);
  double v = 0;
  check(H5Aread(a.id(), H5T_NATIVE_DOUBLE, &v), f, "cannot read attribute " + name, 0);
  return v;
}
std::int64_t get_attr_int(const File& f, hid_t obj, const std::string& name) {
  Handle a = open_attr(f, obj, name);
  std::int64_t v = 0;
  check(H5Aread(a.id(), H5T_NATIVE_INT64, &v), f, "cannot read attribute " + name, 0);
  return v;
}

void write_doubles(const File& f, hid_t parent, const std::string& name,
                   const std::vector<double>& data, std::size_t cols, const std::string& units,
                   const std::string& description) {
  write_array(f, parent, name, data.data(), data.size() / cols, cols, H5T_NATIVE_DOUBLE,
              H5T_IEEE_F64LE);
  Handle ds(H5Dopen2(parent, name.c_str(), H5P_DEFAULT), H5Dclose);
  write_units(f, ds.id(), units, description);
}
void write_u64(const File& f, hid_t parent, const std::string& name,
               const std::vector<std::uint64_t>& data, const std::string& description,
               std::size_t cols) {
  write_array(f, parent, name, data.data(), data.size() / cols, cols, H5T_NATIVE_UINT64,
              H5T_STD_U64LE);
  Handle ds(H5Dopen2(parent, name.c_str(), H5P_DEFAULT), H5Dclose);
  write_units(f, ds.id(), "", description);
}
void write_u32(const File& f, hid_t parent, const std::string& name,
               const std::vector<std::uint32_t>& data, const std::string& description) {
  write_array(f, parent, name, data.data(), data.size(), 1, H5T_NATIVE_UINT32, H5T_STD_U32LE);
  Handle ds(H5Dopen2(parent, name.c_str(), H5P_DEFAULT), H5Dclose);
  write_units(f, ds.id(), "", description);
}

void write_strings(const File& f, hid_t parent, const std::string& name,
                   const std::vector<std::string>& data, const std::string& description) {
  Handle t = string_type();
  hsize_t dims[1] = {data.size()};
  Handle space(H5Screate_simple(1, dims, nullptr), H5Sclose);
  Handle plist(H5Pcreate(H5P_DATASET_CREATE), H5Pclose);
  H5Pset_obj_track_times(plist.id(), false);
  Handle ds(check(H5Dcreate2(parent, name.c_str(), t.id(), space.id(), H5P_DEFAULT, plist.id(),
                             H5P_DEFAULT),
                  f, "cannot create dataset " + name),
            H5Dclose);
  std::vector<const char*> p;
  for (const auto& x : data)
    p.push_back(x.c_str());
  if (!p.empty())
    check(H5Dwrite(ds.id(), t.id(), H5S_ALL, H5S_ALL, H5P_DEFAULT, p.data()), f,
          "cannot write dataset " + name, 0);
  write_units(f, ds.id(), "", description);
}

std::vector<double> read_doubles(const File& f, hid_t parent, const std::string& name,
                                 std::size_t expect_cols, std::size_t* rows) {
  return read_array<double>(f, parent, name, H5T_NATIVE_DOUBLE, expect_cols, rows);
}
std::vector<std::uint64_t> read_u64(const File& f, hid_t parent, const std::string& name,
                                    std::size_t expect_cols) {
  return read_array<std::uint64_t>(f, parent, name, H5T_NATIVE_UINT64, expect_cols, nullptr);
}
std::vector<std::uint32_t> read_u32(const File& f, hid_t parent, const std::string& name) {
  return read_array<std::uint32_t>(f, parent, name, H5T_NATIVE_UINT32, 1, nullptr);
}
std::vector<std::string> read_strings(const File& f, hid_t parent, const std::string& name) {
  if (H5Lexists(parent, name.c_str(), H5P_DEFAULT) <= 0) fail(f, "missing dataset '" + name + "'");
  Handle ds(check(H5Dopen2(parent, name.c_str(), H5P_DEFAULT), f, "cannot open dataset " + name),
            H5Dclose);
  Handle space(H5Dget_space(ds.id()), H5Sclose);
  if (H5Sget_simple_extent_ndims(space.id()) != 1) fail(f, name + " is not a list of strings");
  hsize_t n = 0;
  H5Sget_simple_extent_dims(space.id(), &n, nullptr);
  Handle stored(H5Dget_type(ds.id()), H5Tclose);
  if (H5Tget_class(stored.id()) != H5T_STRING || H5Tis_variable_str(stored.id()) <= 0)
    fail(f, name + " is not a dataset of variable-length strings");
  std::vector<char*> p(n, nullptr);
  Handle t = string_type();
  if (n > 0)
    check(H5Dread(ds.id(), t.id(), H5S_ALL, H5S_ALL, H5P_DEFAULT, p.data()), f,
          "cannot read dataset " + name, 0);
  std::vector<std::string> out;
  out.reserve(n);
  for (char* c : p)
    out.emplace_back(c ? c : "");
  if (n > 0) H5Dvlen_reclaim(t.id(), space.id(), H5P_DEFAULT, p.data());
  return out;
}

std::string dataset_units(const File& f, hid_t parent, const std::string& name) {
  Handle ds(check(H5Dopen2(parent, name.c_str(), H5P_DEFAULT), f, "cannot open dataset " + name),
            H5Dclose);
  return has_attr(ds.id(), "units") ? get_attr_string(f, ds.id(), "units") : "";
}

} // namespace undertow::io::h5

#pragma once
// A thin RAII layer over the HDF5 C API: files, groups, attributes (with variable-length
// strings, which h5py reads as str), and chunked, compressed datasets carrying a "units"
// attribute. Every failure becomes an InputError naming the file and the object.
#include <cstdint>
#include <string>
#include <vector>

#include <hdf5.h>

namespace undertow::io::h5 {

class Handle {
public:
  Handle() = default;
  Handle(hid_t id, herr_t (*close)(hid_t)) : id_(id), close_(close) {}
  Handle(Handle&& o) noexcept : id_(o.id_), close_(o.close_) { o.id_ = -1; }
  Handle& operator=(Handle&& o) noexcept;
  Handle(const Handle&) = delete;
  Handle& operator=(const Handle&) = delete;
  ~Handle();
  hid_t id() const { return id_; }
  explicit operator bool() const { return id_ >= 0; }

private:
  hid_t id_ = -1;
  herr_t (*close_)(hid_t) = nullptr;
};

class File {
public:
  // A file built in memory (HDF5 core driver); image() returns its bytes, which the caller
  // writes with checked I/O. A full disk then never leaves HDF5 with a file it cannot close.
  static File create_in_memory(const std::string& name);
  std::vector<char> image() const;
  // Builds a file in memory with build(file) and writes its bytes to path atomically
  // (io::AtomicFile): a full disk or a write error leaves nothing behind.
  template <class F> static void write_atomically(const std::string& path, F&& build);
  static File open_read(const std::string& path);
  const std::string& path() const { return path_; }
  hid_t id() const { return h_.id(); }
  void flush() const;

private:
  Handle h_;
  std::string path_;
};

Handle create_group(const File& f, const std::string& name);
Handle open_group(const File& f, const std::string& name);
bool exists(const File& f, const std::string& name);
std::vector<std::string> children(const File& f, const std::string& group);

void set_attr(const File& f, hid_t obj, const std::string& name, const std::string& value);
void set_attr(const File& f, hid_t obj, const std::string& name, double value);
void set_attr(const File& f, hid_t obj, const std::string& name, std::int64_t value);
void set_attr(const File& f, hid_t obj, const std::string& name, std::uint64_t value);
std::string get_attr_string(const File& f, hid_t obj, const std::string& name);
double get_attr_double(const File& f, hid_t obj, const std::string& name);
std::int64_t get_attr_int(const File& f, hid_t obj, const std::string& name);
bool has_attr(hid_t obj, const std::string& name);

// Datasets of shape (rows) or (rows, cols), row-major, chunked and deflate-compressed, with
// attributes "units" and "description".
void write_doubles(const File& f, hid_t parent, const std::string& name,
                   const std::vector<double>& data, std::size_t cols, const std::string& units,
                   const std::string& description);
void write_u64(const File& f, hid_t parent, const std::string& name,
               const std::vector<std::uint64_t>& data, const std::string& description,
               std::size_t cols = 1);
void write_u32(const File& f, hid_t parent, const std::string& name,
               const std::vector<std::uint32_t>& data, const std::string& description);
std::vector<double> read_doubles(const File& f, hid_t parent, const std::string& name,
                                 std::size_t expect_cols, std::size_t* rows = nullptr);
std::vector<std::uint64_t> read_u64(const File& f, hid_t parent, const std::string& name,
                                    std::size_t expect_cols = 1);
std::vector<std::uint32_t> read_u32(const File& f, hid_t parent, const std::string& name);
std::vector<std::string> read_strings(const File& f, hid_t parent, const std::string& name);
std::string dataset_units(const File& f, hid_t parent, const std::string& name);

void write_strings(const File& f, hid_t parent, const std::string& name,
                   const std::vector<std::string>& data, const std::string& description);

void write_bytes_atomically(const std::string& path, const std::vector<char>& bytes);

template <class F> void File::write_atomically(const std::string& path, F&& build) {
  std::vector<char> bytes;
  {
    const auto f = create_in_memory(path);
    build(f);
    bytes = f.image();
  }
  write_bytes_atomically(path, bytes);
}

// Turns HDF5's own error printing off for this process (we report errors ourselves).
void quiet();

} // namespace undertow::io::h5

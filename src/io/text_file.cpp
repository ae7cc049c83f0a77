#include "undertow/io/text_file.hpp"

#include <fstream>
#include <sstream>

#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"

namespace undertow::io {

std::string read_text_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(SourcePlace{path, 0, 0, {}}, "cannot open file");
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

void write_text_file(const std::string& path, const std::string& text) {
  AtomicFile f(path);
  f.stream() << text;
  f.commit();
}

} // namespace undertow::io

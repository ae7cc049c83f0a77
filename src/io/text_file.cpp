#include "undertow/io/text_file.hpp"

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"

namespace undertow::io {

std::string read_text_file(const std::string& path) {
  return checked_text(read_file_bytes(path), path);
}

std::string read_file_bytes(const std::string& path) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec))
    throw InputError(SourcePlace{path, 0, 0, {}}, "is a folder, not a file");
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(SourcePlace{path, 0, 0, {}}, "cannot open file");
  std::stringstream ss;
  ss << in.rdbuf();
  if (in.bad()) throw InputError(SourcePlace{path, 0, 0, {}}, "cannot read file");
  return std::move(ss).str();
}

std::string checked_text(std::string text, const std::string& file) {
  if (text.rfind("\xEF\xBB\xBF", 0) == 0) text.erase(0, 3);
  int line = 1, column = 0;
  for (const char ch : text) {
    const auto c = static_cast<unsigned char>(ch);
    ++column;
    if (c == '\n') {
      ++line, column = 0;
      continue;
    }
    if ((c < 0x20 && c != '\t' && c != '\r') || c == 0x7f) {
      char code[8];
      std::snprintf(code, sizeof code, "0x%02X", unsigned(c));
      throw InputError(SourcePlace{file, line, column, {}}, std::string("control character ") +
                                                                code + (c == 0 ? " (NUL)" : "") +
                                                                " in the text");
    }
  }
  return text;
}

void write_text_file(const std::string& path, const std::string& text) {
  AtomicFile f(path);
  f.stream() << text;
  f.commit();
}

} // namespace undertow::io

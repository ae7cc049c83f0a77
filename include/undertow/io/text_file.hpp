#pragma once
// Whole text files: read in one piece (InputError naming the file if it cannot be opened), and
// written atomically (io::AtomicFile).
#include <string>

namespace undertow::io {

std::string read_text_file(const std::string& path);
void write_text_file(const std::string& path, const std::string& text);

} // namespace undertow::io

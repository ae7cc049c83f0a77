#pragma once
// Whole text files: read in one piece and checked (InputError naming the file, and the line and
// column where it applies), and written atomically (io::AtomicFile).
#include <string>

namespace undertow::io {

// The file's text, with a leading UTF-8 byte-order mark (as spreadsheet programs write) removed.
// Refuses a path that is a folder, a file that cannot be opened, and control characters other
// than tab, line feed and carriage return (a NUL inside a number would otherwise end it early,
// silently): file:line:column.
std::string read_text_file(const std::string& path);
// A file's bytes as they are (undertow's own outputs, binary files); a folder is refused.
std::string read_file_bytes(const std::string& path);
// The same checks on text already in memory; `file` names it in the message.
std::string checked_text(std::string text, const std::string& file);
void write_text_file(const std::string& path, const std::string& text);

} // namespace undertow::io

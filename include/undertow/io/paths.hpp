#pragma once
// File names inside an input file are relative to that file's own folder.
#include <string>

namespace undertow::io {

// p as given when absolute; else p beside `file` (in file's folder), lexically normalised.
std::string path_beside(const std::string& file, const std::string& p);

} // namespace undertow::io

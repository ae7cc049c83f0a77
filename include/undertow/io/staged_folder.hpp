#pragma once
// An output folder that appears whole or not at all: everything is written into a temporary
// folder beside it (".<name>.tmp-<pid>"), which then takes its place; an earlier folder there is
// replaced only once the new one is complete, and on any failure the temporary is removed and the
// earlier folder left as it was.
#include <functional>
#include <string>
#include <vector>

namespace undertow::io {

// Refuses (InputError) an output that is a file, or a non-empty folder without `marker`, the
// file that shows it to be an earlier output of the same command (`what` names it): nothing of
// the user's is ever replaced. Call it before any work; write_folder_atomically calls it again.
void check_replaceable_folder(const std::string& folder, const std::string& marker,
                              const std::string& what);

// write(temporary folder) creates the files and returns their paths; the paths returned here are
// the same files in `folder`.
std::vector<std::string>
write_folder_atomically(const std::string& folder, const std::string& marker,
                        const std::string& what,
                        const std::function<std::vector<std::string>(const std::string&)>& write);

// Files that join a folder (existing, perhaps holding other things, or new) all together or not
// at all: write(temporary folder inside it) creates them and returns their paths; each is then
// renamed into `folder`. On any failure the temporary is removed, and the folder too if this call
// created it. Returns the files' paths in `folder`.
std::vector<std::string>
write_files_together(const std::string& folder,
                     const std::function<std::vector<std::string>(const std::string&)>& write);

} // namespace undertow::io

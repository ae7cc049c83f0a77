#pragma once
// Output files appear whole or not at all: written to a temporary name beside the target and
// renamed into place on commit(); a writer destroyed without commit() removes its temporary.
#include <fstream>
#include <string>

namespace undertow::io {

class AtomicFile {
public:
  explicit AtomicFile(std::string path); // throws InputError if the folder is not writable
  ~AtomicFile();
  AtomicFile(const AtomicFile&) = delete;
  AtomicFile& operator=(const AtomicFile&) = delete;

  std::ostream& stream() { return out_; }
  // Whether a file name is a temporary of this class (".<name>.tmp-<pid>"): one left by a
  // killed process is garbage, never a result.
  static bool is_temporary(const std::string& filename);
  void commit(); // flushes, checks for write errors, renames; throws InputError on failure

private:
  std::string path_, tmp_;
  std::ofstream out_;
  bool done_ = false;
};

} // namespace undertow::io

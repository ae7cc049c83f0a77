#pragma once
// Output files appear whole or not at all: written to a temporary name beside the target and
// renamed into place on commit(); a writer destroyed without commit() removes its temporary.
#include <fstream>
#include <functional>
#include <string>
#include <vector>

namespace undertow::io {

// The temporary name and the rename, for writers that open the file themselves (CFITSIO).
class AtomicPath {
public:
  explicit AtomicPath(std::string path);
  ~AtomicPath(); // removes the temporary unless committed
  AtomicPath(const AtomicPath&) = delete;
  AtomicPath& operator=(const AtomicPath&) = delete;

  const std::string& temporary() const { return tmp_; }
  const std::string& target() const { return path_; }
  // Renames the temporary into place; throws InputError (and removes it) on failure, or when
  // `written` is false (a write error the caller saw).
  void commit(bool written = true);
  // Whether a file name is a temporary of this class (".<name>.tmp-<pid>"): one left by a
  // killed process is garbage, never a result.
  static bool is_temporary(const std::string& filename);
  // The name of this process's temporary for `filename` (".<name>.tmp-<pid>"), and the part before
  // the pid, which every process's temporary for it shares.
  static std::string temporary_name(const std::string& filename);
  static std::string temporary_prefix(const std::string& filename) {
    return "." + filename + ".tmp-";
  }

private:
  std::string path_, tmp_;
  bool done_ = false;
};

class AtomicFile {
public:
  explicit AtomicFile(std::string path); // throws InputError if the folder is not writable
  ~AtomicFile();
  AtomicFile(const AtomicFile&) = delete;
  AtomicFile& operator=(const AtomicFile&) = delete;

  std::ostream& stream() { return out_; }
  static bool is_temporary(const std::string& filename) {
    return AtomicPath::is_temporary(filename);
  }
  void commit(); // flushes, checks for write errors, renames; throws InputError on failure

private:
  AtomicPath path_;
  std::ofstream out_;
};

// An error met while writing a temporary (file or folder), thrown again as an InputError told with
// the path the user asked for.
[[noreturn]] void rethrow_with_path(const std::string& what, const std::string& temporary,
                                    const std::string& target);

// Output files in different places that appear all together or not at all: each writer writes
// its file at the path it is given (a temporary beside its target), and only when every one is
// written are they renamed into place; an error names the target, not the temporary.
struct StagedWrite {
  std::string target;
  std::function<void(const std::string& temporary)> write;
};
void write_files_atomically(const std::vector<StagedWrite>& files);

// Refuses (InputError, one line) an output file path that cannot be written: a folder, a parent
// that is missing, a file or unwritable. Call it before any work, not after hours of it.
void check_output_file(const std::string& path);

// Removes the temporaries (is_temporary) that writers killed mid-write left in `dir` and its
// subfolders: a folder that a run owns, before the run resumes in it.
void remove_stale_temporaries(const std::string& dir);
// The same for one output file's or folder's temporaries beside it (".<name>.tmp-<pid>", and
// ".<name>.old-<pid>", a replaced folder that a killed write_folder_atomically set aside).
void remove_stale_temporaries_of(const std::string& path);

} // namespace undertow::io

// Output paths checked before any work, and the temporaries of a killed writer removed when a
// run starts again in its place (common practice for resumable tools: a temporary is never a
// result).
#include <catch2/catch.hpp>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>

#include "support/input_error.hpp"
#include "support/scratch.hpp"
#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/snapshot.hpp"
#include "undertow/io/staged_folder.hpp"
#include "undertow/run/ensemble.hpp"
#include "undertow/scenario/scenario.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {

scenario::Scenario small_scenario(const fs::path& dir) {
  return scenario::parse_scenario(
      "[run]\nname = \"s\"\nseed = 1\n[galaxy]\nmodel_file = \"" +
          std::string(UNDERTOW_SOURCE_DIR) +
          "/potentials/kestrel-axisymmetric.toml\"\n[tracers]\nsource = \"disk\"\ncount = 50\n"
          "scale_length_kpc = 3\nr_min_kpc = 4\nr_max_kpc = 10\nscale_height_kpc = 0.1\n"
          "sigma_r_kms = 5\nsigma_z_kms = 5\n[integration]\nmethod = \"leapfrog\"\n"
          "end_myr = 10\nstep_myr = 1\n[output]\nevery_myr = 5\n",
      (dir / "s.toml").string());
}

} // namespace

TEST_CASE("output files: a path that cannot be written is refused before any work", "[io]") {
  const auto d = test::scratch("output-check");
  CHECK_NOTHROW(io::check_output_file((d / "out.h5").string()));
  fs::create_directories(d / "a-folder.h5");
  CHECK_THAT(test::input_error_of([&] { io::check_output_file((d / "a-folder.h5").string()); }),
             Catch::Contains("a-folder.h5: is a folder; give the output a file name"));
  CHECK_THAT(
      test::input_error_of([&] { io::check_output_file((d / "missing" / "out.h5").string()); }),
      Catch::Contains("does not exist"));
  std::ofstream(d / "plain") << "x";
  CHECK_THAT(
      test::input_error_of([&] { io::check_output_file((d / "plain" / "out.h5").string()); }),
      Catch::Contains("is a file, not a folder"));
  // integrate to a folder: refused at once, and no parts folder is started
  run::EnsembleOptions o;
  o.output = (d / "a-folder.h5").string();
  CHECK_THAT(test::input_error_of([&] { run::run_ensemble(small_scenario(d), o); }),
             Catch::Contains("is a folder"));
  CHECK_FALSE(fs::exists(d / "a-folder.h5.parts"));
}

TEST_CASE("output files: a killed writer's temporaries are removed when the run starts again",
          "[io]") {
  const auto d = test::scratch("output-stale");
  // left by a process killed while renaming its final file, and one of a staged folder
  std::ofstream(d / ".orbits.h5.tmp-4242") << "half";
  fs::create_directories(d / "sub" / ".arms.tmp-77");
  std::ofstream(d / "sub" / ".arms.tmp-77" / "arms.h5") << "half";
  // not temporaries: kept
  std::ofstream(d / ".orbits.h5.tmp-") << "keep";
  std::ofstream(d / "orbits.h5.tmp-12") << "keep";
  std::ofstream(d / ".other.h5.tmp-9") << "someone else's";
  run::EnsembleOptions o;
  o.output = (d / "orbits.h5").string();
  REQUIRE(run::run_ensemble(small_scenario(d), o).complete);
  CHECK_FALSE(fs::exists(d / ".orbits.h5.tmp-4242"));
  CHECK(fs::exists(d / ".other.h5.tmp-9")); // one output's temporaries only
  CHECK(fs::exists(d / ".orbits.h5.tmp-"));
  CHECK(fs::exists(d / "orbits.h5.tmp-12"));
  // a folder a run owns: every temporary in it
  io::remove_stale_temporaries(d.string());
  CHECK_FALSE(fs::exists(d / ".other.h5.tmp-9"));
  CHECK_FALSE(fs::exists(d / "sub" / ".arms.tmp-77"));
  CHECK(fs::exists(d / "orbits.h5"));
  CHECK(fs::exists(d / ".orbits.h5.tmp-"));
  // a folder replaced as a whole, killed between its two renames: the new result staged and the
  // old one set aside, both hidden; the next write of that folder removes them
  fs::create_directories(d / ".fit.tmp-31337");
  fs::create_directories(d / ".fit.old-31337");
  fs::create_directories(d / ".fit.old-x");
  std::ofstream(d / ".fit.old-31337" / "arms.h5") << "old";
  io::write_folder_atomically((d / "fit").string(), "arms.h5", "arm fit", [](const std::string& t) {
    std::ofstream(t + "/arms.h5") << "new";
    return std::vector<std::string>{t + "/arms.h5"};
  });
  CHECK(fs::exists(d / "fit" / "arms.h5"));
  CHECK_FALSE(fs::exists(d / ".fit.tmp-31337"));
  CHECK_FALSE(fs::exists(d / ".fit.old-31337"));
  CHECK(fs::exists(d / ".fit.old-x")); // not a pid: not ours
}

TEST_CASE("output files: files that join a folder arrive together or not at all", "[io]") {
  const auto d = test::scratch("output-together");
  const auto write_two = [](bool fail) {
    return [fail](const std::string& tmp) {
      std::ofstream(fs::path(tmp) / "a.csv") << "a";
      if (fail) throw InputError(SourcePlace{tmp + "/b.h5", 0, 0, {}}, "write failed");
      std::ofstream(fs::path(tmp) / "b.h5") << "b";
      return std::vector<std::string>{tmp + "/a.csv", tmp + "/b.h5"};
    };
  };
  // a new folder: removed again on failure, and the error names the final path
  CHECK_THAT(test::input_error_of(
                 [&] { io::write_files_together((d / "new").string(), write_two(true)); }),
             Catch::StartsWith((d / "new" / "b.h5").string() + ": write failed"));
  CHECK_FALSE(fs::exists(d / "new"));
  // a folder of the user's: its files untouched, nothing added
  fs::create_directories(d / "mine");
  std::ofstream(d / "mine" / "notes.txt") << "mine";
  CHECK_THROWS(io::write_files_together((d / "mine").string(), write_two(true)));
  std::size_t n = 0;
  for ([[maybe_unused]] const auto& e : fs::directory_iterator(d / "mine"))
    ++n;
  CHECK(n == 1);
  // success: both files, no temporary
  const auto files = io::write_files_together((d / "mine").string(), write_two(false));
  CHECK(files ==
        std::vector<std::string>{(d / "mine" / "a.csv").string(), (d / "mine" / "b.h5").string()});
  n = 0;
  for ([[maybe_unused]] const auto& e : fs::directory_iterator(d / "mine"))
    ++n;
  CHECK(n == 3);
}

// SOURCE_DATE_EPOCH (reproducible-builds.org/specs/source-date-epoch): a file's creation time is
// that many seconds after 1970-01-01 UTC, so reruns write identical bytes; a malformed value is
// refused, as the specification asks. 1e9 s is 2001-09-09T01:46:40Z (a value from memory, checked
// here against gmtime-free arithmetic: 11574 days of 86400 s plus 6400 s).
TEST_CASE("a file's creation time follows SOURCE_DATE_EPOCH when it is set", "[io]") {
  const char* before = std::getenv("SOURCE_DATE_EPOCH");
  const std::string saved = before ? before : "";
  REQUIRE(11574LL * 86400 + 6400 == 1000000000LL);
  ::setenv("SOURCE_DATE_EPOCH", "1000000000", 1);
  CHECK(io::make_provenance("", "", "", 1).created_utc == "2001-09-09T01:46:40Z");
  ::setenv("SOURCE_DATE_EPOCH", "0", 1);
  CHECK(io::make_provenance("", "", "", 1).created_utc == "1970-01-01T00:00:00Z");
  for (const char* bad : {"12abc", "-5", "1e9", "99999999999999999999"}) {
    ::setenv("SOURCE_DATE_EPOCH", bad, 1);
    CHECK(test::input_error_of([] {
            io::make_provenance("", "", "", 1);
          }).find("SOURCE_DATE_EPOCH = '") != std::string::npos);
  }
  if (before)
    ::setenv("SOURCE_DATE_EPOCH", saved.c_str(), 1);
  else
    ::unsetenv("SOURCE_DATE_EPOCH");
}

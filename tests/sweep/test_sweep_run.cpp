// Running a plan: shard arithmetic, the Slurm environment, finished / failed / corrupt point
// folders, and gathering.
#include <catch2/catch.hpp>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "support/scratch.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/sweep/gather.hpp"
#include "undertow/sweep/plan.hpp"
#include "undertow/sweep/point_run.hpp"
#include "undertow/sweep/shard.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {

using test::scratch;

std::string bytes(const fs::path& p) {
  return io::read_file_bytes(p.string());
}

} // namespace

TEST_CASE("Shards: every point in exactly one shard, for any task count", "[sweep]") {
  for (std::size_t n = 0; n <= 40; ++n)
    for (std::size_t count = 1; count <= 50; ++count) {
      std::vector<int> seen(n, 0);
      for (std::size_t k = 0; k < count; ++k)
        for (std::size_t i : sweep::shard_points(n, {k, count})) {
          REQUIRE(i < n);
          ++seen[i];
        }
      for (std::size_t i = 0; i < n; ++i)
        REQUIRE(seen[i] == 1);
    }
  // More tasks than points: the extra ones have nothing to do.
  CHECK(sweep::shard_points(3, {5, 16}).empty());
  CHECK(sweep::shard_points(20, {3, 16}) == std::vector<std::size_t>{3, 19});
}

TEST_CASE("Shards from the Slurm array environment", "[sweep]") {
  using Catch::Matchers::Contains;
  ::unsetenv("SLURM_ARRAY_TASK_ID");
  ::unsetenv("SLURM_ARRAY_TASK_COUNT");
  ::unsetenv("SLURM_ARRAY_TASK_MIN");
  CHECK_FALSE(sweep::shard_from_environment());
  ::setenv("SLURM_ARRAY_TASK_ID", "7", 1);
  ::setenv("SLURM_ARRAY_TASK_COUNT", "16", 1);
  auto s = sweep::shard_from_environment();
  REQUIRE(s);
  CHECK(s->index == 7);
  CHECK(s->count == 16);
  ::setenv("SLURM_ARRAY_TASK_MIN", "1", 1); // an array submitted as 1-16
  s = sweep::shard_from_environment();
  CHECK(s->index == 6);
  ::setenv("SLURM_ARRAY_TASK_ID", "17", 1);
  CHECK_THROWS_WITH(sweep::shard_from_environment(), Contains("outside the array 1-16"));
  ::setenv("SLURM_ARRAY_TASK_ID", "x", 1);
  CHECK_THROWS_WITH(sweep::shard_from_environment(), Contains("SLURM_ARRAY_TASK_ID"));
  ::unsetenv("SLURM_ARRAY_TASK_COUNT");
  ::setenv("SLURM_ARRAY_TASK_ID", "1", 1);
  CHECK_THROWS_WITH(sweep::shard_from_environment(), Contains("SLURM_ARRAY_TASK_COUNT"));
  ::unsetenv("SLURM_ARRAY_TASK_ID");
  ::unsetenv("SLURM_ARRAY_TASK_MIN");

  ::setenv("SLURM_CPUS_PER_TASK", "3", 1);
  ::setenv("OMP_NUM_THREADS", "5", 1);
  CHECK(sweep::threads_from_environment() == 3);
  ::unsetenv("SLURM_CPUS_PER_TASK");
  CHECK(sweep::threads_from_environment() == 5);
  ::setenv("OMP_NUM_THREADS", "2,1", 1); // nested levels: the first is ours
  CHECK(sweep::threads_from_environment() == 2);
  ::unsetenv("OMP_NUM_THREADS");
  CHECK(sweep::threads_from_environment() == 0);
}

TEST_CASE("Points: run once, skipped when finished, redone when corrupt, failures recorded",
          "[sweep]") {
  const fs::path dir = scratch("points");
  const std::string f = (dir / "sweep.toml").string();
  // Point 3 selects nothing (a 10 pc shell), so its whole run fails after planning passed.
  std::ofstream(f) << "[sweep]\nname = \"pts\"\nbase = \"" << UNDERTOW_SOURCE_DIR
                   << "/tests/sweep/small-spiral.toml\"\nreference = \"" << UNDERTOW_SOURCE_DIR
                   << "/tests/sweep/small-smooth.toml\"\n"
                   << R"(
[[parameter]]
key = "observation.selection.distance_max_kpc"
values = [7.0, 5.0, 0.31]
)";
  const auto plan = sweep::make_plan(sweep::load_sweep_file(f), (dir / "plan").string());
  sweep::write_plan(plan);
  REQUIRE(plan.points.size() == 4);
  std::ostringstream log;
  sweep::PointRunOptions o;
  o.log = &log;
  const auto rep = sweep::run_points(plan, {0, 1, 2, 3}, o);
  CHECK(rep.ran == 3);
  CHECK(rep.failed == 1);
  CHECK_FALSE(rep.interrupted);
  const auto& bad = plan.points[3];
  const auto st = sweep::point_status(plan, bad);
  CHECK(st.state == sweep::PointStatus::State::failed);
  CHECK_THAT(st.detail, Catch::Matchers::Contains("selection"));
  for (std::size_t i = 0; i < 3; ++i)
    CHECK(sweep::point_status(plan, plan.points[i]).state == sweep::PointStatus::State::complete);
  // orbits.h5 is removed once a point finished (keep_orbits = false by default).
  CHECK_FALSE(fs::exists(fs::path(sweep::point_folder(plan, plan.points[1])) / "orbits.h5"));
  CHECK(fs::exists(fs::path(sweep::point_folder(plan, plan.points[1])) / "scenario.toml"));

  // Running again skips the finished points and retries the failed one.
  const auto again = sweep::run_points(plan, {0, 1, 2, 3}, o);
  CHECK(again.skipped == 3);
  CHECK(again.ran == 0);
  CHECK(again.failed == 1);

  // A truncated file, a missing finished.toml: detected and redone, to the same bytes.
  const fs::path p1 = sweep::point_folder(plan, plan.points[1]);
  const std::string local = bytes(p1 / "comparison-local.csv");
  const std::string finished = bytes(p1 / "finished.toml");
  fs::resize_file(p1 / "comparison-local.csv", 100);
  auto cs = sweep::point_status(plan, plan.points[1]);
  CHECK(cs.state == sweep::PointStatus::State::corrupt);
  CHECK_THAT(cs.detail, Catch::Matchers::Contains("comparison-local.csv has changed"));
  const fs::path p2 = sweep::point_folder(plan, plan.points[2]);
  fs::remove(p2 / "finished.toml");
  CHECK(sweep::point_status(plan, plan.points[2]).state == sweep::PointStatus::State::corrupt);
  const auto redo = sweep::run_points(plan, {1, 2}, o);
  CHECK(redo.ran == 2);
  CHECK(bytes(p1 / "comparison-local.csv") == local);
  CHECK(bytes(p1 / "finished.toml") == finished);
  CHECK_THAT(log.str(), Catch::Matchers::Contains("running it again"));
  CHECK(fs::exists(sweep::point_folder(plan, plan.points[1]) + ".corrupt-1")); // set aside

  // A half-written run (a .partial folder) resumes to the same result.
  const std::string f0 =
      bytes(fs::path(sweep::point_folder(plan, plan.points[0])) / "finished.toml");
  fs::rename(sweep::point_folder(plan, plan.points[0]),
             sweep::point_folder(plan, plan.points[0]) + ".partial");
  fs::remove(fs::path(sweep::point_folder(plan, plan.points[0]) + ".partial") / "summary.txt");
  // ... with the temporary of a writer killed mid-write, which must not survive into the result.
  std::ofstream(fs::path(sweep::point_folder(plan, plan.points[0]) + ".partial") /
                ".summary.txt.tmp-4242")
      << "half";
  CHECK(sweep::point_status(plan, plan.points[0]).state == sweep::PointStatus::State::partial);
  CHECK(sweep::run_points(plan, {0}, o).ran == 1);
  CHECK(bytes(fs::path(sweep::point_folder(plan, plan.points[0])) / "finished.toml") == f0);
  CHECK_FALSE(
      fs::exists(fs::path(sweep::point_folder(plan, plan.points[0])) / ".summary.txt.tmp-4242"));

  // Gather: refused while a point has failed, unless partial; identical when repeated.
  sweep::GatherOptions g;
  auto gr = sweep::gather(plan, g);
  CHECK(gr.files.empty());
  REQUIRE(gr.failed.size() == 1);
  CHECK_THAT(gr.failed[0], Catch::Matchers::Contains("point 3"));
  g.partial = true;
  gr = sweep::gather(plan, g);
  REQUIRE(gr.files.size() == 6); // csv, ecsv, md, tex, fits, h5
  const std::string csv = bytes(gr.files[0]), fits = bytes(gr.files[4]), h5 = bytes(gr.files[5]);
  CHECK_THAT(csv, Catch::Matchers::Contains("PARTIAL"));
  gr = sweep::gather(plan, g);
  CHECK(bytes(gr.files[0]) == csv);
  CHECK(bytes(gr.files[4]) == fits);
  CHECK(bytes(gr.files[5]) == h5);
  // Sorted by Δ ln L against the reference (point 0), best first; the reference has 0.
  std::istringstream lines(csv);
  std::string line;
  std::vector<double> dl;
  while (std::getline(lines, line))
    if (!line.empty() && line[0] != '#' && line.rfind("id,", 0) != 0) {
      std::vector<std::string> cells;
      std::stringstream ss(line);
      std::string c;
      while (std::getline(ss, c, ','))
        cells.push_back(c);
      dl.push_back(std::stod(cells.at(3))); // id, number, distance_max_kpc, delta_log_likelihood
      if (cells[0].find("reference") != std::string::npos) CHECK(dl.back() == 0);
    }
  REQUIRE(dl.size() == 3);
  CHECK(dl[0] >= dl[1]);
  CHECK(dl[1] >= dl[2]);
  using Catch::Matchers::Contains;
  g.sort = "lnL";
  CHECK_THROWS_WITH(sweep::gather(plan, g), Contains("unknown statistic 'lnL'"));
}

TEST_CASE("Points: a changed input file makes a finished point stale", "[sweep]") {
  // The measured catalog is an input the point's id does not cover: its digest, kept in
  // finished.toml, must still match for the point to count as finished.
  const fs::path dir = scratch("inputs");
  const std::string src = UNDERTOW_SOURCE_DIR;
  fs::copy_file(src + "/demo/kestrel-measured.csv", dir / "catalog.csv");
  std::string base = io::read_text_file(src + "/tests/sweep/small-spiral.toml");
  for (const auto& [from, to] :
       {std::pair<std::string, std::string>{"\"../../demo/kestrel-measured.csv\"",
                                            "\"catalog.csv\""},
        {"\"../../demo/truth/galaxy.toml\"", "\"" + src + "/demo/truth/galaxy.toml\""}}) {
    for (auto at = base.find(from); at != std::string::npos; at = base.find(from))
      base.replace(at, from.size(), to);
  }
  std::ofstream(dir / "base.toml") << base;
  std::ofstream(dir / "sweep.toml") << R"([sweep]
name = "inputs"
base = "base.toml"
[[parameter]]
key = "galaxy.pattern[arms].force_ratio"
values = [0.08]
)";
  const auto plan =
      sweep::make_plan(sweep::load_sweep_file((dir / "sweep.toml").string()), (dir / "p").string());
  sweep::PointRunOptions o;
  REQUIRE(sweep::run_points(plan, {0}, o).ran == 1);
  CHECK(sweep::point_status(plan, plan.points[0]).state == sweep::PointStatus::State::complete);
  std::ofstream(dir / "catalog.csv", std::ios::app) << "# one more comment line\n";
  const auto st = sweep::point_status(plan, plan.points[0]);
  CHECK(st.state == sweep::PointStatus::State::corrupt);
  CHECK_THAT(st.detail, Catch::Matchers::Contains("catalog.csv has changed"));
  fs::remove(dir / "catalog.csv");
  const auto gone = sweep::point_status(plan, plan.points[0]);
  CHECK(gone.state == sweep::PointStatus::State::error); // not corrupt: nothing is set aside
  CHECK_THAT(gone.detail, Catch::Matchers::Contains("is missing"));
  const auto r = sweep::run_points(plan, {0}, o);
  CHECK(r.failed == 1);
  CHECK(fs::exists(fs::path(sweep::point_folder(plan, plan.points[0])) / "finished.toml"));
}

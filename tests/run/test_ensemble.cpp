// Whole ensemble runs: snapshot files, interruption and resume, provenance.
#include <catch2/catch.hpp>
#include <filesystem>
#include <fstream>

#include "undertow/io/hdf5.hpp"
#include "undertow/io/snapshot.hpp"
#include "undertow/run/ensemble.hpp"
#include "undertow/scenario/scenario.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {
std::string scenario_text(const std::string& method = "leapfrog") {
  return std::string(R"(
[run]
name = "small"
seed = 11
[galaxy]
model_file = ")") +
         UNDERTOW_SOURCE_DIR + R"(/potentials/kestrel.toml"
[tracers]
source = "disk"
count = 700
scale_length_kpc = 3.0
r_min_kpc = 4
r_max_kpc = 12
scale_height_kpc = 0.05
sigma_r_kms = 8
sigma_z_kms = 4
[integration]
method = ")" +
         method + R"("
end_myr = 200
step_myr = 0.5
batch_size = 128
[output]
every_myr = 50
)";
}

fs::path work(const std::string& name) {
  const fs::path d = fs::temp_directory_path() / ("undertow-test-" + name);
  fs::remove_all(d);
  fs::create_directories(d);
  return d;
}

void require_same_snapshots(const std::string& a, const std::string& b) {
  const io::SnapshotReader ra(a), rb(b);
  REQUIRE(ra.count() == rb.count());
  for (std::size_t i = 0; i < ra.count(); ++i) {
    const auto sa = ra.read(i), sb = rb.read(i);
    CHECK(sa.time_myr == sb.time_myr);
    CHECK(sa.tracers.id == sb.tracers.id);
    CHECK(sa.tracers.x == sb.tracers.x);
    CHECK(sa.tracers.vz == sb.tracers.vz);
  }
}
} // namespace

TEST_CASE("A run writes one self-describing snapshot file: provenance, model, snapshots with "
          "units, diagnostics",
          "[run]") {
  const auto d = work("file");
  const auto sc = scenario::parse_scenario(scenario_text(), (d / "small.toml").string());
  run::EnsembleOptions o;
  o.output = (d / "small.h5").string();
  const auto r = run::run_ensemble(sc, o);
  REQUIRE(r.complete);
  CHECK_FALSE(fs::exists(o.output + ".parts"));
  const io::SnapshotReader rd(o.output);
  CHECK(rd.count() == 5);
  CHECK(rd.times_myr() == std::vector<double>{0, 50, 100, 150, 200});
  CHECK(rd.index_at(std::nullopt) == 4u); // the last
  CHECK(rd.index_at(100.0) == 2u);
  CHECK_FALSE(rd.index_at(120.0));
  CHECK_THAT(rd.missing_time(120), Catch::Contains("no snapshot at 120 Myr in ") &&
                                       Catch::EndsWith("(times: 0, 50, 100, 150, 200)"));
  CHECK(rd.provenance().scenario_text == sc.text);
  CHECK(rd.provenance().seed == 11);
  const auto f = io::h5::File::open_read(o.output);
  const auto g = io::h5::open_group(f, "snapshots/0004");
  CHECK(io::h5::dataset_units(f, g.id(), "position") == "kpc");
  CHECK(io::h5::dataset_units(f, g.id(), "velocity") == "km/s");
  CHECK(io::h5::dataset_units(f, g.id(), "birth_time") == "Myr");
  const auto m = io::h5::open_group(f, "model/component_1");
  CHECK(io::h5::get_attr_string(f, m.id(), "kind") == "miyamoto-nagai");
  const auto diag = io::h5::open_group(f, "diagnostics");
  CHECK(io::h5::get_attr_string(f, diag.id(), "invariant") == "none"); // the spiral grows
}

TEST_CASE("An interrupted run resumes from its last snapshot and ends with the same bits as an "
          "uninterrupted run, a damaged part is redone",
          "[run]") {
  for (const std::string method : {"leapfrog", "symplectic4", "dopri5"}) {
    INFO(method);
    const auto d = work("resume-" + method);
    const auto sc = scenario::parse_scenario(scenario_text(method), (d / "small.toml").string());
    run::EnsembleOptions whole;
    whole.output = (d / "whole.h5").string();
    REQUIRE(run::run_ensemble(sc, whole).complete);

    std::atomic<bool> stop{false};
    run::EnsembleOptions cut;
    cut.output = (d / "cut.h5").string();
    cut.stop = &stop;
    cut.on_snapshot = [&](double t) {
      if (t >= 100) stop = true; // as if SIGINT arrived here
    };
    const auto r1 = run::run_ensemble(sc, cut);
    CHECK_FALSE(r1.complete);
    CHECK_FALSE(fs::exists(cut.output)); // nothing that looks complete
    CHECK(fs::exists(cut.output + ".parts/part_00002.h5"));
    // damage the last part: it must be detected and redone
    { std::ofstream(cut.output + ".parts/part_00002.h5", std::ios::trunc) << "garbage"; }
    stop = false;
    cut.on_snapshot = {};
    REQUIRE(run::run_ensemble(sc, cut).complete);
    require_same_snapshots(whole.output, cut.output);
  }
}

TEST_CASE("The kept parts of another scenario's run are never mixed in", "[run]") {
  const auto d = work("other");
  auto sc = scenario::parse_scenario(scenario_text(), (d / "small.toml").string());
  std::atomic<bool> stop{false};
  run::EnsembleOptions o;
  o.output = (d / "x.h5").string();
  o.stop = &stop;
  o.on_snapshot = [&](double) { stop = true; };
  REQUIRE_FALSE(run::run_ensemble(sc, o).complete);
  const auto other =
      scenario::parse_scenario(scenario_text("symplectic4"), (d / "small.toml").string());
  stop = false;
  o.on_snapshot = {};
  CHECK_THROWS_WITH(run::run_ensemble(other, o),
                    Catch::Contains("unfinished run of a different scenario"));
  o.restart = true;
  CHECK(run::run_ensemble(other, o).complete);
}

TEST_CASE("Snapshot parts round-trip exactly", "[run]") {
  const auto d = work("part");
  io::Snapshot s;
  s.time_myr = 12.5;
  s.tracers.resize(3);
  s.tracers.id = {7, 8, 9};
  s.tracers.x = {1.0 / 3, -2, 3e-17};
  s.tracers.vz = {1, 2, 3};
  s.birth_time_myr = {0, 0, 1};
  s.flags = {0, 1, 2};
  const auto path = (d / "p.h5").string();
  io::write_snapshot_part(path, s);
  const auto r = io::read_snapshot_part(path);
  CHECK(r.time_myr == 12.5);
  CHECK(r.tracers.id == s.tracers.id);
  CHECK(r.tracers.x == s.tracers.x);
  CHECK(r.tracers.vz == s.tracers.vz);
  CHECK(r.flags == s.flags);
}

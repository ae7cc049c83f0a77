// The whole job from one scenario: stages, reuse, outputs and the model-vs-model table.
#include <algorithm>
#include <catch2/catch.hpp>
#include <filesystem>
#include <fstream>

#include "undertow/error.hpp"
#include "undertow/io/hdf5.hpp"
#include "undertow/run/whole_run.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {
std::string scenario_text(const std::string& model, const std::string& catalog, int obs_seed) {
  return std::string(R"(
[run]
name = "whole"
seed = 21
[galaxy]
model_file = ")") +
         UNDERTOW_SOURCE_DIR + "/potentials/" + model + R"("
[tracers]
source = "disk"
count = 4000
scale_length_kpc = 3.0
r_min_kpc = 4
r_max_kpc = 12
scale_height_kpc = 0.05
sigma_r_kms = 8
sigma_z_kms = 4
[integration]
method = "leapfrog"
end_myr = 150
step_myr = 0.5
[output]
times_myr = [100, 140, 150]
[observation]
seed = )" +
         std::to_string(obs_seed) + R"(
[observation.sun]
r0_kpc = 8.1
[observation.selection]
distance_max_kpc = 6
sources_max = 120
[observation.young]
age_window_myr = 20
[observation.errors]
kind = "fixed"
parallax_err_mas = 0.01
pm_err_masyr = 0.02
vlsr_err_kms = 2
[comparison]
catalog = ")" +
         catalog + R"("
draws = 20
bootstrap = 100
neighbours = 20
radius_bins_kpc = [4, 8, 12]
realisations = 2
verdict_sources = 2000
)";
}
} // namespace

TEST_CASE("A whole run writes every stage into one folder, reuses finished stages on a rerun and "
          "redoes them when forced, runs of two models are set side by side",
          "[run]") {
  const fs::path d = fs::temp_directory_path() / "undertow-whole-run";
  fs::remove_all(d);
  fs::create_directories(d);
  // A "measured" catalog: this very scenario's mock observation with another seed.
  const auto truth = scenario::parse_scenario(
      scenario_text("kestrel.toml", (d / "none.csv").string(), 99), (d / "truth.toml").string());
  {
    std::ofstream((d / "none.csv").string())
        << "name,ra_deg,dec_deg,parallax_mas,parallax_err_mas,pmra_masyr,"
           "pmra_err_masyr,pmdec_masyr,pmdec_err_masyr,vlsr_kms,vlsr_err_kms\n"
           "X,10,10,0.5,0.05,1,0.1,1,0.1,10,5\n"
           "Y,40,10,0.4,0.05,1,0.1,1,0.1,10,5\n"
           "Z,70,10,0.3,0.05,1,0.1,1,0.1,10,5\n";
  }
  run::WholeRunOptions o;
  o.folder = (d / "truth").string();
  REQUIRE(run::run_all(truth, o).complete);
  const std::string measured = (d / "truth" / "mock-catalog.csv").string();
  REQUIRE(fs::exists(measured));

  const auto spiral =
      scenario::parse_scenario(scenario_text("kestrel.toml", measured, 7), (d / "s.toml").string());
  o.folder = (d / "spiral").string();
  const auto r1 = run::run_all(spiral, o);
  REQUIRE(r1.complete);
  CHECK(r1.reused.empty());
  CHECK(r1.measured_sources == 120);
  for (const char* f : {"orbits.h5", "mock-catalog.csv", "measured-residuals-summary.md",
                        "mock-residuals.h5", "comparison-global.csv", "comparison-local.tex",
                        "comparison.h5", "summary.txt", "scenario.toml"})
    CHECK(fs::exists(d / "spiral" / f));
  { // the local table carries each source's R, psi and measured U_s, V_s, W_s: no join needed
    const auto cmp = io::h5::File::open_read((d / "spiral" / "comparison.h5").string());
    const auto res = io::h5::File::open_read((d / "spiral" / "measured-residuals.h5").string());
    const auto names = io::h5::read_strings(cmp, cmp.id(), "local/name"),
               all = io::h5::read_strings(res, res.id(), "sources/name");
    REQUIRE(names.size() == 120);
    for (const char* c : {"R_kpc", "psi_deg", "U_kms", "V_err_kms", "W_kms"}) {
      const auto local = io::h5::read_doubles(cmp, cmp.id(), std::string("local/") + c, 1),
                 source = io::h5::read_doubles(res, res.id(), std::string("sources/") + c, 1);
      for (std::size_t i = 0; i < names.size(); ++i) {
        const auto at = std::find(all.begin(), all.end(), names[i]) - all.begin();
        CHECK(local[i] == source[std::size_t(at)]);
      }
    }
  }
  // temporaries of a run killed mid-write, at the top and in a stage's folder: removed on rerun
  std::ofstream(d / "spiral" / ".verdict.csv.tmp-31337") << "half";
  std::ofstream(d / "spiral" / "realisations" / ".orbits.h5.tmp-31338") << "half";
  const auto r2 = run::run_all(spiral, o);
  CHECK_FALSE(fs::exists(d / "spiral" / ".verdict.csv.tmp-31337"));
  CHECK_FALSE(fs::exists(d / "spiral" / "realisations" / ".orbits.h5.tmp-31338"));
  CHECK(r2.reused == std::vector<std::string>{"orbits", "mock", "orbits-r1"});
  CHECK(fs::exists(d / "spiral" / "realisations" / "r1" / "orbits.h5"));
  CHECK(fs::exists(d / "spiral" / "verdict.csv"));
  CHECK(r1.realisations == 2);
  CHECK(r2.log_likelihood == r1.log_likelihood);
  o.force = true;
  CHECK(run::run_all(spiral, o).reused.empty());
  o.force = false;

  const auto axi = scenario::parse_scenario(scenario_text("kestrel-axisymmetric.toml", measured, 7),
                                            (d / "a.toml").string());
  o.folder = (d / "axi").string();
  REQUIRE(run::run_all(axi, o).complete);
  const auto table = run::compare_runs({(d / "spiral").string(), (d / "axi").string()});
  REQUIRE(table.rows.size() == 2);
  CHECK(table.rows[0][4] == 0); // Delta ln L of the first
  CHECK(table.rows[1][5] > 0);  // its uncertainty
  CHECK(table.text_rows[1][0].find((d / "axi").string()) != std::string::npos); // same run name
  // a run against another catalog is refused: Delta ln L would compare different data
  const auto other = scenario::parse_scenario(
      scenario_text("kestrel-axisymmetric.toml", (d / "none.csv").string(), 7),
      (d / "o.toml").string());
  o.folder = (d / "other").string();
  REQUIRE(run::run_all(other, o).complete);
  CHECK_THROWS_WITH(run::compare_runs({(d / "spiral").string(), (d / "other").string()}),
                    Catch::Contains("catalog: differs"));
}

TEST_CASE("A whole run refuses a scenario without [observation] or [comparison], and a catalog "
          "with fewer than 3 usable sources",
          "[run]") {
  const std::string text = scenario_text("kestrel.toml", "/nonexistent.csv", 1);
  const auto cut = text.substr(0, text.find("[observation]"));
  const auto s = scenario::parse_scenario(cut, "/tmp/cut.toml");
  run::WholeRunOptions o;
  o.folder = "/tmp/undertow-never";
  CHECK_THROWS_WITH(run::run_all(s, o), Catch::Contains("needs an [observation] table"));
  CHECK_FALSE(fs::exists("/tmp/undertow-never"));
  {
    std::ofstream("/tmp/undertow-one.csv")
        << "name,ra_deg,dec_deg,parallax_mas,parallax_err_mas,pmra_masyr,"
           "pmra_err_masyr,pmdec_masyr,pmdec_err_masyr,vlsr_kms,vlsr_err_kms\n"
           "X,10,10,0.5,0.05,1,0.1,1,0.1,10,5\n";
  }
  const auto one = scenario::parse_scenario(
      scenario_text("kestrel.toml", "/tmp/undertow-one.csv", 1), "/tmp/one.toml");
  o.folder = (fs::temp_directory_path() / "undertow-one").string();
  CHECK_THROWS_WITH(run::run_all(one, o),
                    Catch::Contains("1 measured sources are left after the selection"));
}

TEST_CASE("[comparison] takes a posterior-median distance with its prior and range, and refuses a "
          "prior it cannot use and a range that is empty, at the key",
          "[run]") {
  const std::string text = scenario_text("kestrel.toml", "/nonexistent.csv", 1);
  const auto with = [&](const std::string& extra) {
    return scenario::parse_scenario(text + extra, "/tmp/prior.toml");
  };
  const auto s = with("distance = \"posterior-median\"\ndistance_prior = \"disk\"\n"
                      "distance_min_kpc = 0.5\ndistance_max_kpc = 9\n");
  CHECK(s.comparison->distance == residuals::ResidualSettings::Distance::posterior_median);
  CHECK(s.comparison->prior.kind == fit::DistancePrior::Kind::disk);
  CHECK(s.comparison->prior.distance_max_kpc == 9);
  CHECK_THROWS_WITH(with("distance_prior = \"table\"\n"),
                    Catch::Contains("comparison.distance_prior"));
  CHECK_THROWS_WITH(with("distance_min_kpc = 5\ndistance_max_kpc = 4\n"),
                    Catch::Contains("distance_max_kpc"));
}

TEST_CASE("[comparison] verdict keys: realisations, tails, floor and the Sun's and R0's "
          "nuisances are read, and bad values are refused at their key",
          "[run]") {
  std::string text = scenario_text("kestrel.toml", "/nonexistent.csv", 1);
  // the test scenario sets realisations and verdict_sources: replace them here
  for (const char* k : {"realisations = 2\n", "verdict_sources = 2000\n"})
    text.erase(text.find(k), std::string(k).size());
  const auto with = [&](const std::string& extra) {
    return scenario::parse_scenario(text + extra, "/tmp/verdict.toml");
  };
  const auto d = with("");
  CHECK(d.comparison->realisations == 4);
  CHECK(d.comparison->tails == "student");
  CHECK(d.comparison->floor_max_kms == 15);
  CHECK_FALSE(d.comparison->marginalise_sun); // no fit, no widths: fixed, and outputs say so
  CHECK_FALSE(d.comparison->marginalise_r0);
  const auto m =
      with("floor_kms = 4\nsun_velocity_err_kms = [1, 3, 0.5]\n"
           "r0_nuisance = \"marginalise\"\nr0_err_kpc = 0.2\nverdict_tails = \"robust\"\n");
  CHECK(m.comparison->floor_min_kms == 4);
  CHECK(m.comparison->floor_max_kms == 4);
  CHECK(m.comparison->marginalise_sun);
  CHECK(m.comparison->marginalise_r0);
  CHECK(m.comparison->tails == "robust");
  CHECK_THROWS_WITH(with("realisations = 0\n"), Catch::Contains("comparison.realisations"));
  CHECK_THROWS_WITH(with("floor_kms = [5, 2]\n"), Catch::Contains("comparison.floor_kms"));
  CHECK_THROWS_WITH(with("verdict_tails = \"cauchy\"\n"),
                    Catch::Contains("comparison.verdict_tails"));
  CHECK_THROWS_WITH(with("sun_nuisance = \"marginalise\"\n"),
                    Catch::Contains("comparison.sun_nuisance"));
  CHECK_THROWS_WITH(with("r0_nuisance = \"marginalise\"\n"),
                    Catch::Contains("comparison.r0_nuisance"));
  CHECK_THROWS_WITH(with("sun_velocity_err_kms = [1, -3, 0.5]\n"),
                    Catch::Contains("comparison.sun_velocity_err_kms"));
  const auto arms = with("arm_phase_range_deg = [-20, 20]\n");
  REQUIRE(arms.comparison->arm_phase_range_deg);
  CHECK((*arms.comparison->arm_phase_range_deg)[1] == 20);
  CHECK_THROWS_WITH(with("arm_phase_range_deg = [20, -20]\n"),
                    Catch::Contains("comparison.arm_phase_range_deg"));
  std::string smooth = scenario_text("kestrel-axisymmetric.toml", "/nonexistent.csv", 1);
  CHECK_THROWS_WITH(
      scenario::parse_scenario(smooth + "arm_phase_range_deg = [-20, 20]\n", "/tmp/smooth.toml"),
      Catch::Contains("no spiral pattern to turn"));
}

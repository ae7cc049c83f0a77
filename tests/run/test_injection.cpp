// Injection and recovery end to end: a catalog observed from a spiral truth scenario (colliding
// gas clouds in Kestrel with strong arms, demo/truth/galaxy.toml, tracer seed 31) is explained
// by other realisations of the same dynamics (tracer seeds 41, 42) far better than by the
// axisymmetric galaxy, by the verdict with its uncertainty.
#include <catch2/catch.hpp>
#include <cmath>
#include <filesystem>
#include <fstream>

#include "undertow/run/whole_run.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {
std::string scenario_text(const std::string& model, const std::string& catalog, int obs_seed,
                          int sources, const std::string& errors, int seed = 31) {
  return std::string(R"(
[run]
name = "injection"
seed = )") +
         std::to_string(seed) +
         R"(
[galaxy]
model_file = ")" +
         UNDERTOW_SOURCE_DIR + model + R"("
[tracers]
source = "disk"
count = 40000
scale_length_kpc = 5.0
r_min_kpc = 5.0
r_max_kpc = 11.5
scale_height_kpc = 0.03
sigma_r_kms = 5.0
sigma_z_kms = 3.0
[gas]
cloud_radius_kpc = 0.0237
stirring_kms = 0.5
[gas.stars]
efficiency = 0.5
[integration]
method = "leapfrog"
end_myr = 600
step_myr = 0.5
[output]
times_myr = [600]
[observation]
seed = )" +
         std::to_string(obs_seed) + R"(
[observation.sun]
r0_kpc = 8.1
[observation.selection]
distance_min_kpc = 0.3
distance_max_kpc = 6
parallax_snr_min = 3
sources_max = )" +
         std::to_string(sources) + R"(
[observation.young]
star_age_myr = [0, 10]
[observation.errors]
)" + errors +
         R"(
[comparison]
catalog = ")" +
         catalog +
         R"("
draws = 100
bootstrap = 200
neighbours = 30
realisations = 2
)";
}
} // namespace

TEST_CASE("Injection and recovery: other realisations of the spiral truth explain its survey "
          "far better than the axisymmetric galaxy, by many times the verdict's uncertainty",
          "[run][injection]") {
  const fs::path d = fs::temp_directory_path() / "undertow-injection";
  fs::remove_all(d);
  fs::create_directories(d);
  const std::string maser_errors =
      "kind = \"fixed\"\nparallax_err_mas = 0.02\npm_err_masyr = 0.08\n"
      "vlsr_err_kms = 5\n";
  const std::string truth_model = "/demo/truth/galaxy.toml";
  // The "measured" survey: 200 young stars of the truth (seed 31) with maser-like errors.
  const auto truth = scenario::parse_scenario(
      scenario_text(truth_model, (d / "none.csv").string(), 2, 200, maser_errors),
      (d / "truth.toml").string());
  {
    std::ofstream((d / "none.csv").string())
        << "name,ra_deg,dec_deg,parallax_mas,parallax_err_mas,pmra_masyr,"
           "pmra_err_masyr,pmdec_masyr,pmdec_err_masyr,vlsr_kms,vlsr_err_kms\n"
           "X,10,10,0.5,0.05,1,0.1,1,0.1,10,5\nY,40,10,0.4,0.05,1,0.1,1,0.1,10,5\n"
           "Z,70,10,0.3,0.05,1,0.1,1,0.1,10,5\n";
  }
  run::WholeRunOptions o;
  o.folder = (d / "truth").string();
  REQUIRE(run::run_all(truth, o).complete);
  const std::string measured = (d / "truth" / "mock-catalog.csv").string();

  // The models: the truth's dynamics with other tracer seeds (never the catalog's own clouds)
  // and the axisymmetric galaxy, each observed with the survey's errors copied source by source.
  const std::string copied = "kind = \"catalog\"\ncatalog = \"" + measured + "\"\n";
  const auto spiral = scenario::parse_scenario(
      scenario_text(truth_model, measured, 9, 2000, copied, 41), (d / "spiral.toml").string());
  const auto axi = scenario::parse_scenario(
      scenario_text("/potentials/kestrel-axisymmetric.toml", measured, 9, 2000, copied, 41),
      (d / "axi.toml").string());
  o.folder = (d / "spiral").string();
  const auto rs = run::run_all(spiral, o);
  o.folder = (d / "axi").string();
  const auto ra = run::run_all(axi, o);
  REQUIRE(rs.complete);
  REQUIRE(ra.complete);
  REQUIRE(rs.measured_sources == 200);
  INFO(rs.summary);
  INFO(ra.summary);
  // versus: Delta ln L with its uncertainty (the catalog's sampling and the realisations')
  const auto t = run::compare_runs({(d / "axi").string(), (d / "spiral").string()});
  REQUIRE(t.rows.size() == 2);
  std::size_t delta = 0, sigma = 0;
  for (std::size_t c = 0; c < t.columns.size(); ++c) {
    if (t.columns[c].name == "delta_log_likelihood") delta = c;
    if (t.columns[c].name == "delta_err") sigma = c;
  }
  REQUIRE(delta > 0);
  REQUIRE(sigma > 0);
  INFO("Delta ln L " << t.rows[1][delta] << " +- " << t.rows[1][sigma]);
  CHECK(t.rows[1][delta] > 5 * t.rows[1][sigma]);
  CHECK(rs.outliers < ra.outliers);
}

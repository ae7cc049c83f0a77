// Injection and recovery end to end: a catalog observed from a spiral truth scenario (colliding
// gas clouds in Kestrel with strong arms, demo/truth/galaxy.toml) is explained by that
// scenario far better than by the axisymmetric galaxy, and under the truth the pulls are
// standard normal within their sampling error.
#include <catch2/catch.hpp>
#include <cmath>
#include <filesystem>
#include <fstream>

#include "undertow/run/whole_run.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {
std::string scenario_text(const std::string& model, const std::string& catalog, int obs_seed,
                          int sources, const std::string& errors) {
  return std::string(R"(
[run]
name = "injection"
seed = 31
[galaxy]
model_file = ")") +
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
cell_kpc = 0.2
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
max_sources = )" +
         std::to_string(sources) + R"(
[observation.young]
age_window_myr = 0
density = "tracers"
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
)";
}
} // namespace

TEST_CASE("Injection and recovery: the spiral truth explains its own survey far better than the "
          "axisymmetric galaxy (Delta ln L >> 0), and its pulls have mean 0 and dispersion 1",
          "[run][injection]") {
  const fs::path d = fs::temp_directory_path() / "undertow-injection";
  fs::remove_all(d);
  fs::create_directories(d);
  const std::string maser_errors = "kind = \"fixed\"\nparallax_mas = 0.02\npm_masyr = 0.08\n"
                                   "vlsr_kms = 5\n";
  const std::string truth_model = "/demo/truth/galaxy.toml";
  // The "measured" survey: 200 young sources of the truth with maser-like errors.
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

  // The models: the truth itself and the axisymmetric galaxy, each observed again with the
  // survey's errors copied source by source.
  const std::string copied = "kind = \"catalog\"\ncatalog = \"" + measured + "\"\n";
  const auto spiral = scenario::parse_scenario(
      scenario_text(truth_model, measured, 9, 2000, copied), (d / "spiral.toml").string());
  const auto axi = scenario::parse_scenario(
      scenario_text("/potentials/kestrel-axisymmetric.toml", measured, 9, 2000, copied),
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

  // Delta ln L: a difference of a few units would be marginal; the truth wins by far more.
  CHECK(rs.log_likelihood - ra.log_likelihood > 100);
  CHECK(rs.chi2 < ra.chi2);

  // Pulls under the truth: 600 values, so the sampling error of their mean is 1/sqrt(600) =
  // 0.041 and of their dispersion 1/sqrt(1200) = 0.029. The prediction from 30 neighbours adds
  // its own scatter (the estimated mean's variance, 1/30 of the intrinsic one) and the density
  // gradient across a neighbourhood: allowed for by a 3-sigma band plus 10 % in the dispersion.
  double m = 0, v = 0;
  std::size_t n = 0;
  for (const auto& p : rs.pulls)
    for (double x : p)
      m += x, ++n;
  m /= double(n);
  for (const auto& p : rs.pulls)
    for (double x : p)
      v += (x - m) * (x - m);
  const double sd = std::sqrt(v / double(n - 1));
  INFO("pulls: mean " << m << ", dispersion " << sd);
  CHECK(std::fabs(m) < 3 * 0.041);
  CHECK(std::fabs(sd - 1) < 3 * 0.029 + 0.10);
}

// Every key and name renamed since undertow 0.1 (CHANGELOG.md, docs/migration.md): the old
// spelling is refused with a message that names the new one, in the file type where it lived.
#include <catch2/catch.hpp>
#include <fstream>
#include <iterator>
#include <string>

#include "undertow/error.hpp"
#include "undertow/fit/truth_file.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/scenario/scenario.hpp"

using namespace undertow;

namespace {
// A scenario that uses every renamed scenario key under its new name.
const std::string kScenario = std::string(R"([run]
name = "renamed"
seed = 3
[galaxy]
model_file = ")") + UNDERTOW_SOURCE_DIR +
                              R"(/potentials/kestrel.toml"
[tracers]
source = "disk"
count = 100
scale_length_kpc = 3.0
r_min_kpc = 4
r_max_kpc = 12
scale_height_kpc = 0.05
sigma_r_kms = 8
sigma_z_kms = 4
[gas]
[gas.stars]
age_max_myr = 50
[integration]
method = "leapfrog"
end_myr = 10
step_myr = 0.5
radius_max_kpc = 400
[output]
times_myr = [10]
[observation]
seed = 1
[observation.sun]
r0_kpc = 8.1
[observation.selection]
distance_max_kpc = 6
sources_max = 120
[observation.errors]
kind = "fixed"
parallax_err_mas = 0.01
pm_err_masyr = 0.02
vlsr_err_kms = 2
[comparison]
catalog = "none.csv"
parallax_snr_min = 3
neighbours_min = 4
neighbourhood = "radius"
neighbourhood_radius_kpc = 0.5
)";

std::string with(std::string text, const std::string& from, const std::string& to) {
  const auto at = text.find(from);
  REQUIRE(at != std::string::npos);
  return text.replace(at, from.size(), to);
}
} // namespace

TEST_CASE("Renamed scenario keys: the old spelling is refused naming the new one",
          "[scenario][renamed]") {
  REQUIRE_NOTHROW(scenario::parse_scenario(kScenario, "new.toml"));
  const std::pair<const char*, const char*> renamed[] = {
      {"age_max_myr", "max_age_myr"},
      {"radius_max_kpc", "max_radius_kpc"},
      {"sources_max", "max_sources"},
      {"parallax_err_mas", "parallax_mas"},
      {"pm_err_masyr", "pm_masyr"},
      {"vlsr_err_kms", "vlsr_kms"},
      {"parallax_snr_min", "min_parallax_snr"},
      {"neighbours_min", "min_neighbours"},
      {"neighbourhood_radius_kpc", "radius_kpc"},
  };
  for (const auto& [now, before] : renamed) {
    INFO(before << " -> " << now);
    CHECK_THROWS_WITH(scenario::parse_scenario(with(kScenario, now, before), "old.toml"),
                      Catch::Contains("old.toml:") && Catch::Contains(before) &&
                          Catch::Contains(std::string("renamed: write '") + now + "'"));
  }
  // the fractional error model's key
  const auto fractional = with(with(kScenario, "kind = \"fixed\"", "kind = \"fractional\""),
                               "parallax_err_mas = 0.01", "parallax_err_fraction = 0.1");
  REQUIRE_NOTHROW(scenario::parse_scenario(fractional, "new.toml"));
  CHECK_THROWS_WITH(scenario::parse_scenario(
                        with(fractional, "parallax_err_fraction", "parallax_fraction"), "old.toml"),
                    Catch::Contains("renamed: write 'parallax_err_fraction'"));
  // integration methods
  for (const auto& [now, before] :
       {std::pair{"symplectic4", "mclachlan4"}, std::pair{"rk78", "fehlberg78"}}) {
    auto text = with(kScenario, "[gas]\n[gas.stars]\nage_max_myr = 50\n", "");
    text = with(text, "method = \"leapfrog\"", std::string("method = \"") + now + "\"");
    REQUIRE_NOTHROW(scenario::parse_scenario(text, "new.toml"));
    CHECK_THROWS_WITH(scenario::parse_scenario(with(text, std::string("\"") + now + "\"",
                                                    std::string("\"") + before + "\""),
                                               "old.toml"),
                      Catch::Contains(std::string("renamed: write '") + now + "'"));
  }
}

TEST_CASE("Renamed model-file names: amplitude_km2_s2 and the tapered-cusp component, whose "
          "reference radius is now required",
          "[scenario][renamed]") {
  const std::string spiral = R"([[component]]
kind = "nfw"
density_msun_kpc3 = 1e7
scale_kpc = 15
[[pattern]]
kind = "log-spiral"
label = "arms"
arms = 2
pitch_deg = 12
reference_radius_kpc = 8
amplitude_km2_s2 = 100
pattern_speed_kms_kpc = 25
)";
  REQUIRE_NOTHROW(potential::parse_model_text(spiral, "new.toml"));
  CHECK_THROWS_WITH(
      potential::parse_model_text(with(spiral, "amplitude_km2_s2", "amplitude_kms2"), "old.toml"),
      Catch::Contains("old.toml:") && Catch::Contains("renamed: write 'amplitude_km2_s2'"));
  const std::string arms = R"([[component]]
kind = "nfw"
density_msun_kpc3 = 1e7
scale_kpc = 15
[[pattern]]
kind = "cox-gomez-spiral"
arms = 2
pitch_deg = 15
pattern_speed_kms_kpc = 20
reference_radius_kpc = 8
radial_scale_kpc = 7
scale_height_kpc = 0.18
density_msun_kpc3 = 0.35e9
)";
  REQUIRE_NOTHROW(potential::parse_model_text(arms, "new.toml"));
  CHECK_THROWS_WITH(
      potential::parse_model_text(
          with(arms, "density_msun_kpc3 = 0.35e9", "density_msun_pc3 = 0.35"), "old.toml"),
      Catch::Contains("renamed: write 'density_msun_kpc3', in Msun/kpc^3: 10^9 times"));
  const std::string cusp = R"([[component]]
kind = "tapered-cusp"
density_msun_kpc3 = 1e9
reference_radius_kpc = 1
slope = 1.8
cutoff_kpc = 1.9
)";
  REQUIRE_NOTHROW(potential::parse_model_text(cusp, "new.toml"));
  CHECK_THROWS_WITH(
      potential::parse_model_text(with(cusp, "tapered-cusp", "power-law-cutoff"), "old.toml"),
      Catch::Contains("renamed: write \"tapered-cusp\""));
  CHECK_THROWS_WITH(
      potential::parse_model_text(with(cusp, "reference_radius_kpc = 1\n", ""), "no-ref.toml"),
      Catch::Contains("no-ref.toml") && Catch::Contains("reference_radius_kpc"));
}

TEST_CASE("Renamed kinematic-truth keys: the [errors] table's error keys", "[scenario][renamed]") {
  std::ifstream in(std::string(UNDERTOW_SOURCE_DIR) + "/demo/kinematic-truth.toml");
  const std::string truth((std::istreambuf_iterator<char>(in)), {});
  REQUIRE_NOTHROW(fit::parse_truth_file(truth, "truth.toml"));
  for (const auto& [now, before] :
       {std::pair{"parallax_err_mas", "parallax_mas"}, std::pair{"pm_err_masyr", "pm_masyr"},
        std::pair{"vlsr_err_kms", "vlsr_kms"}})
    CHECK_THROWS_WITH(fit::parse_truth_file(with(truth, std::string("\n") + now + " =",
                                                 std::string("\n") + before + " ="),
                                            "old.toml"),
                      Catch::Contains(std::string("renamed: write '") + now + "'"));
}

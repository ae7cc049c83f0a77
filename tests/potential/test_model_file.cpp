// Model files: strict reading, errors that name the file, line and key.
#include <catch2/catch.hpp>

#include "undertow/error.hpp"
#include "undertow/potential/model_file.hpp"

#include <variant>

using namespace undertow;
using potential::parse_model_text;

namespace {
std::string error_of(const std::string& text) {
  try {
    parse_model_text(text, "m.toml");
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}
const char* hernquist = "[[component]]\nkind = \"hernquist\"\nmass_msun = 1e10\nscale_kpc = 0.6\n";
} // namespace

TEST_CASE("A model file with every kind of component and pattern reads", "[model-file]") {
  const auto m = parse_model_text(R"(
name = "all"
[[component]]
kind = "point-mass"
label = "bh"
mass_msun = 4e6
[[component]]
kind = "plummer"
mass_msun = 1e9
scale_kpc = 0.3
[[component]]
kind = "hernquist"
mass_msun = 1e10
scale_kpc = 0.6
[[component]]
kind = "isochrone"
mass_msun = 1e10
scale_kpc = 1
[[component]]
kind = "miyamoto-nagai"
mass_msun = 5e10
radial_scale_kpc = 3
vertical_scale_kpc = 0.3
[[component]]
label = "nfw-virial"
kind = "nfw"
virial_mass_msun = 1e12
concentration = 10
[[component]]
kind = "logarithmic"
speed_kms = 50
core_kpc = 5
flattening = 0.9
[[component]]
kind = "burkert"
density_msun_kpc3 = 1e7
core_kpc = 5
[[component]]
kind = "tapered-cusp"
density_msun_kpc3 = 1e9
reference_radius_kpc = 1
slope = 1.8
cutoff_kpc = 1.9
[[component]]
kind = "allen-santillan-halo"
mass_msun = 1e11
scale_kpc = 12
[[pattern]]
kind = "log-spiral"
arms = 2
pitch_deg = 12
pattern_speed_kms_kpc = 25
reference_radius_kpc = 8
amplitude_km2_s2 = 600
[[pattern]]
kind = "cox-gomez-spiral"
arms = 2
pitch_deg = 15
pattern_speed_kms_kpc = 20
reference_radius_kpc = 8
radial_scale_kpc = 7
scale_height_kpc = 0.18
density_msun_kpc3 = 0.35e9
[[pattern]]
kind = "dehnen-bar"
pattern_speed_kms_kpc = 50
bar_radius_kpc = 3.5
strength = 0.01
reference_radius_kpc = 8
)",
                                  "all.toml");
  CHECK(m.components.size() == 10);
  CHECK(m.patterns.size() == 3);
  CHECK(m.components[0].label == "bh");
  CHECK(m.components[2].label == "hernquist"); // the kind is the default label
  CHECK_FALSE(m.vanishes_at_infinity());       // the logarithmic halo
}

TEST_CASE("Model-file errors name the file, line, column and key", "[model-file]") {
  SECTION("unknown key, with the valid ones listed") {
    const auto e = error_of(std::string(hernquist) + "scale_kcp = 1\n");
    CHECK_THAT(e, Catch::StartsWith("m.toml:5:1: component[1].scale_kcp: unknown key"));
    CHECK_THAT(e, Catch::Contains("mass_msun"));
  }
  SECTION("unknown component kind") {
    CHECK_THAT(error_of("[[component]]\nkind = \"hernquist-disk\"\n"),
               Catch::StartsWith(
                   "m.toml:2:8: component[1].kind: unknown component kind 'hernquist-disk'"));
  }
  SECTION("negative mass, at the line of the key") {
    CHECK_THAT(error_of("[[component]]\nlabel = \"bulge\"\nkind = \"hernquist\"\nmass_msun = "
                        "-1e10\nscale_kpc = 0.6\n"),
               Catch::StartsWith("m.toml:4:13: component[bulge].mass_msun: must be positive"));
  }
  SECTION("zero scale") {
    CHECK_THAT(error_of("[[component]]\nkind = \"plummer\"\nmass_msun = 1e10\nscale_kpc = 0\n"),
               Catch::Contains("component[1].scale_kpc: must be positive"));
  }
  SECTION("NaN") {
    CHECK_THAT(error_of("[[component]]\nkind = \"plummer\"\nmass_msun = nan\nscale_kpc = 1\n"),
               Catch::StartsWith("m.toml:3:13: component[1].mass_msun: must be a finite number"));
  }
  SECTION("missing key") {
    CHECK_THAT(error_of("[[component]]\nkind = \"plummer\"\nmass_msun = 1e10\n"),
               Catch::Contains("missing required key 'scale_kpc'"));
  }
  SECTION("a string where a number belongs") {
    CHECK_THAT(error_of("[[component]]\nkind = \"plummer\"\nmass_msun = \"1e10\"\nscale_kpc = 1\n"),
               Catch::Contains("mass_msun: must be a number"));
  }
  SECTION("TOML syntax error") {
    CHECK_THAT(error_of("[[component]\nkind = 1\n"), Catch::StartsWith("m.toml:1:"));
  }
  SECTION("no components") {
    CHECK_THAT(error_of("name = \"empty\"\n"), Catch::Contains("at least one [[component]]"));
  }
  SECTION("duplicate labels") {
    CHECK_THAT(error_of(std::string(hernquist) + hernquist), Catch::Contains("used twice"));
  }
  SECTION("unknown top-level key") {
    CHECK_THAT(error_of(std::string("galaxy = 1\n") + hernquist),
               Catch::StartsWith("m.toml:1:1: galaxy: unknown key"));
  }
  SECTION("spiral with both amplitude and force ratio") {
    CHECK_THAT(error_of(std::string(hernquist) + R"([[pattern]]
kind = "log-spiral"
arms = 2
pitch_deg = 12
pattern_speed_kms_kpc = 25
reference_radius_kpc = 8
amplitude_km2_s2 = 600
force_ratio = 0.02
)"),
               Catch::Contains("exactly one of amplitude_km2_s2 and force_ratio"));
  }
  SECTION("pitch angle out of range") {
    CHECK_THAT(error_of(std::string(hernquist) + R"([[pattern]]
kind = "log-spiral"
arms = 2
pitch_deg = 95
pattern_speed_kms_kpc = 25
reference_radius_kpc = 8
amplitude_km2_s2 = 600
)"),
               Catch::Contains("pattern[1].pitch_deg: must lie in (0, 90)"));
  }
  SECTION("calibration that cannot work") {
    CHECK_THAT(error_of(std::string(hernquist) +
                        "[[component]]\nlabel = \"halo\"\nkind = \"nfw\"\n"
                        "density_msun_kpc3 = 1e7\nscale_kpc = 15\n[calibration]\nradius_kpc = 8\n"
                        "speed_kms = 20\nrescale = [\"halo\"]\n"),
               Catch::Contains("calibration.rescale: calibration: cannot reach"));
  }
}

TEST_CASE("A log-spiral's arms are 0.3 kpc thick unless given, planar only when asked",
          "[model-file]") {
  const std::string arms = std::string(hernquist) + R"([[pattern]]
kind = "log-spiral"
arms = 2
pitch_deg = 12
pattern_speed_kms_kpc = 25
reference_radius_kpc = 8
amplitude_km2_s2 = 600
)";
  const auto spiral = [](const potential::Model& m) {
    return std::get<potential::LogSpiral>(m.patterns.at(0).shape);
  };
  const auto plain = spiral(parse_model_text(arms, "m.toml"));
  CHECK(plain.inv_h == Approx(1 / 0.3));
  CHECK(plain.kz > 0);
  CHECK(plain.rout == 20);
  const auto thick =
      spiral(parse_model_text(arms + "scale_height_kpc = 0.5\nouter_radius_kpc = 14\n", "m.toml"));
  CHECK(thick.inv_h == Approx(2.0));
  CHECK(thick.rout == 14);
  CHECK(thick.kz > plain.kz); // the smallest k_e inside a smaller radius is larger
  const auto flat = spiral(parse_model_text(arms + "planar = true\n", "m.toml"));
  CHECK(flat.kz == 0);
  CHECK(flat.inv_h == 0);
  CHECK_THAT(error_of(arms + "planar = true\nscale_height_kpc = 0.3\n"),
             Catch::StartsWith("m.toml:13:20: pattern[1].scale_height_kpc: planar arms have no "
                               "thickness"));
  CHECK_THAT(error_of(arms + "envelope_scale_kpc = 0.5\nouter_radius_kpc = 30\n"),
             Catch::Contains("pattern[1].outer_radius_kpc: the envelope falls off faster"));
}

TEST_CASE("A missing model file is a one-line error naming it", "[model-file]") {
  CHECK_THROWS_WITH(potential::load_model_file("no/such/model.toml"),
                    "no/such/model.toml: cannot open file");
}

TEST_CASE("Arm azimuth at the observation time: for every pattern speed the potential trough at "
          "R_ref then lies at the given azimuth within 0.1 deg (definition of the pattern angle "
          "psi_p(t) = phase + Omega_p t)",
          "[model-file]") {
  const auto model = [](double speed, const std::string& phase_keys) {
    return parse_model_text(R"(
[[component]]
kind = "logarithmic"
speed_kms = 220
core_kpc = 1
[[pattern]]
label = "arms"
kind = "log-spiral"
arms = 4
pitch_deg = 20
reference_radius_kpc = 8.1
amplitude_km2_s2 = 300
pattern_speed_kms_kpc = )" + std::to_string(speed) +
                                "\n" + phase_keys,
                            "m.toml");
  };
  for (double speed : {15.0, 18.0, 21.0, 24.0}) {
    const auto m = model(speed, "arm_azimuth_deg = 43\narm_azimuth_at_myr = 600\n");
    // the trough nearest 43 deg on the circle R = R_ref at t = 600 Myr, on a 0.01 deg grid
    double best = 1e300, at = 0;
    for (int i = 0; i < 4500; ++i) {
      const double psi = units::deg * (20 + i / 100.0);
      const double v = m.pattern_potential(0, {-8.1 * std::cos(psi), 8.1 * std::sin(psi), 0}, 600);
      if (v < best) best = v, at = psi / units::deg;
    }
    INFO("pattern speed " << speed << " km/s/kpc: trough at " << at << " deg");
    CHECK(at == Approx(43).margin(0.1));
    // and the t = 0 phase is the one that turns into 43 deg by 600 Myr
    const double turned = speed * 600 * units::kms_per_kpc_times_myr;
    CHECK(std::remainder(m.patterns[0].phase + turned - 43 * units::deg, 2 * units::pi) ==
          Approx(0).margin(1e-12));
  }
  CHECK_THROWS_WITH(model(21, "arm_azimuth_deg = 43\n"), Catch::Contains("arm_azimuth_at_myr"));
  CHECK_THROWS_WITH(model(21, "arm_azimuth_at_myr = 600\n"), Catch::Contains("arm_azimuth_deg"));
  CHECK_THROWS_WITH(model(21, "phase_deg = 5\narm_azimuth_deg = 43\narm_azimuth_at_myr = 600\n"),
                    Catch::Contains("not both"));
}

// Published mass models reproduce what their papers state, to the papers' quoted precision.
#include <catch2/catch.hpp>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/dynamics/mass.hpp"
#include "undertow/potential/model_file.hpp"

using namespace undertow;

namespace {
potential::Model preset(const std::string& name) {
  return potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/" + name +
                                    ".toml");
}
} // namespace

TEST_CASE("Allen & Santillan (1991, RMxAA 22, 255): Theta0 = 220 km/s at R0 = 8.5 kpc, local "
          "density 0.15 Msun/pc^3",
          "[presets]") {
  const auto m = preset("allen-santillan-1991");
  CHECK(dynamics::circular_speed(m, 8.5) == Approx(220.0).margin(0.5));
  CHECK(m.axisymmetric_density({8.5, 0, 0}) / units::msun_pc3 == Approx(0.15).margin(0.005));
  // From memory of the paper: Oort constants A = 12.95, B = -12.93 km/s/kpc, and an escape
  // speed of about 536 km/s at the Sun.
  CHECK(dynamics::oort_a(m, 8.5) == Approx(12.95).margin(0.05));
  CHECK(dynamics::oort_b(m, 8.5) == Approx(-12.93).margin(0.05));
  CHECK(dynamics::escape_speed(m, 8.5) == Approx(536).margin(2));
}

TEST_CASE("Irrgang et al. (2013, A&A 549, A137) model I: v_c = 242 km/s at R0 = 8.4 kpc",
          "[presets]") {
  const auto m = preset("irrgang-2013-model-1");
  CHECK(dynamics::circular_speed(m, 8.4) == Approx(242.0).margin(0.5));
}

TEST_CASE("The demo galaxy Kestrel meets its documented truth values (potentials/kestrel.toml)",
          "[presets]") {
  const auto m = preset("kestrel");
  CHECK(dynamics::circular_speed(m, 8.1) == Approx(228.0).epsilon(1e-12));
  REQUIRE(m.patterns.size() == 1);
  CHECK(m.patterns[0].arms() == 4);
  CHECK(m.patterns[0].pattern_speed == 21.0);
}

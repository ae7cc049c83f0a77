// Heliocentric -> Galactocentric against a reference table made by astropy's Galactocentric
// frame configured to the Hipparcos Galactic definition (tests/sky/make_astropy_reference.py,
// rerun by ctest as sky.astropy_reference_regenerates).
#include <catch2/catch.hpp>
#include <cmath>

#include "undertow/io/input_table.hpp"
#include "undertow/sky/solar_frame.hpp"

using namespace undertow;

TEST_CASE("Observables -> Galactocentric agrees with astropy's Galactocentric frame (Hipparcos "
          "orientation) to 1e-9 kpc and 1e-6 km/s, and back",
          "[sky]") {
  const auto t = io::InputTable::read_file(std::string(UNDERTOW_SOURCE_DIR) +
                                           "/tests/sky/astropy_reference.csv");
  REQUIRE(t.rows() >= 100);
  double worst_r = 0, worst_v = 0;
  for (std::size_t i = 0; i < t.rows(); ++i) {
    const auto num = [&](const char* c) { return t.number(i, t.column(c)); };
    sky::SolarFrame f;
    f.r0_kpc = num("r0_kpc");
    f.z_sun_kpc = num("z_sun_kpc");
    f.u_sun_kms = num("vx_sun_kms");
    f.theta0_kms = num("vy_sun_kms");
    f.v_sun_kms = 0; // astropy's galcen_v_sun is the whole solar velocity
    f.w_sun_kms = num("vz_sun_kms");
    const sky::Observed o{num("ra_deg"), num("dec_deg"), num("pmra_masyr"), num("pmdec_masyr"),
                          num("vhelio_kms")};
    const auto g = sky::to_galactocentric(o, num("distance_kpc"), f);
    const double ref_r[3] = {num("x_kpc"), num("y_kpc"), num("z_kpc")};
    const double ref_v[3] = {num("vx_kms"), num("vy_kms"), num("vz_kms")};
    for (int k = 0; k < 3; ++k) {
      worst_r = std::max(worst_r, std::fabs(g.r[k] - ref_r[k]));
      worst_v = std::max(worst_v, std::fabs(g.v[k] - ref_v[k]));
    }
    sky::Observed back;
    const double d = sky::from_galactocentric(
        {{ref_r[0], ref_r[1], ref_r[2]}, {ref_v[0], ref_v[1], ref_v[2]}}, f, back);
    CHECK(d == Approx(num("distance_kpc")).epsilon(1e-9));
    CHECK(back.vhelio_kms == Approx(o.vhelio_kms).margin(1e-6));
    CHECK(back.pmra_masyr == Approx(o.pmra_masyr).margin(1e-7));
  }
  INFO("largest differences: " << worst_r << " kpc, " << worst_v << " km/s");
  CHECK(worst_r < 1e-9);
  CHECK(worst_v < 1e-6);
}

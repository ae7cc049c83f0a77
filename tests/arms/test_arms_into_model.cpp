// A model file's spiral takes its arms from a finished arm fit (arms_from): the fit's number of
// arms and pitch, and its arms where the fit found them at the observation's time. The check is
// the log-spiral's own definition (potential/log_spiral.hpp: the arms lie at χ = 0, χ = m (ψ −
// ψ_p(t)) + m cot p ln(R/R_ref)) evaluated where the fit says an arm crosses R0.
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>

#include "support/scratch.hpp"
#include "undertow/arms/arm_fit.hpp"
#include "undertow/error.hpp"
#include "undertow/potential/model_file.hpp"

using namespace undertow;

namespace {

// An arm fit's outputs with a preferred count (four arms of 13 deg, one crossing 8.1 kpc at 25 deg)
std::string arm_fit_file(const std::filesystem::path& dir) {
  arms::ArmFit f;
  f.catalog = "invented";
  for (const char* g : {"a", "b"}) {
    arms::SegmentResult r;
    r.group = g, r.sources = 10, r.converged = true;
    r.pitch_deg = {13, 12, 14}, r.radius_kpc = {8, 7.9, 8.1}, r.width_kpc = {0.2, 0.1, 0.3};
    r.samples = {{13, std::log(8.0), 0.2}, {13.1, std::log(8.1), 0.25}};
    f.segments.push_back(r);
  }
  arms::ArmCountResult c;
  c.m = {1, 2, 3, 4}, c.ln_evidence = {-9, -5, -7, 0}, c.probability = {0, 0.01, 0, 0.99};
  c.best_m = 4, c.pitch_deg = {13, 12.8, 13.2}, c.arm_azimuth_deg = 25, c.arm_azimuth_sigma_deg = 1;
  c.arm = {0, 1}, c.arm_probability = {1, 1}, c.same_arm_as_first = {1, 0};
  f.count = c;
  arms::ArmFitSettings s;
  s.geometries = {{8.1, 0}};
  arms::write_arm_outputs((dir / "fit").string(), f, s);
  return (dir / "fit" / "arms.h5").string();
}

const std::string kAxisymmetric = R"(name = "m"
[[component]]
kind = "miyamoto-nagai"
mass_msun = 6e10
radial_scale_kpc = 3
vertical_scale_kpc = 0.3
[[component]]
kind = "nfw"
virial_mass_msun = 1.1e12
concentration = 11.0
hubble_kms_mpc = 70.0
)";

} // namespace

TEST_CASE("arms: a model's spiral takes its arms from an arm fit", "[arms]") {
  const auto dir = test::scratch("arms-into-model");
  arm_fit_file(dir);
  const std::string spiral = R"([[pattern]]
kind = "log-spiral"
arms_from = "fit/arms.h5"
arm_azimuth_at_myr = 300
pattern_speed_kms_kpc = 20
reference_radius_kpc = 10
amplitude_km2_s2 = 100
)";
  const auto m = potential::parse_model_text(kAxisymmetric + spiral, (dir / "model.toml").string());
  REQUIRE(m.patterns.size() == 1);
  const auto& p = m.patterns[0];
  const auto& s = std::get<potential::LogSpiral>(p.shape);
  CHECK(s.m == 4);
  CHECK(1 / s.cotp == Approx(std::tan(13 * units::deg)).epsilon(1e-12));
  // at t = 300 Myr an arm (χ ≡ 0 mod 2π) crosses R = 8.1 kpc at ψ = 25°
  const double chi = 4 * (25 * units::deg - p.angle_at(300)) + 4 * s.cotp * std::log(8.1 / 10.0);
  CHECK(std::remainder(chi, 2 * units::pi) == Approx(0).margin(1e-9));

  // given with arms or pitch_deg, or without the time: refused at the key
  for (const auto& [extra, key] : std::vector<std::pair<std::string, std::string>>{
           {"arms = 2\n", "arms"}, {"pitch_deg = 10\n", "pitch_deg"}}) {
    try {
      potential::parse_model_text(kAxisymmetric + spiral + extra, (dir / "model.toml").string());
      FAIL("accepted " << extra);
    } catch (const InputError& e) {
      CHECK(std::string(e.what()).find(key + ": comes from arms_from") != std::string::npos);
    }
  }
  std::string no_time = spiral;
  no_time.replace(no_time.find("arm_azimuth_at_myr = 300\n"), 25, "");
  CHECK_THROWS_WITH(
      potential::parse_model_text(kAxisymmetric + no_time, (dir / "model.toml").string()),
      Catch::Contains("needs arm_azimuth_at_myr"));
  std::string missing = spiral;
  missing.replace(missing.find("fit/arms.h5"), 11, "no/arms.h5");
  CHECK_THROWS_WITH(
      potential::parse_model_text(kAxisymmetric + missing, (dir / "model.toml").string()),
      Catch::Contains("is not the arms.h5 of an arm fit"));
}

// Input that is broken in ways a parser would let through, and input that is odd but valid:
// control characters, a UTF-8 byte-order mark, a folder for a file, an error reported at the
// line of the key that caused it, and the warnings for odd catalogs and settings. The byte
// values are those of ASCII and of the BOM in the Unicode standard (U+FEFF as UTF-8: EF BB BF).
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <string>

#include "support/input_error.hpp"
#include "support/scratch.hpp"
#include "undertow/error.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/scenario/scenario.hpp"

using namespace undertow;

namespace {

const std::string kHeader = "name,ra_deg,dec_deg,parallax_mas,parallax_err_mas,pmra_masyr,"
                            "pmra_err_masyr,pmdec_masyr,pmdec_err_masyr,vlsr_kms,vlsr_err_kms\n";
std::string row(const std::string& name, const std::string& parallax) {
  return name + ",272.1,-19.8," + parallax + ",0.01,-3.8,0.2,-6.4,0.1,67,5\n";
}

} // namespace

TEST_CASE("text inputs: control characters are refused at their line and column", "[io]") {
  // a NUL inside a parallax: strtod would read "0.4" and stop, silently
  std::string text = kHeader + row("A", "0.4") + row("B", "0.41");
  text.insert(text.find("0.41") + 2, std::string(1, '\0') + "garbage");
  const auto e = test::input_error_of([&] { io::checked_text(text, "cat.csv"); });
  CHECK_THAT(e, Catch::Contains("cat.csv:3:17: control character 0x00 (NUL)"));
  // other control characters too, but tab and carriage return are text
  CHECK_THAT(test::input_error_of([&] { io::checked_text("a\x01", "f"); }),
             Catch::Contains("f:1:2: control character 0x01"));
  CHECK_THAT(test::input_error_of([&] { io::checked_text("a\n\x7f", "f"); }),
             Catch::Contains("f:2:1: control character 0x7F"));
  CHECK(io::checked_text("a\tb\r\nc", "f") == "a\tb\r\nc");
  // through the file reader, so every catalog, model, scenario and sweep file is covered
  const auto p = test::scratch("hygiene-nul") / "nul.csv";
  std::ofstream(p, std::ios::binary) << text;
  CHECK_THAT(test::input_error_of([&] { residuals::read_catalog(p.string()); }),
             Catch::Contains(":3:17: control character 0x00"));
}

TEST_CASE("text inputs: a UTF-8 byte-order mark is accepted and removed", "[io]") {
  const auto p = test::scratch("hygiene-bom") / "bom.csv";
  std::ofstream(p, std::ios::binary) << "\xEF\xBB\xBF" << kHeader << row("A", "0.4");
  const auto c = residuals::read_catalog(p.string());
  REQUIRE(c.sources.size() == 1);
  CHECK(c.sources[0].name == "A");
  CHECK(c.warnings.empty());
  // only at the start: inside the text it is a character like any other
  CHECK(io::checked_text("\xEF\xBB\xBF"
                         "a\xEF\xBB\xBF",
                         "f") == "a\xEF\xBB\xBF");
}

TEST_CASE("text inputs: a folder where a file is expected says so", "[io]") {
  const auto d = test::scratch("hygiene-folder") / "a-folder.csv";
  std::filesystem::create_directories(d);
  CHECK_THAT(test::input_error_of([&] { residuals::read_catalog(d.string()); }),
             Catch::EndsWith("a-folder.csv: is a folder, not a file"));
}

TEST_CASE("catalogs: odd but valid input gives one warning line each", "[io]") {
  const std::string text =
      "name,ra_deg,dec_deg,parallax_mas,parallax_err_mas,pmra_masyr,pmra_err_masyr,"
      "pmdec_masyr,pmdec_err_masyr,vlsr_kms,vlsr_err_kms,colour\n"
      "A,272.1,-19.8,0.4,0.01,-3.8,0.2,-6.4,0.1,67,5,red\n"
      "B,272.1,-19.8,-0.02,0.01,-3.8,0.2,-6.4,0.1,67,5,red\n"
      "A,272.1,-19.8,1e300,0.01,-3.8,0.2,-6.4,0.1,67,5,red\n";
  const auto c = residuals::parse_catalog(text, "odd.csv");
  CHECK(c.sources.size() == 3); // all kept
  REQUIRE(c.warnings.size() == 4);
  CHECK_THAT(c.warnings[0], Catch::Contains("odd.csv:1: colour: not a column undertow reads"));
  CHECK_THAT(c.warnings[1],
             Catch::Contains("odd.csv:3: parallax_mas: parallax -0.02 mas is not positive"));
  CHECK_THAT(c.warnings[2], Catch::Contains("odd.csv:4: name: 'A' names an earlier source too "
                                            "(line 2)"));
  CHECK_THAT(c.warnings[3], Catch::Contains("odd.csv:4: parallax_mas: parallax 1e+300 mas"));
  // the residuals count them with their own
  residuals::ResidualSettings s;
  CHECK(residuals::compute_residuals(c, s).warnings.size() >= 4);
  // a clean catalog has none
  CHECK(residuals::parse_catalog(kHeader + row("A", "0.4"), "ok.csv").warnings.empty());
}

TEST_CASE("model files: a calibration's bad radius is reported at its own line", "[io]") {
  const std::string m = "[[component]]\nlabel = \"halo\"\nkind = \"nfw\"\n"
                        "density_msun_kpc3 = 1e7\nscale_kpc = 15\n[calibration]\n"
                        "radius_kpc = -8\nspeed_kms = 220\nrescale = [\"halo\"]\n";
  CHECK_THAT(test::input_error_of([&] { potential::parse_model_text(m, "m.toml"); }),
             Catch::Contains("m.toml:7:14: calibration.radius_kpc: must be positive"));
  std::string v = m;
  v.replace(v.find("-8"), 2, "8");
  v.replace(v.find("220"), 3, "-2");
  CHECK_THAT(test::input_error_of([&] { potential::parse_model_text(v, "m.toml"); }),
             Catch::Contains("m.toml:8:13: calibration.speed_kms: must be positive"));
}

TEST_CASE("scenarios: a step longer than the run is a warning at its line", "[io]") {
  const auto text = [](const std::string& step) {
    return "[run]\nname = \"s\"\nseed = 1\n[galaxy]\nmodel_file = \"" +
           std::string(UNDERTOW_SOURCE_DIR) +
           "/potentials/kestrel-axisymmetric.toml\"\n[tracers]\nsource = \"disk\"\ncount = 10\n"
           "scale_length_kpc = 3\nr_min_kpc = 4\nr_max_kpc = 10\nscale_height_kpc = 0.1\n"
           "sigma_r_kms = 5\nsigma_z_kms = 5\n[integration]\n"
           "method = \"leapfrog\"\nend_myr = 10\nstep_myr = " +
           step + "\n[output]\nevery_myr = 10\n";
  };
  const auto s = scenario::parse_scenario(text("25"), "s.toml");
  REQUIRE(s.warnings.size() == 1);
  CHECK_THAT(s.warnings[0],
             Catch::Contains("s.toml:18:12: integration.step_myr: longer than the run (10 Myr)"));
  CHECK(scenario::parse_scenario(text("0.5"), "s.toml").warnings.empty());
}

// Every column undertow writes states its unit twice: in its name's suffix (docs/conventions.md:
// "_kms", "_kms_kpc", "_km2_s2", ...) and in the unit its tables carry. This reads every column
// definition in the sources ({"name", "symbol", "symbol", "unit", ...}) and checks that the
// suffix table (io::unit_of_name, which sweeps and figure labels read) gives the same unit, and
// none where a column has none.
#include <catch2/catch.hpp>
#include <filesystem>
#include <fstream>
#include <regex>
#include <sstream>
#include <stdexcept>

#include "undertow/io/unit_notation.hpp"
#include "undertow/plot/labels.hpp"

using namespace undertow;
namespace fs = std::filesystem;

TEST_CASE("The unit-from-suffix table knows the unit of every column the sources define, and "
          "names without a unit suffix carry no unit",
          "[io][units]") {
  // {"name", "symbol", "symbol", "unit"} or with a precision after it; a unit has no '_', which
  // tells these apart from lists of keys
  const std::regex column(
      R"re(\{"([A-Za-z0-9_]+)",\s*"(?:[^"\\]|\\.)*",\s*"(?:[^"\\]|\\.)*",\s*"([^"_]*)"\s*(?:,\s*[0-9]+\s*)?\})re");
  std::size_t seen = 0;
  for (const auto& e : fs::recursive_directory_iterator(fs::path(UNDERTOW_SOURCE_DIR) / "src")) {
    if (e.path().extension() != ".cpp") continue;
    std::ifstream in(e.path());
    std::stringstream text;
    text << in.rdbuf();
    const std::string s = text.str();
    for (std::sregex_iterator it(s.begin(), s.end(), column), end; it != end; ++it) {
      const std::string name = (*it)[1], unit = (*it)[2];
      try { // a list of four names is not a column: its last is not a unit
        if (!unit.empty()) (void)io::fits_unit(unit);
      } catch (const std::invalid_argument&) {
        continue;
      }
      ++seen;
      INFO(e.path().filename().string() << ": column " << name << " [" << unit << "]");
      const std::string by_suffix = io::unit_of_name(name);
      if (unit.empty())
        CHECK(by_suffix.empty());
      else
        CHECK((!by_suffix.empty() && io::same_unit(by_suffix, unit)));
    }
  }
  INFO("column definitions read: " << seen);
  CHECK(seen > 100); // the pattern still finds them
  // figure labels go through the same table, then the FITS notation (Pence et al. 2010)
  CHECK(plot::parameter_label("amplitude_km2_s2") == "amplitude [km#u2#d s#u-2#d]");
  CHECK(plot::parameter_label("force_ratio") == "force_ratio");
  CHECK(plot::parameter_label("strength_msun") == "strength [M#d⊙#u]");
  CHECK(plot::plplot_unit("km/s/kpc") == "km s#u-1#d kpc#u-1#d");
}

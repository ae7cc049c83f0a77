// The machine-readable tables: CSV, ECSV and FITS keep every digit, CSV quotes what RFC 4180
// says to quote, units go into the FITS standard's notation (Pence et al. 2010, A&A 524, A42,
// §4.3), and a FITS table read back through CFITSIO has the names, units and bits written, and
// the same bytes when written again.
// astropy's reading of the same files is checked on a whole run (tests/cli/table_checks.py).
#include <catch2/catch.hpp>
#include <cmath>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fitsio.h>
#include <fstream>
#include <iterator>
#include <random>
#include <sstream>

#include "undertow/error.hpp"
#include "undertow/io/input_table.hpp"
#include "undertow/io/table.hpp"
#include "undertow/io/table_ecsv.hpp"
#include "undertow/io/table_fits.hpp"
#include "undertow/io/unit_notation.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {
io::Table sample_table() {
  io::Table t;
  t.title = "Sample: ΔV/σ by ring";
  t.columns = {{"R_kpc", "R", "R", "kpc", 4},
               {"vc_kms", "v_c", "v_c", "km/s", 4},
               {"kappa_kms_kpc", "\\kappa", "κ", "km/s/kpc", 3},
               {"rho_msun_pc3", "\\rho", "ρ", "Msun/pc^3", 3}};
  t.text_headers = {"ring"};
  t.add_row({11.419912345678, 233.0000000001, 0.1, NAN});
  t.add_row({1e-300, -0.0, 1.0 / 3.0, 6.02214076e23});
  t.text_rows = {{"4-6 kpc, inner"}, {"say \"outer\""}};
  t.notes = {"Δ = measured − model", "a note, with a comma"};
  return t;
}

bool same_bits(double a, double b) {
  return std::memcmp(&a, &b, sizeof a) == 0;
}
} // namespace

TEST_CASE("Units in the FITS standard's notation (Pence et al. 2010, §4.3)", "[io][tables]") {
  CHECK(io::fits_unit("km/s") == "km s-1");
  CHECK(io::fits_unit("km/s/kpc") == "km s-1 kpc-1");
  CHECK(io::fits_unit("Msun/pc^3") == "solMass pc-3");
  CHECK(io::fits_unit("Msun") == "solMass");
  CHECK(io::fits_unit("mas/yr") == "mas yr-1");
  CHECK(io::fits_unit("(km/s)^2") == "km2 s-2");
  CHECK(io::fits_unit("km^2/s^2/kpc") == "km2 s-2 kpc-1");
  CHECK(io::fits_unit("kpc") == "kpc");
  CHECK(io::fits_unit("") == "");
  // the FITS notation itself and astropy's generic format read back
  CHECK(io::fits_unit("km s-1 kpc-1") == "km s-1 kpc-1");
  CHECK(io::fits_unit("km.s**-1") == "km s-1");
  CHECK(io::fits_unit("solMass / pc3") == "solMass pc-3");
  CHECK(io::fits_unit("km / (kpc s)") == "km kpc-1 s-1");
  CHECK(io::same_unit("km / (kpc s)", "km/s/kpc"));
  CHECK(io::same_unit("mas / yr", "mas yr-1"));
  CHECK_FALSE(io::same_unit("arcsec", "mas"));
  CHECK_FALSE(io::same_unit("km/s", "km"));
  CHECK(io::same_unit("", ""));
  CHECK_THROWS(io::fits_unit("km//s"));
  CHECK_THROWS(io::fits_unit("km/s^"));
  CHECK_THROWS(io::fits_unit("(km/s"));
  CHECK_THROWS(io::fits_unit("steps")); // a count, not a unit
}

TEST_CASE("Exact numbers: the shortest text that reads back to the same double (C++17 "
          "std::to_chars, checked with strtod)",
          "[io][tables]") {
  CHECK(io::exact_number(11.4199) == "11.4199");
  CHECK(io::exact_number(0.1) == "0.1");
  CHECK(io::exact_number(1.0 / 3.0) == "0.3333333333333333");
  CHECK(io::exact_number(NAN) == "nan");
  CHECK(io::exact_number(-INFINITY) == "-inf");
  std::mt19937_64 rng(11);
  for (int i = 0; i < 100000; ++i) {
    std::uint64_t bits = rng();
    double x;
    std::memcpy(&x, &bits, sizeof x);
    if (!std::isfinite(x)) continue;
    const std::string s = io::exact_number(x);
    REQUIRE(same_bits(std::strtod(s.c_str(), nullptr), x));
  }
}

TEST_CASE("CSV keeps every digit and quotes fields with commas or quotes (RFC 4180)",
          "[io][tables]") {
  const auto t = sample_table();
  std::ostringstream os;
  io::write_table(os, t, io::TableFormat::csv);
  const auto csv = io::InputTable::parse(os.str(), "sample.csv");
  REQUIRE(csv.rows() == 2);
  CHECK(csv.cell(0, csv.column("ring")) == "4-6 kpc, inner");
  CHECK(csv.cell(1, csv.column("ring")) == "say \"outer\"");
  for (std::size_t r = 0; r < 2; ++r)
    for (std::size_t c = 0; c < t.columns.size(); ++c) {
      const auto& text = csv.cell(r, csv.column(t.columns[c].name));
      const double back = std::strtod(text.c_str(), nullptr);
      INFO(t.columns[c].name << " row " << r << ": " << text);
      CHECK((std::isnan(t.rows[r][c]) ? std::isnan(back) : same_bits(back, t.rows[r][c])));
    }
  std::ostringstream md;
  io::write_table(md, t, io::TableFormat::markdown); // people's tables keep their rounding
  CHECK(md.str().find("11.42") != std::string::npos);
  CHECK(md.str().find("11.419912") == std::string::npos);
}

TEST_CASE("ECSV: the 1.0 header with units in FITS notation, the title and notes as metadata, "
          "every digit in the body",
          "[io][tables]") {
  std::ostringstream os;
  io::write_table_ecsv(os, sample_table());
  const std::string e = os.str();
  CHECK(e.rfind("# %ECSV 1.0\n# ---\n# datatype:\n", 0) == 0);
  CHECK(e.find("# - {name: 'ring', datatype: string}") != std::string::npos);
  CHECK(e.find("# - {name: 'kappa_kms_kpc', unit: 'km s-1 kpc-1', datatype: float64, "
               "description: 'κ'}") != std::string::npos);
  CHECK(e.find("#   title: 'Sample: ΔV/σ by ring'") != std::string::npos);
  CHECK(e.find("\nring R_kpc vc_kms kappa_kms_kpc rho_msun_pc3\n") != std::string::npos);
  CHECK(e.find("\n\"4-6 kpc, inner\" 11.419912345678 233.0000000001 0.1 nan\n") !=
        std::string::npos);
  CHECK(e.find("\n\"say \"\"outer\"\"\" 1e-300 -0 0.3333333333333333 6.02214076e+23\n") !=
        std::string::npos);
}

TEST_CASE("FITS binary table: read back through CFITSIO with the names, units and bits written, "
          "nothing left under a temporary name, and an unwritable folder is one error",
          "[io][tables]") {
  const fs::path d = fs::temp_directory_path() / "undertow-table-fits";
  fs::remove_all(d);
  fs::create_directories(d);
  const auto t = sample_table();
  io::write_table_fits((d / "sample.fits").string(), t);
  io::write_table_fits((d / "again.fits").string(), t, "sample");
  REQUIRE(std::distance(fs::directory_iterator(d), fs::directory_iterator{}) == 2);
  const auto bytes = [](const fs::path& p) {
    std::ifstream in(p, std::ios::binary);
    return std::string(std::istreambuf_iterator<char>(in), {});
  };
  CHECK(bytes(d / "sample.fits") == bytes(d / "again.fits")); // no date or time in the file

  fitsfile* f = nullptr;
  int st = 0, hdutype = 0;
  REQUIRE(fits_open_file(&f, (d / "sample.fits").c_str(), READONLY, &st) == 0);
  REQUIRE(fits_movabs_hdu(f, 2, &hdutype, &st) == 0);
  CHECK(hdutype == BINARY_TBL);
  char value[FLEN_VALUE], comment[FLEN_COMMENT];
  REQUIRE(fits_read_key(f, TSTRING, "EXTNAME", value, comment, &st) == 0);
  CHECK(std::string(value) == "sample");
  long rows = 0;
  int cols = 0;
  fits_get_num_rows(f, &rows, &st);
  fits_get_num_cols(f, &cols, &st);
  CHECK(rows == 2);
  CHECK(cols == 5);
  const char* units[] = {"", "kpc", "km s-1", "km s-1 kpc-1", "solMass pc-3"};
  const char* names[] = {"ring", "R_kpc", "vc_kms", "kappa_kms_kpc", "rho_msun_pc3"};
  for (int c = 1; c <= 5; ++c) {
    char key[FLEN_KEYWORD];
    std::snprintf(key, sizeof key, "TTYPE%d", c);
    REQUIRE(fits_read_key(f, TSTRING, key, value, comment, &st) == 0);
    CHECK(std::string(value) == names[c - 1]);
    if (c == 4) CHECK(std::string(comment) == "kappa");
    std::snprintf(key, sizeof key, "TUNIT%d", c);
    int s2 = 0;
    if (fits_read_key(f, TSTRING, key, value, comment, &s2) == 0)
      CHECK(std::string(value) == units[c - 1]);
    else
      CHECK(std::string(units[c - 1]).empty());
  }
  for (int c = 2; c <= 5; ++c) {
    double v[2];
    int anynul = 0;
    REQUIRE(fits_read_col(f, TDOUBLE, c, 1, 1, 2, nullptr, v, &anynul, &st) == 0);
    for (int r = 0; r < 2; ++r) {
      const double w = t.rows[std::size_t(r)][std::size_t(c - 2)];
      CHECK((std::isnan(w) ? std::isnan(v[r]) : same_bits(v[r], w)));
    }
  }
  char label0[32], label1[32];
  char* labels[] = {label0, label1};
  int anynul = 0;
  REQUIRE(fits_read_col(f, TSTRING, 1, 1, 1, 2, nullptr, labels, &anynul, &st) == 0);
  CHECK(std::string(label0) == "4-6 kpc, inner");
  CHECK(std::string(label1) == "say \"outer\"");
  fits_close_file(f, &st);

  CHECK_THROWS_AS(io::write_table_fits((d / "no-such-folder" / "x.fits").string(), t), InputError);
  fs::remove_all(d);
}

// One catalog reader for CSV, ECSV and FITS: the same sources bit for bit from each, other
// spellings and column maps, heliocentric velocities, and bad input named by file and column.
// The ECSV and FITS files here are written by undertow's own table writers (io/table_ecsv,
// io/table_fits); tests/cli/catalog_format_checks.sh does the same with files astropy wrote.
#include <catch2/catch.hpp>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <fitsio.h>
#include <fstream>
#include <sstream>

#include "undertow/error.hpp"
#include "undertow/io/table.hpp"
#include "undertow/io/table_ecsv.hpp"
#include "undertow/io/table_fits.hpp"
#include "undertow/io/toml_table.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/residuals/peculiar.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {
double sq(double x) {
  return x * x;
}
const char* const kCsv = R"(# three sources
name,ra_deg,dec_deg,parallax_mas,parallax_err_mas,pmra_masyr,pmra_err_masyr,pmdec_masyr,pmdec_err_masyr,vlsr_kms,vlsr_err_kms,corr_pmra_pmdec
T100017,272.5862345678901,-19.5243214999,0.117,0.0061234567891,-3.71,0.19,-6.2,0.14,64.3,5,0.1
"T100029, core",273.1734,-18.3058,0.408,0.025,-0.7,0.07,-1.08,0.1,38.9,3,-0.25
T100051,291.3045,14.1047,0.185,0.01,-2.52,0.2,-5.27,0.2,55,4,0
)";

// The same columns as an io::Table, for the ECSV and FITS writers.
io::Table as_table(const residuals::Catalog& c, bool heliocentric = false) {
  io::Table t;
  t.text_headers = {"name"};
  t.columns = {{"ra_deg", "", "", "deg"},
               {"dec_deg", "", "", "deg"},
               {"parallax_mas", "", "", "mas"},
               {"parallax_err_mas", "", "", "mas"},
               {"pmra_masyr", "", "", "mas/yr"},
               {"pmra_err_masyr", "", "", "mas/yr"},
               {"pmdec_masyr", "", "", "mas/yr"},
               {"pmdec_err_masyr", "", "", "mas/yr"},
               {heliocentric ? "vhelio_kms" : "vlsr_kms", "", "", "km/s"},
               {heliocentric ? "vhelio_err_kms" : "vlsr_err_kms", "", "", "km/s"},
               {"corr_pmra_pmdec", "", "", ""}};
  for (const auto& s : c.sources) {
    const double v = heliocentric ? sky::lsr_to_helio(s.vlsr_kms, s.ra_deg, s.dec_deg) : s.vlsr_kms;
    t.add_row({s.ra_deg, s.dec_deg, s.parallax_mas, s.parallax_err_mas, s.pmra_masyr,
               s.pmra_err_masyr, s.pmdec_masyr, s.pmdec_err_masyr, v, s.vlsr_err_kms, s.corr_pm});
    t.text_rows.push_back({s.name});
  }
  return t;
}

bool same(const residuals::Source& a, const residuals::Source& b) {
  const double x[] = {a.ra_deg,     a.dec_deg,        a.parallax_mas, a.parallax_err_mas,
                      a.pmra_masyr, a.pmra_err_masyr, a.pmdec_masyr,  a.pmdec_err_masyr,
                      a.vlsr_kms,   a.vlsr_err_kms,   a.corr_pm};
  const double y[] = {b.ra_deg,     b.dec_deg,        b.parallax_mas, b.parallax_err_mas,
                      b.pmra_masyr, b.pmra_err_masyr, b.pmdec_masyr,  b.pmdec_err_masyr,
                      b.vlsr_kms,   b.vlsr_err_kms,   b.corr_pm};
  return a.name == b.name && std::memcmp(x, y, sizeof x) == 0;
}

fs::path work() {
  const fs::path d = fs::temp_directory_path() / "undertow-catalog-formats";
  fs::remove_all(d);
  fs::create_directories(d);
  return d;
}
} // namespace

TEST_CASE("Catalogs: CSV, ECSV and FITS give the same sources bit for bit, chosen by content",
          "[residuals][catalog-formats]") {
  const auto d = work();
  const auto ref = residuals::parse_catalog(kCsv, "ref.csv");
  REQUIRE(ref.sources.size() == 3);
  CHECK(ref.sources[1].name == "T100029, core");
  const auto t = as_table(ref);
  {
    std::ofstream e(d / "cat.ecsv");
    io::write_table_ecsv(e, t);
  }
  io::write_table_fits((d / "cat.fits").string(), t);
  fs::copy_file(d / "cat.fits", d / "cat-without-extension"); // known by its first bytes
  for (const char* f : {"cat.ecsv", "cat.fits", "cat-without-extension"}) {
    INFO(f);
    const auto c = residuals::read_catalog((d / f).string());
    REQUIRE(c.sources.size() == 3);
    for (std::size_t i = 0; i < 3; ++i)
      CHECK(same(c.sources[i], ref.sources[i]));
  }
  CHECK(residuals::read_catalog((d / "cat.fits").string()).sources[2].line == 3); // FITS row
}

TEST_CASE("Catalogs: other spellings and a column map give the catalog of our own names",
          "[residuals][catalog-formats]") {
  const auto ref = residuals::parse_catalog(kCsv, "ref.csv");
  std::string theirs = kCsv;
  const std::pair<const char*, const char*> renames[] = {{"parallax_mas,", "parallax,"},
                                                         {"parallax_err_mas", "parallax_error"},
                                                         {"pmra_masyr,", "pmra,"},
                                                         {"pmra_err_masyr", "pmra_error"},
                                                         {"pmdec_masyr,", "pmdec,"},
                                                         {"pmdec_err_masyr", "pmdec_error"},
                                                         {"corr_pmra_pmdec", "pmra_pmdec_corr"},
                                                         {"ra_deg", "MY_RA"},
                                                         {"name,", "maser,"}};
  for (const auto& [a, b] : renames)
    theirs.replace(theirs.find(a), std::strlen(a), b);
  residuals::CatalogOptions o;
  CHECK_THROWS_WITH(residuals::parse_catalog(theirs, "theirs.csv", o),
                    Catch::Contains("theirs.csv") && Catch::Contains("name") &&
                        Catch::Contains("missing column"));
  o.columns = residuals::parse_column_map("ra_deg=MY_RA,name=maser", "--columns");
  const auto c = residuals::parse_catalog(theirs, "theirs.csv", o);
  for (std::size_t i = 0; i < 3; ++i)
    CHECK(same(c.sources[i], ref.sources[i]));

  // two candidate spellings: a map must choose
  std::string two = kCsv;
  two.replace(two.find("parallax_mas,"), 13, "parallax,plx,");
  for (auto p = two.find("0.117,"); p != std::string::npos; p = std::string::npos)
    two.replace(p, 6, "0.117,0.117,");
  two.replace(two.find("0.408,"), 6, "0.408,0.408,");
  two.replace(two.find("0.185,"), 6, "0.185,0.185,");
  CHECK_THROWS_WITH(residuals::parse_catalog(two, "two.csv"),
                    Catch::Contains("'parallax' and 'plx'") && Catch::Contains("column map"));
  residuals::CatalogOptions pick;
  pick.columns = {{"parallax_mas", "plx"}};
  CHECK(residuals::parse_catalog(two, "two.csv", pick).sources[0].parallax_mas == 0.117);
}

TEST_CASE("Catalogs: heliocentric velocities give the U, V, W of the equivalent v_LSR",
          "[residuals][catalog-formats]") {
  const auto d = work();
  const auto ref = residuals::parse_catalog(kCsv, "ref.csv");
  for (auto lsr : {sky::LsrForm::apex, sky::LsrForm::components}) {
    auto t = as_table(ref, true);
    if (lsr == sky::LsrForm::components) // heliocentric values by the other LSR form
      for (std::size_t i = 0; i < 3; ++i)
        t.rows[i][8] = sky::lsr_to_helio(ref.sources[i].vlsr_kms, ref.sources[i].ra_deg,
                                         ref.sources[i].dec_deg, lsr);
    io::write_table_fits((d / "helio.fits").string(), t);
    residuals::CatalogOptions o;
    o.lsr = lsr;
    const auto c = residuals::read_catalog((d / "helio.fits").string(), o);
    CHECK(c.heliocentric_velocities);
    residuals::ResidualSettings s;
    s.lsr = lsr;
    s.draws = 20;
    const auto a = residuals::compute_residuals(ref, s), b = residuals::compute_residuals(c, s);
    REQUIRE(a.sources.size() == 3);
    REQUIRE(b.sources.size() == 3);
    for (std::size_t i = 0; i < 3; ++i) {
      CHECK(c.sources[i].vlsr_kms == Approx(ref.sources[i].vlsr_kms).margin(1e-12));
      for (int k = 0; k < 3; ++k)
        CHECK(b.sources[i].uvw[std::size_t(k)] ==
              Approx(a.sources[i].uvw[std::size_t(k)]).margin(1e-12));
    }
  }
  std::string both = kCsv;
  both.replace(both.find("vlsr_err_kms"), 12, "vhelio_kms");
  CHECK_THROWS_WITH(residuals::parse_catalog(both, "both.csv"),
                    Catch::Contains("both an LSR velocity") && Catch::Contains("vhelio_kms"));
}

TEST_CASE("Catalogs: distances given instead of parallaxes give the U, V, W of 1/parallax",
          "[residuals][catalog-formats]") {
  const auto d = work();
  const auto ref = residuals::parse_catalog(kCsv, "ref.csv");
  // the same sources with d = 1/parallax and, to first order, sigma_d = sigma_parallax/parallax^2
  // (common practice)
  residuals::Catalog dist = ref;
  dist.distances = true;
  for (auto& s : dist.sources) {
    s.distance_kpc = 1 / s.parallax_mas,
    s.distance_err_kpc = s.parallax_err_mas / sq(s.parallax_mas);
    s.parallax_mas = s.parallax_err_mas = 0;
  }
  residuals::write_catalog((d / "dist.ecsv").string(), dist);
  const auto back = residuals::read_catalog((d / "dist.ecsv").string());
  REQUIRE(back.distances);
  REQUIRE(back.sources.size() == 3);
  for (std::size_t i = 0; i < 3; ++i) {
    CHECK(back.sources[i].distance_kpc == dist.sources[i].distance_kpc);
    CHECK(back.sources[i].distance_err_kpc == dist.sources[i].distance_err_kpc);
    CHECK(back.sources[i].has_distance());
  }
  residuals::ResidualSettings s;
  s.draws = 4000;
  const auto a = residuals::compute_residuals(ref, s), b = residuals::compute_residuals(back, s);
  REQUIRE(b.sources.size() == 3);
  for (std::size_t i = 0; i < 3; ++i) {
    CHECK(b.sources[i].distance_kpc == a.sources[i].distance_kpc);
    for (std::size_t k = 0; k < 3; ++k) {
      CHECK(b.sources[i].uvw[k] == Approx(a.sources[i].uvw[k]).margin(1e-12));
      // first-order errors: the same to first order; Monte Carlo: within its sampling (4000
      // draws: 2 % in a dispersion) and the curvature of 1/parallax at 5-6 % errors
      CHECK(b.sources[i].lin_cov[4 * k] == Approx(a.sources[i].lin_cov[4 * k]).epsilon(1e-3));
      CHECK(std::sqrt(b.sources[i].mc_cov[4 * k]) ==
            Approx(std::sqrt(b.sources[i].lin_cov[4 * k])).epsilon(0.08));
    }
  }
  // a distance that is not positive, and a parallax column beside distances, are refused
  std::string text = kCsv;
  text.replace(text.find("parallax_mas,parallax_err_mas"), 29, "distance_kpc,distance_err_kpc");
  CHECK(residuals::parse_catalog(text, "d.csv").distances);
  std::string negative = text;
  negative.replace(negative.find(",0.117,"), 7, ",-0.117,");
  CHECK_THROWS_WITH(residuals::parse_catalog(negative, "neg.csv"),
                    Catch::Contains("neg.csv") && Catch::Contains("distance_kpc") &&
                        Catch::Contains("must be positive"));
  std::string corr = text;
  corr.replace(corr.find("corr_pmra_pmdec"), 15, "corr_parallax_pmra");
  CHECK_THROWS_WITH(residuals::parse_catalog(corr, "corr.csv"),
                    Catch::Contains("corr_parallax_pmra") && Catch::Contains("no parallax"));
}

TEST_CASE("Catalogs: a FITS file without a table, a column map naming a missing column, and an "
          "ECSV column in the wrong unit are one error each naming the file and column",
          "[residuals][catalog-formats]") {
  const auto d = work();
  { // a primary HDU only
    fitsfile* f = nullptr;
    int st = 0;
    long axes[1] = {0};
    fits_create_file(&f, ("!" + (d / "image.fits").string()).c_str(), &st);
    fits_create_img(f, DOUBLE_IMG, 0, axes, &st);
    fits_close_file(f, &st);
    REQUIRE(st == 0);
  }
  CHECK_THROWS_WITH(residuals::read_catalog((d / "image.fits").string()),
                    Catch::Contains("image.fits") && Catch::Contains("without a binary table"));

  residuals::CatalogOptions o;
  o.columns = {{"parallax_mas", "PLX"}};
  CHECK_THROWS_WITH(residuals::parse_catalog(kCsv, "cat.csv", o),
                    Catch::Contains("cat.csv") && Catch::Contains("PLX") &&
                        Catch::Contains("does not have"));
  o.columns = {{"parallax", "parallax_mas"}};
  CHECK_THROWS_WITH(residuals::parse_catalog(kCsv, "cat.csv", o), Catch::Contains("does not read"));
  CHECK_THROWS_WITH(residuals::parse_column_map("parallax_mas", "--columns"),
                    Catch::Contains("OURS=THEIRS"));

  auto t = as_table(residuals::parse_catalog(kCsv, "ref.csv"));
  t.columns[2].unit = "arcsec";
  std::ostringstream e;
  io::write_table_ecsv(e, t);
  CHECK_THROWS_WITH(residuals::parse_catalog(e.str(), "arcsec.ecsv"),
                    Catch::Contains("arcsec.ecsv:") && Catch::Contains("parallax_mas") &&
                        Catch::Contains("unit 'arcsec'") && Catch::Contains("'mas'"));
  // the same unit spelled as astropy's generic format writes it is accepted
  t.columns[2].unit = "mas";
  std::ostringstream g;
  io::write_table_ecsv(g, t);
  std::string gs = g.str();
  gs.replace(gs.find("unit: 'mas yr-1'"), 16, "unit: 'mas / yr'");
  CHECK(residuals::parse_catalog(gs, "generic.ecsv").sources.size() == 3);
}

TEST_CASE("Catalogs: a column map in a TOML file is a table of strings (catalog_columns)",
          "[residuals][catalog-formats]") {
  const auto root = toml::parse("map = {parallax_mas = \"PLX\", name = \"maser\"}\n"
                                "bad = {name = 3}\nflat = \"name=maser\"\n");
  const io::TableReader r(root, "fit.toml", "");
  const auto m = r.string_map_or_empty("map");
  CHECK(m.size() == 2);
  CHECK(m.at("parallax_mas") == "PLX");
  CHECK(r.string_map_or_empty("absent").empty());
  CHECK_THROWS_WITH(r.string_map_or_empty("bad"), Catch::Contains("fit.toml") &&
                                                      Catch::Contains("bad") &&
                                                      Catch::Contains("must be a string"));
  CHECK_THROWS_WITH(r.string_map_or_empty("flat"), Catch::Contains("must be a table of strings"));
}

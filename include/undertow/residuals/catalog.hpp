#pragma once
// Measured catalogs (CSV, ECSV or FITS, docs/catalog-format.md): one row per source with its
// position, parallax, proper motions, LSR (or heliocentric) velocity and their 1-sigma errors, an
// optional proper-motion correlation, optional parallax-proper-motion correlations, an optional
// parallax zero point and an optional group label. Reading is strict: a missing column, a value
// that is not a finite number, a non-positive error or a correlation outside [-1, 1] is an error at
// its file, line and column.
#include <cmath>
#include <iosfwd>
#include <map>
#include <string>
#include <vector>

#include "undertow/io/table.hpp"
#include "undertow/sky/lsr.hpp"

namespace undertow::residuals {

struct Source {
  std::string name, group;
  double ra_deg = 0, dec_deg = 0;
  double parallax_mas = 0, parallax_err_mas = 0;
  double pmra_masyr = 0, pmra_err_masyr = 0; // mu_alpha* = mu_alpha cos(dec)
  double pmdec_masyr = 0, pmdec_err_masyr = 0;
  double vlsr_kms = 0, vlsr_err_kms = 0;
  double corr_pm = 0; // correlation of mu_alpha* and mu_delta
  // Optional columns: correlations of the parallax with mu_alpha* and mu_delta, as astrometric
  // catalogs publish them, and a per-source parallax zero point (measured = true + offset).
  double corr_w_pa = 0, corr_w_pd = 0;
  double parallax_offset_mas = 0;
  // A catalog without parallaxes may give distances (with a Gaussian 1-sigma error) instead:
  // then the parallax fields are zero and these are set.
  double distance_kpc = 0, distance_err_kpc = 0;
  bool has_distance() const { return distance_err_kpc > 0; }
  // What a parallax signal-to-noise cut compares: parallax/error, or distance/error for a
  // distance given directly (the same to first order).
  double signal_to_noise() const {
    return has_distance() ? distance_kpc / distance_err_kpc : parallax_mas / parallax_err_mas;
  }
  // The distance as measured (kpc): the distance given, or 1/ϖ less the source's zero point; NaN
  // for a parallax that is not positive. A naive distance, biased when errors are not small.
  double measured_distance_kpc() const {
    if (has_distance()) return distance_kpc;
    const double w = parallax_mas - parallax_offset_mas;
    return w > 0 ? 1 / w : NAN;
  }
  int line = 0; // line in the file, for messages
};

struct Catalog {
  std::string file;
  std::vector<Source> sources;
  // The file gave heliocentric (barycentric) velocities, turned into v_LSR on reading.
  bool heliocentric_velocities = false;
  // The file gave distances instead of parallaxes (every source has_distance()).
  bool distances = false;
  // Odd but valid input, one line each ("file:line: field: what"): columns undertow does not
  // read, source names used twice, non-positive or implausibly large parallaxes.
  std::vector<std::string> warnings;
};
// Writes the catalog's warnings to `out`, "warning: " each, at most `shown` of them and then a
// count of the rest.
void print_catalog_warnings(const Catalog& c, std::ostream& out, std::size_t shown = 10);

struct CatalogOptions {
  // Our column name -> the file's (docs/catalog-format.md lists ours and the other spellings
  // read without a map).
  std::map<std::string, std::string> columns;
  // The LSR that turns a heliocentric velocity column into v_LSR.
  sky::LsrForm lsr = sky::LsrForm::apex;
};

// CSV, ECSV or FITS (io/input_table.hpp), the same sources from each.
Catalog read_catalog(const std::string& path, const CatalogOptions& o = {});
Catalog parse_catalog(const std::string& text, const std::string& source_name,
                      const CatalogOptions& o = {});
// "ours=theirs,ours=theirs" (a command-line option); `where` names it in messages.
std::map<std::string, std::string> parse_column_map(const std::string& text,
                                                    const std::string& where);
// The catalog as a table of our columns with their units, every digit kept (mock catalogs):
// name and group as text, the optional correlations and zero point only when some source has them.
// comment: a provenance note, may be empty.
io::Table catalog_table(const Catalog& c, const std::string& comment = {});
// Writes it atomically as CSV, ECSV or FITS by the path's extension (.ecsv, .fits; else CSV).
void write_catalog(const std::string& path, const Catalog& c, const std::string& comment = {});

} // namespace undertow::residuals

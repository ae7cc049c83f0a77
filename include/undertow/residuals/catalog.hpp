#pragma once
// Measured catalogs (CSV, docs/catalog-format.md): one row per source with its position,
// parallax, proper motions, LSR velocity and their 1-sigma errors, an optional proper-motion
// correlation, optional parallax-proper-motion correlations, an optional parallax zero point and
// an optional group label. Reading is strict: a missing column, a value that is
// not a finite number, a non-positive error or a correlation outside [-1, 1] is an error at its
// file, line and column.
#include <string>
#include <vector>

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
  int line = 0;       // line in the file, for messages
};

struct Catalog {
  std::string file;
  std::vector<Source> sources;
};

Catalog read_catalog(const std::string& path);
Catalog parse_catalog(const std::string& text, const std::string& source_name);
// Writes a catalog in the same format (mock catalogs use this), atomically.
// comment: extra '# ' lines at the top (provenance), may be empty.
void write_catalog(const std::string& path, const Catalog& c, const std::string& comment = {});
std::string catalog_header();

} // namespace undertow::residuals

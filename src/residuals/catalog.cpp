#include "undertow/residuals/catalog.hpp"

#include <cmath>
#include <cstdio>
#include <utility>

#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/csv.hpp"

namespace undertow::residuals {
namespace {

Catalog from_table(const io::CsvTable& t) {
  Catalog c;
  c.file = t.file();
  const std::size_t name = t.column("name");
  const char* num[] = {"ra_deg",     "dec_deg",        "parallax_mas", "parallax_err_mas",
                       "pmra_masyr", "pmra_err_masyr", "pmdec_masyr",  "pmdec_err_masyr",
                       "vlsr_kms",   "vlsr_err_kms"};
  std::size_t col[10];
  for (int k = 0; k < 10; ++k)
    col[k] = t.column(num[k]);
  const bool has_corr = t.has_column("corr_pmra_pmdec"), has_group = t.has_column("group");
  const std::size_t ccorr = has_corr ? t.column("corr_pmra_pmdec") : 0;
  const std::size_t cgroup = has_group ? t.column("group") : 0;
  constexpr std::size_t npos = std::size_t(-1);
  const auto optional = [&](const char* n) { return t.has_column(n) ? t.column(n) : npos; };
  const std::size_t ccw_a = optional("corr_parallax_pmra"), ccw_d = optional("corr_parallax_pmdec"),
                    coff = optional("parallax_offset_mas");
  for (std::size_t r = 0; r < t.rows(); ++r) {
    Source s;
    s.line = t.line_of(r);
    s.name = t.cell(r, name);
    if (s.name.empty()) throw InputError(t.place(r, name), "empty source name");
    double* dst[] = {&s.ra_deg,     &s.dec_deg,        &s.parallax_mas, &s.parallax_err_mas,
                     &s.pmra_masyr, &s.pmra_err_masyr, &s.pmdec_masyr,  &s.pmdec_err_masyr,
                     &s.vlsr_kms,   &s.vlsr_err_kms};
    for (int k = 0; k < 10; ++k)
      *dst[k] = t.number(r, col[k]);
    for (int k : {3, 5, 7, 9})
      if (!(*dst[k] > 0)) throw InputError(t.place(r, col[k]), "errors must be positive");
    if (s.ra_deg < 0 || s.ra_deg >= 360)
      throw InputError(t.place(r, col[0]), "must lie in [0, 360)");
    if (std::fabs(s.dec_deg) > 90) throw InputError(t.place(r, col[1]), "must lie in [-90, 90]");
    if (has_corr) {
      s.corr_pm = t.number(r, ccorr);
      if (std::fabs(s.corr_pm) > 1)
        throw InputError(t.place(r, ccorr), "a correlation must lie in [-1, 1]");
    }
    for (const auto& [col, dst] : {std::pair{ccw_a, &s.corr_w_pa}, std::pair{ccw_d, &s.corr_w_pd}})
      if (col != npos) {
        *dst = t.number(r, col);
        if (std::fabs(*dst) > 1)
          throw InputError(t.place(r, col), "a correlation must lie in [-1, 1]");
      }
    if (coff != npos) s.parallax_offset_mas = t.number(r, coff);
    // the 3x3 correlation matrix of (parallax, mu_alpha*, mu_delta) must be positive definite
    const double det = 1 - s.corr_pm * s.corr_pm - s.corr_w_pa * s.corr_w_pa -
                       s.corr_w_pd * s.corr_w_pd + 2 * s.corr_pm * s.corr_w_pa * s.corr_w_pd;
    if (!(det > 0))
      throw InputError(t.place(r, has_corr ? ccorr : (ccw_a != npos ? ccw_a : name)),
                       "the correlations of parallax and proper motions are not a valid "
                       "correlation matrix (not positive definite)");
    if (has_group) s.group = t.cell(r, cgroup);
    c.sources.push_back(std::move(s));
  }
  return c;
}

} // namespace

Catalog read_catalog(const std::string& path) {
  return from_table(io::CsvTable::read_file(path));
}
Catalog parse_catalog(const std::string& text, const std::string& n) {
  return from_table(io::CsvTable::parse(text, n));
}

std::string catalog_header() {
  return "name,ra_deg,dec_deg,parallax_mas,parallax_err_mas,pmra_masyr,pmra_err_masyr,"
         "pmdec_masyr,pmdec_err_masyr,vlsr_kms,vlsr_err_kms,corr_pmra_pmdec,group";
}

void write_catalog(const std::string& path, const Catalog& c, const std::string& comment) {
  io::AtomicFile f(path);
  auto& o = f.stream();
  if (!comment.empty()) o << "# " << comment << "\n";
  o << "# undertow catalog: columns and units in docs/catalog-format.md\n"
    << catalog_header() << "\n";
  char b[512];
  for (const auto& s : c.sources) {
    std::snprintf(b, sizeof b, "%s,%.10f,%.10f,%.6f,%.6f,%.6f,%.6f,%.6f,%.6f,%.4f,%.4f,%.4f,%s\n",
                  s.name.c_str(), s.ra_deg, s.dec_deg, s.parallax_mas, s.parallax_err_mas,
                  s.pmra_masyr, s.pmra_err_masyr, s.pmdec_masyr, s.pmdec_err_masyr, s.vlsr_kms,
                  s.vlsr_err_kms, s.corr_pm, s.group.c_str());
    o << b;
  }
  f.commit();
}

} // namespace undertow::residuals

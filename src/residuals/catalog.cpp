#include "undertow/residuals/catalog.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iterator>
#include <map>
#include <ostream>
#include <stdexcept>
#include <utility>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/input_table.hpp"
#include "undertow/io/unit_notation.hpp"

namespace undertow::residuals {
namespace {

// Our columns: the unit a file's unit must equal (FITS notation), and the spellings other
// catalogs use for them (astrometric archives' parallax_error, pmra_pmdec_corr, ...), tried when
// our name is absent and no column map names the column.
struct Wanted {
  const char* ours;
  const char* unit;
  std::vector<const char*> aliases;
};
const Wanted kWanted[] = {
    {"name", "", {"source_id", "source", "id", "designation"}},
    {"ra_deg", "deg", {"ra", "RA", "RAJ2000", "ra_icrs"}},
    {"dec_deg", "deg", {"dec", "DEC", "DEJ2000", "dec_icrs"}},
    {"parallax_mas", "mas", {"parallax", "plx", "Plx"}},
    {"parallax_err_mas", "mas", {"parallax_error", "parallax_err", "e_parallax", "e_plx", "e_Plx"}},
    {"pmra_masyr", "mas/yr", {"pmra", "pmRA"}},
    {"pmra_err_masyr", "mas/yr", {"pmra_error", "pmra_err", "e_pmra", "e_pmRA"}},
    {"pmdec_masyr", "mas/yr", {"pmdec", "pmDE"}},
    {"pmdec_err_masyr", "mas/yr", {"pmdec_error", "pmdec_err", "e_pmdec", "e_pmDE"}},
    {"vlsr_kms", "km/s", {"vlsr", "v_lsr", "VLSR"}},
    {"vlsr_err_kms", "km/s", {"vlsr_error", "vlsr_err", "e_vlsr", "e_VLSR"}},
    {"vhelio_kms", "km/s", {"radial_velocity", "vhelio", "v_helio", "RV", "rv"}},
    {"vhelio_err_kms", "km/s", {"radial_velocity_error", "vhelio_err", "e_vhelio", "e_RV", "e_rv"}},
    {"corr_pmra_pmdec", "", {"pmra_pmdec_corr"}},
    {"corr_parallax_pmra", "", {"parallax_pmra_corr"}},
    {"corr_parallax_pmdec", "", {"parallax_pmdec_corr"}},
    {"parallax_offset_mas", "mas", {"parallax_zero_point", "plx_offset"}},
    {"distance_kpc", "kpc", {"distance", "dist", "Dist"}},
    {"distance_err_kpc",
     "kpc",
     {"distance_error", "distance_err", "e_distance", "e_dist", "e_Dist"}},
    {"group", "", {"arm", "segment"}},
};

constexpr std::size_t npos = std::size_t(-1);

// The file's column for each of ours (npos: absent), by the map, our name or one alias.
class Columns {
public:
  Columns(const io::InputTable& t, const CatalogOptions& o) : t_(t) {
    for (const auto& [ours, theirs] : o.columns) {
      bool known = false;
      for (const auto& w : kWanted)
        known = known || ours == w.ours;
      if (!known)
        throw InputError(SourcePlace{t.file(), 0, 0, ours},
                         "the column map names a column undertow does not read (" + list() + ")");
      if (!t.has_column(theirs))
        throw InputError(SourcePlace{t.file(), t.header_line(), 0, theirs},
                         "the column map says '" + ours + "' is in column '" + theirs +
                             "', which the file does not have");
    }
    for (const auto& w : kWanted) {
      std::size_t c = npos;
      if (const auto it = o.columns.find(w.ours); it != o.columns.end())
        c = t.column(it->second);
      else if (t.has_column(w.ours))
        c = t.column(w.ours);
      else
        for (const char* a : w.aliases)
          if (t.has_column(a)) {
            if (c != npos)
              throw InputError(SourcePlace{t.file(), t.header_line(), 0, a},
                               std::string("both '") + t.name(c) + "' and '" + a + "' could be " +
                                   w.ours + "; say which with a column map (" + w.ours + "=...)");
            c = t.column(a);
          }
      if (c != npos) check_unit(w, c);
      at_.push_back(c);
    }
  }
  std::size_t operator()(const std::string& ours) const {
    for (std::size_t k = 0; k < std::size(kWanted); ++k)
      if (ours == kWanted[k].ours) return at_[k];
    return npos;
  }
  std::size_t required(const std::string& ours) const {
    const std::size_t c = (*this)(ours);
    if (c == npos)
      throw InputError(SourcePlace{t_.file(), t_.header_line(), 0, ours},
                       "missing column (nor any of its other spellings, nor a column map entry)");
    return c;
  }
  // The file's column c is read as one of ours.
  bool reads(std::size_t c) const { return std::find(at_.begin(), at_.end(), c) != at_.end(); }

private:
  // A file with units (ECSV, FITS) must use ours; CSV carries none.
  void check_unit(const Wanted& w, std::size_t c) const {
    const std::string& u = t_.unit(c);
    if (u.empty()) return;
    const std::string want = io::fits_unit(w.unit);
    try {
      if (io::same_unit(u, w.unit)) return;
    } catch (const std::invalid_argument&) { // not a unit we know: not ours either
    }
    throw InputError(t_.header_place(c), "unit '" + u + "', but " + w.ours + " is read in " +
                                             (want.empty() ? std::string("no unit (a pure number)")
                                                           : "'" + want + "'") +
                                             "; convert the column or give it in that unit");
  }
  static std::string list() {
    std::string s;
    for (const auto& w : kWanted)
      s += (s.empty() ? "" : ", ") + std::string(w.ours);
    return s;
  }
  const io::InputTable& t_;
  std::vector<std::size_t> at_;
};

Catalog from_table(const io::InputTable& t, const CatalogOptions& o) {
  Catalog c;
  c.file = t.file();
  const Columns cols(t, o);
  const std::size_t name = cols.required("name");
  const char* astrometry[] = {"ra_deg",     "dec_deg",        "parallax_mas", "parallax_err_mas",
                              "pmra_masyr", "pmra_err_masyr", "pmdec_masyr",  "pmdec_err_masyr"};
  std::size_t col[10]; // those, then the velocity and its error
  // no parallax column but a distance: distances given directly (parallax fields stay zero)
  const bool distances = cols("parallax_mas") == npos && cols("distance_kpc") != npos;
  c.distances = distances;
  if (distances) {
    astrometry[2] = "distance_kpc", astrometry[3] = "distance_err_kpc";
    for (const char* p : {"corr_parallax_pmra", "corr_parallax_pmdec", "parallax_offset_mas"})
      if (cols(p) != npos)
        throw InputError(t.header_place(cols(p)),
                         "a catalog of distances has no parallax: this column does not apply");
  }
  for (int k = 0; k < 8; ++k)
    col[k] = cols.required(astrometry[k]);
  const std::size_t vl = cols("vlsr_kms"), vh = cols("vhelio_kms");
  if (vl != npos && vh != npos)
    throw InputError(t.header_place(vh), "both an LSR velocity ('" + t.name(vl) +
                                             "') and a heliocentric one: give one (a column "
                                             "map can pick it)");
  const bool helio = vl == npos && vh != npos;
  c.heliocentric_velocities = helio;
  col[8] = cols.required(helio ? "vhelio_kms" : "vlsr_kms");
  col[9] = cols.required(helio ? "vhelio_err_kms" : "vlsr_err_kms");
  const std::size_t ccorr = cols("corr_pmra_pmdec"), cgroup = cols("group");
  const bool has_corr = ccorr != npos, has_group = cgroup != npos;
  const std::size_t ccw_a = cols("corr_parallax_pmra"), ccw_d = cols("corr_parallax_pmdec"),
                    coff = cols("parallax_offset_mas");
  const auto warn = [&](const SourcePlace& where, const std::string& what) {
    c.warnings.push_back(InputError::format(where, what));
  };
  for (std::size_t k = 0; k < t.columns(); ++k)
    if (!cols.reads(k))
      warn(t.header_place(k), "not a column undertow reads (docs/catalog-format.md): ignored");
  std::map<std::string, int> first_line; // of each source name
  for (std::size_t r = 0; r < t.rows(); ++r) {
    Source s;
    s.line = t.line_of(r);
    s.name = t.cell(r, name);
    if (s.name.empty()) throw InputError(t.place(r, name), "empty source name");
    double* dst[] = {&s.ra_deg,     &s.dec_deg,        &s.parallax_mas, &s.parallax_err_mas,
                     &s.pmra_masyr, &s.pmra_err_masyr, &s.pmdec_masyr,  &s.pmdec_err_masyr,
                     &s.vlsr_kms,   &s.vlsr_err_kms};
    if (distances) dst[2] = &s.distance_kpc, dst[3] = &s.distance_err_kpc;
    for (int k = 0; k < 10; ++k)
      *dst[k] = t.number(r, col[k]);
    for (int k : {3, 5, 7, 9})
      if (!(*dst[k] > 0)) throw InputError(t.place(r, col[k]), "errors must be positive");
    if (distances && !(s.distance_kpc > 0))
      throw InputError(t.place(r, col[2]), "a distance must be positive");
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
    if (const auto [it, fresh] = first_line.emplace(s.name, s.line); !fresh)
      warn(t.place(r, name), "'" + s.name + "' names an earlier source too (line " +
                                 std::to_string(it->second) +
                                 "): both are kept, and outputs will show the name twice");
    if (!distances && !(s.parallax_mas > 0))
      warn(t.place(r, col[2]),
           "parallax " + detail::num(s.parallax_mas) +
               " mas is not positive: kept; the kinematic and arm fits and residuals' posterior "
               "distances use it, residuals with 1/parallax distances leave it out");
    // 1000 mas is closer than 1 pc, nearer than any star (the largest stellar parallax is about
    // 770 mas, from memory): a unit slip, most likely
    if (!distances && s.parallax_mas > 1000)
      warn(t.place(r, col[2]), "parallax " + detail::num(s.parallax_mas) +
                                   " mas puts the source closer than 1 pc: is the column in mas?");
    if (helio) // the LSR velocity the rest of undertow reads, by the LSR the caller uses
      s.vlsr_kms = sky::helio_to_lsr(s.vlsr_kms, s.ra_deg, s.dec_deg, o.lsr);
    c.sources.push_back(std::move(s));
  }
  return c;
}

} // namespace

void print_catalog_warnings(const Catalog& c, std::ostream& out, std::size_t shown) {
  for (std::size_t i = 0; i < c.warnings.size() && i < shown; ++i)
    out << "warning: " << c.warnings[i] << "\n";
  if (c.warnings.size() > shown)
    out << "warning: ... and " << c.warnings.size() - shown << " more of the same kinds in "
        << c.file << "\n";
}

Catalog read_catalog(const std::string& path, const CatalogOptions& o) {
  return from_table(io::InputTable::read_file(path), o);
}
Catalog parse_catalog(const std::string& text, const std::string& n, const CatalogOptions& o) {
  return from_table(io::InputTable::parse(text, n), o);
}

std::map<std::string, std::string> parse_column_map(const std::string& text,
                                                    const std::string& where) {
  std::map<std::string, std::string> m;
  std::size_t b = 0;
  while (b <= text.size() && !text.empty()) {
    const std::size_t e = std::min(text.find(',', b), text.size());
    const std::string item = text.substr(b, e - b);
    const auto eq = item.find('=');
    if (eq == std::string::npos || eq == 0 || eq + 1 == item.size())
      throw InputError(where + ": '" + item + "' is not OURS=THEIRS (e.g. parallax_mas=plx)");
    if (!m.emplace(item.substr(0, eq), item.substr(eq + 1)).second)
      throw InputError(where + ": '" + item.substr(0, eq) + "' mapped twice");
    b = e + 1;
  }
  return m;
}

io::Table catalog_table(const Catalog& c, const std::string& comment) {
  io::Table t;
  t.title = "undertow catalog: columns and units in docs/catalog-format.md";
  if (!comment.empty()) t.notes.push_back(comment);
  t.text_headers = {"name", "group"};
  const io::Column w = c.distances ? io::Column{"distance_kpc", "", "", "kpc"}
                                   : io::Column{"parallax_mas", "", "", "mas"},
                   sw = c.distances ? io::Column{"distance_err_kpc", "", "", "kpc"}
                                    : io::Column{"parallax_err_mas", "", "", "mas"};
  t.columns = {{"ra_deg", "", "", "deg"},
               {"dec_deg", "", "", "deg"},
               w,
               sw,
               {"pmra_masyr", "", "", "mas/yr"},
               {"pmra_err_masyr", "", "", "mas/yr"},
               {"pmdec_masyr", "", "", "mas/yr"},
               {"pmdec_err_masyr", "", "", "mas/yr"},
               {"vlsr_kms", "", "", "km/s"},
               {"vlsr_err_kms", "", "", "km/s"},
               {"corr_pmra_pmdec", "", "", ""}};
  const auto any = [&](double Source::*m) {
    return std::any_of(c.sources.begin(), c.sources.end(),
                       [&](const Source& s) { return s.*m != 0; });
  };
  const bool w_pm = any(&Source::corr_w_pa) || any(&Source::corr_w_pd),
             offset = any(&Source::parallax_offset_mas);
  if (w_pm) t.columns.push_back({"corr_parallax_pmra", "", "", ""});
  if (w_pm) t.columns.push_back({"corr_parallax_pmdec", "", "", ""});
  if (offset) t.columns.push_back({"parallax_offset_mas", "", "", "mas"});
  for (const auto& s : c.sources) {
    std::vector<double> row{s.ra_deg,
                            s.dec_deg,
                            c.distances ? s.distance_kpc : s.parallax_mas,
                            c.distances ? s.distance_err_kpc : s.parallax_err_mas,
                            s.pmra_masyr,
                            s.pmra_err_masyr,
                            s.pmdec_masyr,
                            s.pmdec_err_masyr,
                            s.vlsr_kms,
                            s.vlsr_err_kms,
                            s.corr_pm};
    if (w_pm) row.push_back(s.corr_w_pa), row.push_back(s.corr_w_pd);
    if (offset) row.push_back(s.parallax_offset_mas);
    t.add_row({s.name, s.group}, std::move(row));
  }
  return t;
}

void write_catalog(const std::string& path, const Catalog& c, const std::string& comment) {
  io::write_table_file(path, catalog_table(c, comment), io::machine_format_of_path(path));
}

} // namespace undertow::residuals

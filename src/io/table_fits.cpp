#include "undertow/io/table_fits.hpp"

#include <algorithm>
#include <cstring>
#include <filesystem>

#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/fits_status.hpp"
#include "undertow/io/unit_notation.hpp"

namespace undertow::io {

namespace {

// FITS headers and character columns hold printable ASCII only: the symbols and signs our
// tables use, spelled out; anything else becomes '?'.
std::string ascii_text(const std::string& s) {
  static const std::pair<const char*, const char*> spelled[] = {
      {"α", "alpha"}, {"β", "beta"},  {"γ", "gamma"}, {"δ", "delta"},  {"Δ", "Delta"}, {"ε", "eps"},
      {"θ", "theta"}, {"Θ", "Theta"}, {"κ", "kappa"}, {"λ", "lambda"}, {"μ", "mu"},    {"ν", "nu"},
      {"π", "pi"},    {"ϖ", "varpi"}, {"ρ", "rho"},   {"σ", "sigma"},  {"Σ", "Sigma"}, {"τ", "tau"},
      {"φ", "phi"},   {"χ", "chi"},   {"ψ", "psi"},   {"ω", "omega"},  {"Ω", "Omega"}, {"±", "+/-"},
      {"−", "-"},     {"–", "-"},     {"—", "-"},     {"×", "x"},      {"²", "^2"},    {"³", "^3"},
      {"⁻¹", "^-1"},  {"≥", ">="},    {"≤", "<="},    {"≈", "~"},      {"√", "sqrt"},  {"⊙", "sun"},
      {"°", " deg"},  {"∞", "inf"},   {"…", "..."},   {"’", "'"}};
  std::string o;
  for (std::size_t i = 0; i < s.size();) {
    const auto c = static_cast<unsigned char>(s[i]);
    if (c >= 32 && c < 127) {
      o += s[i++];
      continue;
    }
    bool known = false;
    for (const auto& [u, a] : spelled)
      if (s.compare(i, std::strlen(u), u) == 0) {
        o += a, i += std::strlen(u), known = true;
        break;
      }
    if (known) continue;
    o += '?';
    ++i;
    while (i < s.size() && (static_cast<unsigned char>(s[i]) & 0xC0) == 0x80)
      ++i; // the rest of the code point
  }
  return o;
}

class Writer {
public:
  explicit Writer(const std::string& target, const std::string& path) : target_(target) {
    check(fits_create_file(&f_, ("!" + path).c_str(), &status_));
  }
  ~Writer() {
    int s = 0;
    if (f_) fits_close_file(f_, &s);
  }
  fitsfile* file() { return f_; }
  void check(int) {
    if (status_ == 0) return;
    // CFITSIO reports a failed write (a full disk among others) as WRITE_ERROR: say what the
    // other formats say
    throw InputError(SourcePlace{target_, 0, 0, {}},
                     "cannot write the FITS table: " + fits_status_text(status_) +
                         (status_ == WRITE_ERROR ? " (disk full?)" : ""));
  }
  int* status() { return &status_; }
  void close() {
    fitsfile* f = f_;
    f_ = nullptr;
    check(fits_close_file(f, &status_));
  }

private:
  std::string target_;
  fitsfile* f_ = nullptr;
  int status_ = 0;
};

} // namespace

void write_table_fits(const std::string& path, const Table& t, std::string extname) {
  if (extname.empty()) extname = std::filesystem::path(path).stem().string();
  const bool labels = t.has_text_columns();
  const std::size_t n_text = labels ? t.text_headers.size() : 0;
  std::vector<std::string> names, forms, units;
  // the text columns as FITS character columns hold them: ASCII, padded to the longest
  std::vector<std::vector<std::string>> text(n_text);
  for (std::size_t k = 0; k < n_text; ++k) {
    std::size_t width = 1;
    for (const auto& r : t.text_rows)
      width = std::max(width, text[k].emplace_back(ascii_text(r[k])).size());
    names.push_back(t.text_headers[k]), forms.push_back(std::to_string(width) + "A");
    units.emplace_back();
  }
  for (const auto& c : t.columns)
    names.push_back(c.name), forms.push_back("1D"), units.push_back(fits_unit(c.unit));
  std::vector<char*> n, f, u;
  for (std::size_t i = 0; i < names.size(); ++i)
    n.push_back(names[i].data()), f.push_back(forms[i].data()), u.push_back(units[i].data());

  AtomicPath out(path);
  {
    Writer w(path, out.temporary());
    int* st = w.status();
    w.check(fits_create_tbl(w.file(), BINARY_TBL, LONGLONG(t.rows.size()), int(names.size()),
                            n.data(), f.data(), u.data(), extname.c_str(), st));
    // the symbols, where plain ASCII, as the comments of the TTYPEn cards
    for (std::size_t c = 0; c < t.columns.size(); ++c)
      if (!t.columns[c].plain.empty()) {
        const std::string key = "TTYPE" + std::to_string(c + 1 + n_text);
        w.check(
            fits_modify_comment(w.file(), key.c_str(), ascii_text(t.columns[c].plain).c_str(), st));
      }
    if (!t.title.empty()) w.check(fits_write_comment(w.file(), ascii_text(t.title).c_str(), st));
    for (const auto& note : t.notes)
      w.check(fits_write_comment(w.file(), ascii_text(note).c_str(), st));
    int col = 1;
    for (auto& column : text) {
      std::vector<char*> p;
      for (auto& s : column)
        p.push_back(s.data());
      if (!p.empty())
        w.check(fits_write_col(w.file(), TSTRING, col, 1, 1, LONGLONG(p.size()), p.data(), st));
      ++col;
    }
    std::vector<double> v(t.rows.size());
    for (std::size_t c = 0; c < t.columns.size(); ++c, ++col) {
      for (std::size_t r = 0; r < t.rows.size(); ++r)
        v[r] = t.rows[r][c];
      if (!v.empty())
        w.check(fits_write_col(w.file(), TDOUBLE, col, 1, 1, LONGLONG(v.size()), v.data(), st));
    }
    w.close();
  }
  out.commit();
}

} // namespace undertow::io

#include "undertow/io/fits_status.hpp"
#include "undertow/io/input_table.hpp"
#include "undertow/io/table.hpp"

namespace undertow::io {

namespace {
struct Closer {
  fitsfile* f = nullptr;
  ~Closer() {
    int s = 0;
    if (f) fits_close_file(f, &s);
  }
};
} // namespace

InputTable read_fits_table(const std::string& path) {
  const auto fail = [&](const std::string& field, const std::string& what) {
    return InputError(SourcePlace{path, 0, 0, field}, what);
  };
  Closer c;
  int st = 0;
  if (fits_open_file(&c.f, path.c_str(), READONLY, &st))
    throw fail("", "cannot read it as FITS: " + fits_status_text(st));
  // The first binary table (a catalog is one table; an ASCII table is not read).
  int hdus = 0, type = 0;
  fits_get_num_hdus(c.f, &hdus, &st);
  int table = 0;
  for (int h = 1; h <= hdus && table == 0 && st == 0; ++h)
    if (fits_movabs_hdu(c.f, h, &type, &st) == 0 && type == BINARY_TBL) table = h;
  if (st) throw fail("", "cannot read it as FITS: " + fits_status_text(st));
  if (table == 0)
    throw fail("", "a FITS file without a binary table (" + std::to_string(hdus) +
                       " HDU(s), none a BINTABLE): a catalog is a binary-table extension");
  long rows = 0;
  int cols = 0;
  fits_get_num_rows(c.f, &rows, &st);
  fits_get_num_cols(c.f, &cols, &st);
  InputTable t(path, TableFileKind::fits);
  std::vector<std::string> names, units;
  const auto nrows = static_cast<std::size_t>(rows), ncols = static_cast<std::size_t>(cols);
  std::vector<std::vector<std::string>> data(nrows, std::vector<std::string>(ncols));
  for (int k = 1; k <= cols; ++k) {
    char key[FLEN_KEYWORD], value[FLEN_VALUE], comment[FLEN_COMMENT];
    std::snprintf(key, sizeof key, "TTYPE%d", k);
    if (fits_read_key(c.f, TSTRING, key, value, comment, &st))
      throw fail("column " + std::to_string(k), "no name (" + std::string(key) + ")");
    names.emplace_back(value);
    std::snprintf(key, sizeof key, "TUNIT%d", k);
    int s2 = 0;
    units.emplace_back(fits_read_key(c.f, TSTRING, key, value, comment, &s2) == 0 ? value : "");
    int typecode = 0;
    long repeat = 0, width = 0;
    fits_get_coltype(c.f, k, &typecode, &repeat, &width, &st);
    if (typecode != TSTRING && repeat != 1)
      throw fail(names.back(), "a column of " + std::to_string(repeat) +
                                   " values per row: a catalog column holds one");
    if (typecode == TSTRING) {
      std::vector<std::string> buf(nrows, std::string(static_cast<std::size_t>(width) + 1, '\0'));
      std::vector<char*> p;
      for (auto& b : buf)
        p.push_back(b.data());
      int anynul = 0;
      if (rows > 0) fits_read_col(c.f, TSTRING, k, 1, 1, rows, nullptr, p.data(), &anynul, &st);
      for (long r = 0; r < rows; ++r)
        data[std::size_t(r)][std::size_t(k - 1)] = p[std::size_t(r)];
    } else if (typecode == TBYTE || typecode == TSBYTE || typecode == TSHORT ||
               typecode == TUSHORT || typecode == TINT32BIT || typecode == TLONG ||
               typecode == TLONGLONG) {
      // integers as integers (a 64-bit source id keeps every digit)
      std::vector<LONGLONG> v(nrows);
      std::vector<char> null(nrows, 0);
      int anynul = 0;
      if (rows > 0)
        fits_read_colnull(c.f, TLONGLONG, k, 1, 1, rows, v.data(), null.data(), &anynul, &st);
      for (long r = 0; r < rows; ++r)
        data[std::size_t(r)][std::size_t(k - 1)] =
            null[std::size_t(r)] ? "" : std::to_string(v[std::size_t(r)]);
    } else {
      // floating-point columns as doubles, exactly
      std::vector<double> v(nrows);
      std::vector<char> null(nrows, 0);
      int anynul = 0;
      if (rows > 0)
        fits_read_colnull(c.f, TDOUBLE, k, 1, 1, rows, v.data(), null.data(), &anynul, &st);
      for (long r = 0; r < rows; ++r) // an undefined value reads as empty: "empty value"
        data[std::size_t(r)][std::size_t(k - 1)] =
            null[std::size_t(r)] ? "" : exact_number(v[std::size_t(r)]);
    }
    if (st) throw fail(names.back(), "cannot read the column: " + fits_status_text(st));
  }
  t.set_header(names, units, 0);
  for (long r = 0; r < rows; ++r)
    t.add_row(std::move(data[std::size_t(r)]), int(r + 1));
  t.finish();
  return t;
}

} // namespace undertow::io

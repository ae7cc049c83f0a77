#include "undertow/plot/figure.hpp"

#include <fontconfig/fontconfig.h>
#include <plplot/plstream.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <mutex>
#include <numbers>
#include <sstream>
#include <stdexcept>
#include <string_view>
#include <unistd.h>

#include "undertow/error.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/creation_time.hpp"
#include "undertow/io/text_file.hpp"

namespace undertow::plot {
namespace {

std::string device_of(Format f) {
  switch (f) {
  case Format::png:
    return "pngcairo";
  case Format::svg:
    return "svgcairo";
  case Format::pdf:
    return "pdfcairo";
  }
  return "";
}

// PLplot's list of compiled-in and dynamically loadable devices.
bool has_device(const std::string& name) {
  static std::vector<std::string> names = [] {
    std::vector<const char*> menu(256), devs(256);
    int n = int(menu.size());
    const char** m = menu.data();
    const char** d = devs.data();
    plgDevs(&m, &d, &n);
    return std::vector<std::string>(devs.begin(), devs.begin() + n);
  }();
  return std::find(names.begin(), names.end(), name) != names.end();
}

// fontconfig's best match for "sans-serif" must be a font file: without one the cairo drivers
// would draw labels in whatever fallback glyphs they find, or none.
void require_sans_font() {
  static const std::string missing = [] {
    if (!FcInit()) return std::string("fontconfig could not be initialised");
    FcPattern* pat = FcNameParse(reinterpret_cast<const FcChar8*>("sans-serif"));
    FcConfigSubstitute(nullptr, pat, FcMatchPattern);
    FcDefaultSubstitute(pat);
    FcResult res;
    FcPattern* match = FcFontMatch(nullptr, pat, &res);
    FcChar8* file = nullptr;
    const bool ok = match && FcPatternGetString(match, FC_FILE, 0, &file) == FcResultMatch &&
                    file && std::filesystem::exists(reinterpret_cast<const char*>(file));
    if (match) FcPatternDestroy(match);
    FcPatternDestroy(pat);
    return ok ? std::string() : std::string("no sans-serif font found by fontconfig");
  }();
  if (!missing.empty())
    throw InputError("figures: " + missing + " (install a font package, e.g. fonts-dejavu-core)");
}

// PLplot reports recoverable errors through plabort; keep the message and throw after the call.
thread_local std::string plplot_error;
void on_abort(PLCHAR_VECTOR msg) {
  plplot_error = msg ? msg : "unknown PLplot error";
}

constexpr double kPointsPerMm = 72 / 25.4;

// PLplot does not report the cairo drivers' write errors (a full disk): a file that lacks its
// format's closing bytes is refused rather than committed. PNG ends with the IEND chunk (PNG
// specification, ISO/IEC 15948, 11.2.5), PDF with %%EOF (ISO 32000-1, 7.5.5), SVG with </svg>.
bool whole_file(const std::string& path, Format format) {
  std::string s = io::read_file_bytes(path);
  if (format != Format::png)
    while (!s.empty() && (s.back() == '\n' || s.back() == '\r' || s.back() == ' '))
      s.pop_back();
  const auto ends = [&](std::string_view tail) {
    return s.size() >= tail.size() && s.compare(s.size() - tail.size(), tail.size(), tail) == 0;
  };
  switch (format) {
  case Format::png:
    return ends(std::string_view("IEND\xae\x42\x60\x82", 8));
  case Format::pdf:
    return ends("%%EOF");
  case Format::svg:
    return ends("</svg>");
  }
  return false;
}

// cairo writes the time of drawing as a PDF's /CreationDate (D:YYYYMMDDHHmmSSZ); with
// SOURCE_DATE_EPOCH set, that time instead, in place and of the same length, so that the
// cross-reference table's byte offsets still hold.
void fix_pdf_date(const std::string& path) {
  if (!io::fixed_creation_time()) return;
  std::string s = io::read_file_bytes(path);
  const std::string key = "/CreationDate (D:";
  const auto at = s.find(key);
  if (at == std::string::npos) return;
  const std::string date = io::creation_time_utc("%Y%m%d%H%M%SZ");
  const auto from = at + key.size();
  if (s.size() < from + date.size() + 1 || s[from + date.size()] != ')' ||
      s[from + date.size() - 1] != 'Z')
    return; // some other layout of the date: left as cairo wrote it
  s.replace(from, date.size(), date);
  std::ofstream out(path, std::ios::binary | std::ios::trunc);
  out << s;
  if (!out.flush()) throw InputError(path + ": write failed (disk full?); nothing written");
}

} // namespace

void require_drawing(const std::vector<Format>& formats) {
  for (Format f : formats)
    if (!has_device(device_of(f)))
      throw InputError("figures: PLplot has no '" + device_of(f) +
                       "' driver (install plplot-driver-cairo)");
  require_sans_font();
}

Format format_from_name(const std::string& name) {
  if (name == "png") return Format::png;
  if (name == "svg") return Format::svg;
  if (name == "pdf") return Format::pdf;
  throw InputError("figure format '" + name + "' is not one of png, svg, pdf");
}

std::string extension(Format f) {
  switch (f) {
  case Format::png:
    return "png";
  case Format::svg:
    return "svg";
  case Format::pdf:
    return "pdf";
  }
  return "";
}

std::vector<Format> formats_from_list(const std::string& list) {
  std::vector<Format> out;
  std::stringstream ss(list);
  std::string item;
  while (std::getline(ss, item, ','))
    if (!item.empty()) {
      const Format f = format_from_name(item);
      if (std::find(out.begin(), out.end(), f) == out.end()) out.push_back(f);
    }
  if (out.empty()) throw InputError("no figure format given (choose from png, svg, pdf)");
  return out;
}

Figure::Figure(std::string path, Format format, const Page& page)
    : path_(std::move(path)), format_(format), page_(page) {
  if (!(page.width_mm > 10 && page.height_mm > 10 && page.width_mm < 2000 && page.height_mm < 2000))
    throw InputError("figure size must be between 10 and 2000 mm, got " +
                     std::to_string(page.width_mm) + " x " + std::to_string(page.height_mm));
  if (!(page.dpi >= 30 && page.dpi <= 2400))
    throw InputError("figure resolution must be between 30 and 2400 dpi");
  const std::string dev = device_of(format);
  if (!has_device(dev))
    throw InputError("figures: PLplot has no '" + dev + "' driver (install plplot-driver-cairo)");
  require_sans_font();
  const std::filesystem::path p(path_);
  const auto dir = p.has_parent_path() ? p.parent_path() : std::filesystem::path(".");
  if (!std::filesystem::is_directory(dir))
    throw InputError(path_ + ": folder " + dir.string() + " does not exist");
  if (access(dir.c_str(), W_OK) != 0) throw InputError(path_ + ": folder is not writable");
  tmp_ = (dir / io::AtomicPath::temporary_name(p.filename().string())).string();

  static std::once_flag once;
  std::call_once(once, [] { plsabort(on_abort); });
  plplot_error.clear(); // from an abandoned figure
  pls_ = std::make_unique<plstream>();
  plstream& s = *pls_;
  s.sdev(dev.c_str());
  s.sfnam(tmp_.c_str());
  const double ppi = format == Format::png ? page.dpi : 72.0;
  s.spage(ppi, ppi, PLINT(std::lround(page.width_mm / 25.4 * ppi)),
          PLINT(std::lround(page.height_mm / 25.4 * ppi)), 0, 0);
  const auto paper = kPaper.bytes();
  s.scolbg(paper[0], paper[1], paper[2]);
  s.init();
  if (!plplot_error.empty()) {
    const std::string e = plplot_error;
    plplot_error.clear();
    pls_.reset(); // the destructor does not run for a constructor that throws
    std::remove(tmp_.c_str());
    throw InputError(path_ + ": " + e);
  }
  s.sfont(PL_FCI_SANS, PL_FCI_UPRIGHT, PL_FCI_MEDIUM);
  s.scmap0n(16);
  s.adv(0);
  text_scale(1.0);
  s.smaj(1.4 * mm_scale(), 1.0);
  s.smin(0.8 * mm_scale(), 1.0);
  colour(kInk);
  line_width(0.6);
  // The sequential() map as colour map 1, for images.
  std::vector<PLINT> r(256), g(256), b(256);
  for (int i = 0; i < 256; ++i) {
    const auto c = sequential(i / 255.0).bytes();
    r[i] = c[0], g[i] = c[1], b[i] = c[2];
  }
  s.scmap1n(256);
  s.scmap1(r.data(), g.data(), b.data(), 256);
}

Figure::~Figure() {
  if (!done_) {
    pls_.reset();
    std::remove(tmp_.c_str());
  }
}

void Figure::colour(const Rgb& c, double alpha) {
  const auto v = c.bytes();
  pls_->scol0a(15, v[0], v[1], v[2], alpha);
  pls_->col0(15);
}

// Line widths in PLplot's cairo drivers are in device units (pixels or points).
void Figure::line_width(double points) {
  const double ppi = format_ == Format::png ? page_.dpi : 72.0;
  pls_->width(points / 72.0 * ppi);
}

// PLplot's cairo drivers turn millimetres into device units at 72 per inch whatever the page's
// resolution, so lengths given to PLplot in mm are scaled for PNG pages.
double Figure::mm_scale() const {
  return format_ == Format::png ? page_.dpi / 72.0 : 1.0;
}

void Figure::text_scale(double s) {
  pls_->schr(page_.text_mm * mm_scale(), s);
}

void Figure::panel(const Panel& p) {
  panel_ = p;
  pls_->vpor(p.x0, p.x1, p.y0, p.y1);
  pls_->wind(p.xmin, p.xmax, p.ymin, p.ymax);
}

void Figure::equal_panel(const Panel& p) {
  panel_ = p;
  pls_->vpor(p.x0, p.x1, p.y0, p.y1);
  pls_->wind(p.xmin, p.xmax, p.ymin, p.ymax);
  // Shrink the viewport so one kpc is as long in x as in y.
  const double w_mm = (p.x1 - p.x0) * page_.width_mm, h_mm = (p.y1 - p.y0) * page_.height_mm;
  const double sx = (p.xmax - p.xmin) / w_mm, sy = (p.ymax - p.ymin) / h_mm;
  double x0 = p.x0, x1 = p.x1, y0 = p.y0, y1 = p.y1;
  if (sx > sy) { // x is the tighter: shorten y
    const double h = (p.ymax - p.ymin) / sx / page_.height_mm, c = 0.5 * (y0 + y1);
    y0 = c - 0.5 * h, y1 = c + 0.5 * h;
  } else {
    const double w = (p.xmax - p.xmin) / sy / page_.width_mm, c = 0.5 * (x0 + x1);
    x0 = c - 0.5 * w, x1 = c + 0.5 * w;
  }
  panel_.x0 = x0, panel_.x1 = x1, panel_.y0 = y0, panel_.y1 = y1;
  pls_->vpor(x0, x1, y0, y1);
  pls_->wind(p.xmin, p.xmax, p.ymin, p.ymax);
}

void Figure::axes(const std::string& x_label, const std::string& y_label, bool x_numbers,
                  bool y_numbers, bool log_x, bool log_y, double x_tick, double y_tick) {
  plstream& s = *pls_;
  // Light grid at the major ticks, under a frame with ticks pointing out on the labelled sides.
  colour(kGrid);
  line_width(0.4);
  s.box(log_x ? "gl" : "g", x_tick, 0, log_y ? "gl" : "g", y_tick, 0);
  colour(kInk);
  line_width(0.6);
  std::string xo = "bsti", yo = "bstiv";
  if (x_numbers) xo += "n";
  if (y_numbers) yo += "n";
  if (log_x) xo += "l";
  if (log_y) yo += "l";
  s.box(xo.c_str(), x_tick, 0, yo.c_str(), y_tick, 0);
  s.box("c", 0, 0, "c", 0, 0);
  if (!x_label.empty()) s.mtex("b", label_x_, 0.5, 0.5, x_label.c_str());
  if (!y_label.empty()) s.mtex("l", y_numbers ? label_y_ : 1.2, 0.5, 0.5, y_label.c_str());
}

void Figure::line(const std::vector<double>& x, const std::vector<double>& y) {
  pls_->lsty(1);
  pls_->line(PLINT(std::min(x.size(), y.size())), x.data(), y.data());
}

void Figure::dashed(const std::vector<double>& x, const std::vector<double>& y) {
  const PLINT mark = PLINT(1500 * mm_scale()), space = PLINT(1000 * mm_scale()); // micrometres
  pls_->styl(1, &mark, &space);
  pls_->line(PLINT(std::min(x.size(), y.size())), x.data(), y.data());
  pls_->lsty(1);
}

namespace {
// World units per millimetre on the page, for the current viewport and window.
std::pair<double, double> world_per_mm(plstream& s, const Page& page) {
  PLFLT vx0, vx1, vy0, vy1, wx0, wx1, wy0, wy1;
  s.gvpd(vx0, vx1, vy0, vy1);
  s.gvpw(wx0, wx1, wy0, wy1);
  return {(wx1 - wx0) / ((vx1 - vx0) * page.width_mm),
          (wy1 - wy0) / ((vy1 - vy0) * page.height_mm)};
}
} // namespace

void Figure::points(const std::vector<double>& x, const std::vector<double>& y, double size_mm,
                    bool filled) {
  const auto [kx, ky] = world_per_mm(*pls_, page_);
  const int kSides = size_mm < 0.8 ? 8 : 20; // tiny markers need no round outline
  std::vector<double> px(kSides + 1), py(kSides + 1);
  for (std::size_t i = 0; i < std::min(x.size(), y.size()); ++i) {
    if (!std::isfinite(x[i]) || !std::isfinite(y[i])) continue;
    for (int k = 0; k <= kSides; ++k) {
      const double a = 2 * std::numbers::pi * k / kSides;
      px[k] = x[i] + 0.5 * size_mm * kx * std::cos(a);
      py[k] = y[i] + 0.5 * size_mm * ky * std::sin(a);
    }
    if (filled)
      pls_->fill(kSides, px.data(), py.data());
    else
      pls_->line(kSides + 1, px.data(), py.data());
  }
}

void Figure::fill(const std::vector<double>& x, const std::vector<double>& y) {
  pls_->fill(PLINT(std::min(x.size(), y.size())), x.data(), y.data());
}

void Figure::error_bars_y(const std::vector<double>& x, const std::vector<double>& lo,
                          const std::vector<double>& hi) {
  const std::size_t n = std::min({x.size(), lo.size(), hi.size()});
  for (std::size_t i = 0; i < n; ++i)
    if (std::isfinite(lo[i]) && std::isfinite(hi[i])) pls_->join(x[i], lo[i], x[i], hi[i]);
}

void Figure::arrow(double x, double y, double dx, double dy, double head_mm) {
  const auto [kx, ky] = world_per_mm(*pls_, page_);
  // In millimetres, so the head has the same shape whatever the axes' scales.
  const double ux = dx / kx, uy = dy / ky, len = std::hypot(ux, uy);
  if (!(len > 0)) return;
  const double h = std::min(head_mm, 0.6 * len), ex = ux / len, ey = uy / len;
  const double bx = x + (ux - h * ex) * kx, by = y + (uy - h * ey) * ky;
  pls_->join(x, y, bx, by);
  std::vector<double> px{x + dx, bx - 0.4 * h * ey * kx, bx + 0.4 * h * ey * kx};
  std::vector<double> py{y + dy, by + 0.4 * h * ex * ky, by - 0.4 * h * ex * ky};
  pls_->fill(3, px.data(), py.data());
}

void Figure::ellipse(double x, double y, double a, double b, double angle_rad) {
  constexpr int kSides = 40;
  std::vector<double> px(kSides + 1), py(kSides + 1);
  const double c = std::cos(angle_rad), s = std::sin(angle_rad);
  for (int k = 0; k <= kSides; ++k) {
    const double t = 2 * std::numbers::pi * k / kSides;
    const double u = a * std::cos(t), v = b * std::sin(t);
    px[k] = x + c * u - s * v, py[k] = y + s * u + c * v;
  }
  pls_->line(kSides + 1, px.data(), py.data());
}

void Figure::text(double x, double y, const std::string& s, double just, double angle_deg) {
  // PLplot takes the direction as a vector in world units: go through millimetres so the angle
  // is the one on the page.
  const auto [kx, ky] = world_per_mm(*pls_, page_);
  const double a = angle_deg * std::numbers::pi / 180;
  pls_->ptex(x, y, std::cos(a) * kx, std::sin(a) * ky, just, s.c_str());
}

void Figure::side_text(const std::string& side, double disp, double pos, double just,
                       const std::string& s) {
  pls_->mtex(side.c_str(), disp, pos, just, s.c_str());
}

namespace {
// Label widths for layout, estimated: DejaVu Sans averages about 0.6 em a character, and an em
// is about 1.35 of PLplot's character height; escape sequences (#u, #d, #g?) take no room.
double label_width_mm(const std::string& s, double char_mm) {
  double n = 0;
  for (std::size_t i = 0; i < s.size(); ++i) {
    if (s[i] == '#' && i + 1 < s.size()) { // "#u", "#d", and the "#g" of "#gX"
      ++i;
      continue;
    }
    if ((static_cast<unsigned char>(s[i]) & 0xC0) == 0x80) continue; // UTF-8 continuation
    n += 1;
  }
  return n * 0.6 * 1.35 * char_mm;
}
} // namespace

void Figure::draw_key(const Key& k, double x, double y, double kx, double ky, double sample) {
  colour(k.colour);
  if (k.kind == 'l' || k.kind == 'd') {
    line_width(1.0);
    if (k.kind == 'd')
      dashed({x, x + sample * kx}, {y, y});
    else
      pls_->join(x, y, x + sample * kx, y);
    line_width(0.6);
  } else if (k.kind == 'b') {
    const double hh = 0.5 * page_.text_mm * ky;
    std::vector<double> px{x, x + sample * kx, x + sample * kx, x};
    std::vector<double> py{y - hh, y - hh, y + hh, y + hh};
    colour(k.colour, 0.35);
    pls_->fill(4, px.data(), py.data());
  } else {
    line_width(0.8);
    points({x + 0.5 * sample * kx}, {y}, 1.2, k.kind != 'o');
    line_width(0.6);
  }
  colour(kInk);
  pls_->ptex(x + (sample + 1.0) * kx, y, 1, 0, 0, k.label.c_str());
}

void Figure::legend(const std::vector<Key>& keys, bool right) {
  const auto [kx, ky] = world_per_mm(*pls_, page_);
  PLFLT wx0, wx1, wy0, wy1;
  pls_->gvpw(wx0, wx1, wy0, wy1);
  const double row = 1.8 * page_.text_mm, pad = 1.5, sample = 4.0;
  double longest = 0;
  for (const auto& k : keys)
    longest = std::max(longest, label_width_mm(k.label, page_.text_mm));
  const double x = right ? wx1 - (pad + sample + 1.0 + longest) * kx : wx0 + pad * kx;
  double y = wy1 - (pad + 0.6 * row) * ky;
  for (const auto& k : keys) {
    draw_key(k, x, y, kx, ky, sample);
    y -= row * ky;
  }
}

void Figure::legend_above(const std::vector<Key>& keys) {
  // Outside the box PLplot clips, so the strip above it becomes a viewport of its own, in mm;
  // keys that do not fit on a row start the next.
  PLFLT vx0, vx1, vy0, vy1, wx0, wx1, wy0, wy1;
  pls_->gvpd(vx0, vx1, vy0, vy1);
  pls_->gvpw(wx0, wx1, wy0, wy1);
  const double w_mm = (vx1 - vx0) * page_.width_mm, sample = 4.0, row = 2.2 * page_.text_mm;
  std::vector<std::pair<double, int>> place; // x and row of each key
  double x = 0;
  int rows = 1;
  for (const auto& k : keys) {
    const double w = sample + 1.0 + label_width_mm(k.label, page_.text_mm);
    if (x > 0 && x + w > w_mm) x = 0, ++rows;
    place.emplace_back(x, rows - 1);
    x += w + 4.0;
  }
  const double h_mm = rows * row + 0.8 * page_.text_mm;
  pls_->vpor(vx0, vx1, vy1, std::min(1.0, vy1 + h_mm / page_.height_mm));
  pls_->wind(0, w_mm, 0, h_mm);
  for (std::size_t i = 0; i < keys.size(); ++i)
    draw_key(keys[i], place[i].first, h_mm - (place[i].second + 0.5) * row, 1, 1, sample);
  pls_->vpor(vx0, vx1, vy0, vy1);
  pls_->wind(wx0, wx1, wy0, wy1);
}

void Figure::note(int row, const std::string& s, double scale, bool right) {
  const auto [kx, ky] = world_per_mm(*pls_, page_);
  PLFLT wx0, wx1, wy0, wy1;
  pls_->gvpw(wx0, wx1, wy0, wy1);
  // Row 0's capitals start `pad` below the frame; each further row 2.2 character heights lower.
  const double pad = 1.8, line = 2.2 * page_.text_mm;
  const double y = wy1 - (pad + page_.text_mm * scale + line * row) * ky;
  text_scale(scale);
  colour(kInk);
  pls_->ptex(right ? wx1 - pad * kx : wx0 + pad * kx, y, 1, 0, right ? 1 : 0, s.c_str());
  text_scale(1.0);
}

void Figure::image(const std::vector<double>& z, int nx, int ny, double lo, double hi) {
  std::vector<std::vector<double>> cols(static_cast<std::size_t>(nx),
                                        std::vector<double>(static_cast<std::size_t>(ny)));
  std::vector<const PLFLT*> ptr(static_cast<std::size_t>(nx));
  for (int ix = 0; ix < nx; ++ix) {
    for (int iy = 0; iy < ny; ++iy)
      cols[ix][iy] = std::clamp(z[std::size_t(iy) * nx + ix], lo, hi);
    ptr[ix] = cols[ix].data();
  }
  PLFLT wx0, wx1, wy0, wy1;
  pls_->gvpw(wx0, wx1, wy0, wy1);
  pls_->imagefr(ptr.data(), nx, ny, wx0, wx1, wy0, wy1, lo, hi, lo, hi, nullptr, nullptr);
}

void Figure::contours(const std::vector<double>& z, int nx, int ny,
                      const std::vector<double>& levels) {
  PLFLT wx0, wx1, wy0, wy1;
  pls_->gvpw(wx0, wx1, wy0, wy1);
  // Cell centres: the image's pixels and the contours' grid points coincide.
  std::vector<double> xg(static_cast<std::size_t>(nx)), yg(static_cast<std::size_t>(ny));
  for (int i = 0; i < nx; ++i)
    xg[i] = wx0 + (i + 0.5) * (wx1 - wx0) / nx;
  for (int i = 0; i < ny; ++i)
    yg[i] = wy0 + (i + 0.5) * (wy1 - wy0) / ny;
  contours(z, xg, yg, levels);
}

void Figure::contours(const std::vector<double>& z, const std::vector<double>& xg,
                      const std::vector<double>& yg, const std::vector<double>& levels) {
  const int nx = int(xg.size()), ny = int(yg.size());
  if (levels.empty() || nx < 2 || ny < 2) return;
  std::vector<std::vector<double>> cols(static_cast<std::size_t>(nx),
                                        std::vector<double>(static_cast<std::size_t>(ny)));
  std::vector<const PLFLT*> ptr(static_cast<std::size_t>(nx));
  for (int ix = 0; ix < nx; ++ix) {
    for (int iy = 0; iy < ny; ++iy)
      cols[ix][iy] = z[std::size_t(iy) * nx + ix];
    ptr[ix] = cols[ix].data();
  }
  std::vector<double> xs(xg), ys(yg);
  PLcGrid grid{xs.data(), ys.data(), nullptr, nx, ny, 0};
  pls_->cont(ptr.data(), nx, ny, 1, nx, 1, ny, levels.data(), PLINT(levels.size()), pltr1, &grid);
}

void Figure::cells(const std::vector<double>& z, const std::vector<double>& x_edges,
                   const std::vector<double>& y_edges, double lo, double hi) {
  if (x_edges.size() < 2 || y_edges.size() < 2) return;
  const std::size_t nx = x_edges.size() - 1, ny = y_edges.size() - 1;
  if (z.size() < nx * ny) throw std::invalid_argument("Figure::cells: z smaller than the grid");
  for (std::size_t j = 0; j < ny; ++j)
    for (std::size_t i = 0; i < nx; ++i) {
      const double v = z[j * nx + i];
      if (!std::isfinite(v)) continue;
      colour(sequential(hi > lo ? (v - lo) / (hi - lo) : 1));
      const double a = x_edges[i], b = x_edges[i + 1], c = y_edges[j], d = y_edges[j + 1];
      std::vector<double> px{a, b, b, a}, py{c, c, d, d};
      pls_->fill(4, px.data(), py.data());
    }
}

void Figure::colour_bar(double lo, double hi, const std::string& label) {
  const Panel keep = panel_;
  PLFLT vx0, vx1, vy0, vy1;
  pls_->gvpd(vx0, vx1, vy0, vy1);
  const double gap = 2.0 / page_.width_mm, width = 2.5 / page_.width_mm;
  pls_->vpor(vx1 + gap, vx1 + gap + width, vy0, vy1);
  pls_->wind(0, 1, lo, hi);
  std::vector<double> z(128), ye(129);
  for (int i = 0; i <= 128; ++i)
    ye[std::size_t(i)] = lo + (hi - lo) * i / 128;
  for (int i = 0; i < 128; ++i)
    z[std::size_t(i)] = 0.5 * (ye[std::size_t(i)] + ye[std::size_t(i) + 1]);
  cells(z, {0, 1}, ye, lo, hi);
  colour(kInk);
  pls_->box("bc", 0, 0, "bcmstiv", 0, 0);
  if (!label.empty()) pls_->mtex("r", 4.2, 0.5, 0.5, label.c_str());
  pls_->vpor(vx0, vx1, vy0, vy1);
  pls_->wind(keep.xmin, keep.xmax, keep.ymin, keep.ymax);
}

std::pair<double, double> Figure::page_fraction(double x, double y) {
  PLFLT vx0, vx1, vy0, vy1, wx0, wx1, wy0, wy1;
  pls_->gvpd(vx0, vx1, vy0, vy1);
  pls_->gvpw(wx0, wx1, wy0, wy1);
  return {vx0 + (x - wx0) / (wx1 - wx0) * (vx1 - vx0),
          1 - (vy0 + (y - wy0) / (wy1 - wy0) * (vy1 - vy0))};
}

void Figure::commit() {
  if (done_) return;
  pls_.reset(); // closes the file
  if (!plplot_error.empty()) {
    const std::string e = plplot_error;
    plplot_error.clear();
    std::remove(tmp_.c_str());
    done_ = true;
    throw InputError(path_ + ": " + e);
  }
  try {
    if (!whole_file(tmp_, format_))
      throw InputError(path_ + ": write failed (disk full?); nothing written");
    if (format_ == Format::pdf) fix_pdf_date(tmp_);
  } catch (const InputError&) {
    std::remove(tmp_.c_str());
    done_ = true;
    throw;
  }
  std::error_code ec;
  std::filesystem::rename(tmp_, path_, ec);
  done_ = true;
  if (ec) {
    std::remove(tmp_.c_str());
    throw InputError(path_ + ": cannot write: " + ec.message());
  }
}

} // namespace undertow::plot

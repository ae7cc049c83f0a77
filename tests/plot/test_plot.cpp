// The figures' colours, density estimates and drawing, each against an outside reference.
#include <catch2/catch.hpp>

#include <cmath>
#include <filesystem>
#include <string>

#include "support/png_image.hpp"
#include "undertow/error.hpp"
#include "undertow/io/hdf5.hpp"
#include "undertow/plot/catalogue.hpp"
#include "undertow/plot/colours.hpp"
#include "undertow/plot/density_estimate.hpp"
#include "undertow/plot/figure.hpp"

using namespace undertow;
using namespace undertow::plot;
namespace fs = std::filesystem;

namespace {
fs::path fresh_dir(const std::string& name) {
  const fs::path d = fs::temp_directory_path() / ("undertow-plot-" + name);
  fs::remove_all(d);
  fs::create_directories(d);
  return d;
}
} // namespace

TEST_CASE("sRGB to CIE L*a*b* (D65) gives the standard conversion's values", "[plot]") {
  // White and black by the definitions of CIE 15:2004 and IEC 61966-2-1; the primaries are the
  // standard conversion's values (from memory, as tabulated by colour-science calculators).
  const auto check = [](Rgb c, double L, double a, double b, double tol) {
    const Lab lab = srgb_to_lab(c);
    CHECK(lab.L == Approx(L).margin(tol));
    CHECK(lab.a == Approx(a).margin(tol));
    CHECK(lab.b == Approx(b).margin(tol));
  };
  check({1, 1, 1}, 100, 0, 0, 0.01);
  check({0, 0, 0}, 0, 0, 0, 1e-9);
  check({1, 0, 0}, 53.24, 80.09, 67.20, 0.05);
  check({0, 1, 0}, 87.73, -86.18, 83.18, 0.05);
  check({0, 0, 1}, 32.30, 79.19, -107.86, 0.05);
  // sRGB 119/255 grey is L* = 50 (common practice: the middle grey of the sRGB scale).
  check({119 / 255.0, 119 / 255.0, 119 / 255.0}, 50.0, 0, 0, 0.1);
  // And back, for colours inside the gamut.
  for (Rgb c : {Rgb{0.2, 0.5, 0.7}, Rgb{0.9, 0.1, 0.3}, Rgb{0.05, 0.95, 0.6}}) {
    const Rgb r = lab_to_srgb(srgb_to_lab(c));
    CHECK(r.r == Approx(c.r).margin(1e-6));
    CHECK(r.g == Approx(c.g).margin(1e-6));
    CHECK(r.b == Approx(c.b).margin(1e-6));
  }
}

TEST_CASE("The depth map's lightness rises linearly, inside the sRGB gamut, in near-equal "
          "perceived steps (Kovesi 2015)",
          "[plot]") {
  double prev_L = -1;
  std::vector<double> steps;
  Lab prev{};
  for (int i = 0; i <= 256; ++i) {
    const double t = i / 256.0;
    const Lab lab = srgb_to_lab(sequential(t));
    // Out of gamut the map would be clipped, and the lightness would leave its line.
    CHECK(lab.L == Approx(18 + 76 * t).margin(0.05));
    CHECK(lab.L > prev_L);
    prev_L = lab.L;
    if (i > 0)
      steps.push_back(std::sqrt((lab.L - prev.L) * (lab.L - prev.L) +
                                (lab.a - prev.a) * (lab.a - prev.a) +
                                (lab.b - prev.b) * (lab.b - prev.b)));
    prev = lab;
  }
  const auto [lo, hi] = std::minmax_element(steps.begin(), steps.end());
  CHECK(*hi / *lo < 1.25); // CIE 1976 colour differences between neighbouring samples
}

TEST_CASE("Kernel density and bandwidth equal scipy's gaussian_kde (bw_method='silverman')",
          "[plot]") {
  // Reference: scipy 1.10 stats.gaussian_kde(d, bw_method="silverman") on these values.
  const std::vector<double> d{-3.1, -1.2, -0.7, 0.0, 0.4, 0.9, 1.5, 2.2, 4.0, 7.5};
  const double h = silverman_bandwidth(d);
  CHECK(h == Approx(1.975362576879237).epsilon(1e-12));
  const auto k = kernel_density(d, {-5.0, -1.0, 0.5, 3.0, 9.0}, h);
  const double ref[] = {0.019432578986234683, 0.11305538454435195, 0.1300447729031344,
                        0.08513606645051722, 0.016033580879673635};
  for (int i = 0; i < 5; ++i)
    CHECK(k[std::size_t(i)] == Approx(ref[i]).epsilon(1e-10));
}

TEST_CASE("A histogram's densities integrate to the share inside, with Poisson errors "
          "sqrt(N) / (n width)",
          "[plot]") {
  const std::vector<double> v{0.1, 0.2, 0.25, 1.5, 2.9, 3.0, -1, 7};
  const Histogram h = histogram(v, 0, 3, 3);
  REQUIRE(h.density.size() == 3);
  const double w = 1, n = 8;
  CHECK(h.density[0] == Approx(3 / (n * w)));
  CHECK(h.density[1] == Approx(1 / (n * w)));
  CHECK(h.density[2] == Approx(2 / (n * w))); // 3.0 on the last edge counts in the last bin
  CHECK(h.error[0] == Approx(std::sqrt(3.0) / (n * w)));
  CHECK((h.density[0] + h.density[1] + h.density[2]) * w == Approx(6 / n));
}

TEST_CASE("Points drawn in a PNG land at the pixels their coordinates give, in their colours",
          "[plot]") {
  const fs::path dir = fresh_dir("pixels");
  const std::string path = (dir / "marks.png").string();
  Page page{80, 60, 200};
  Figure fig(path, Format::png, page);
  fig.panel({0.15, 0.95, 0.15, 0.9, -10, 10, 0, 100});
  fig.axes("x", "y");
  struct Mark {
    double x, y;
    Rgb c;
  };
  const std::vector<Mark> marks{{-7, 20, series(Series::measured)},
                                {0, 50, series(Series::simulated)},
                                {8.5, 90, series(Series::model)}};
  std::vector<std::pair<double, double>> at;
  for (const auto& m : marks) {
    fig.colour(m.c);
    fig.points({m.x}, {m.y}, 2.0);
    at.push_back(fig.page_fraction(m.x, m.y));
  }
  fig.commit();
  const auto img = test::read_png(path);
  CHECK(img.width == int(std::lround(80 / 25.4 * 200)));
  CHECK(img.height == int(std::lround(60 / 25.4 * 200)));
  for (std::size_t i = 0; i < marks.size(); ++i) {
    const int px = int(at[i].first * img.width), py = int(at[i].second * img.height);
    const auto got = img.at(px, py);
    const auto want = marks[i].c.bytes();
    INFO("mark " << i << " at pixel " << px << ", " << py);
    for (int k = 0; k < 3; ++k)
      CHECK(std::abs(got[std::size_t(k)] - want[std::size_t(k)]) <= 2);
  }
  // Nothing but the file: no temporary left.
  std::size_t files = 0;
  for ([[maybe_unused]] const auto& e : fs::directory_iterator(dir))
    ++files;
  CHECK(files == 1);
}

TEST_CASE("A figure abandoned before commit leaves no file, and a bad page or format is refused",
          "[plot]") {
  const fs::path dir = fresh_dir("abandon");
  {
    Figure fig((dir / "never.pdf").string(), Format::pdf);
    fig.panel({});
  }
  CHECK(fs::is_empty(dir));
  CHECK_THROWS_AS(format_from_name("gif"), InputError);
  CHECK_THROWS_AS(Figure((dir / "x.png").string(), Format::png, Page{5, 50, 300}), InputError);
  CHECK_THROWS_AS(Figure((dir / "no-such-folder" / "x.png").string(), Format::png), InputError);
  CHECK(formats_from_list("png,pdf,png").size() == 2);
}

namespace {
// A run folder's residual and comparison files with n sources, one of them 4 sigma off.
void fake_run(const fs::path& dir, bool with_pulls) {
  const std::size_t n = 40;
  std::vector<std::string> names;
  std::vector<double> R, psi, U, V, W, pull, zero(n, 0.0);
  for (std::size_t i = 0; i < n; ++i) {
    names.push_back("S" + std::to_string(i));
    R.push_back(5 + 0.1 * double(i)), psi.push_back(-10 + double(i));
    U.push_back(std::sin(double(i))), V.push_back(std::cos(double(i))), W.push_back(0.1);
    pull.push_back(i == 7 ? 4.0 : 0.5 * std::sin(3.0 * double(i)));
  }
  for (const char* file : {"measured-residuals.h5", "mock-residuals.h5"})
    io::h5::File::write_atomically((dir / file).string(), [&](const io::h5::File& f) {
      const auto g = io::h5::create_group(f, "sources");
      io::h5::write_strings(f, g.id(), "name", names, "");
      io::h5::write_doubles(f, g.id(), "R_kpc", R, 1, "kpc", "");
      io::h5::write_doubles(f, g.id(), "psi_deg", psi, 1, "deg", "");
      io::h5::write_doubles(f, g.id(), "U_kms", U, 1, "km/s", "");
      io::h5::write_doubles(f, g.id(), "V_kms", V, 1, "km/s", "");
      io::h5::write_doubles(f, g.id(), "W_kms", W, 1, "km/s", "");
    });
  io::h5::File::write_atomically((dir / "comparison.h5").string(), [&](const io::h5::File& f) {
    const auto g = io::h5::create_group(f, "local");
    io::h5::write_strings(f, g.id(), "name", names, "");
    io::h5::write_doubles(f, g.id(), "R_kpc", R, 1, "kpc", "");
    io::h5::write_doubles(f, g.id(), "psi_deg", psi, 1, "deg", "");
    io::h5::write_doubles(f, g.id(), "pull_U", pull, 1, "", "");
    io::h5::write_doubles(f, g.id(), "pull_V", zero, 1, "", "");
    if (with_pulls) io::h5::write_doubles(f, g.id(), "pull_W", zero, 1, "", "");
  });
}
bool has_colour(const test::RgbImage& img, const Rgb& c) {
  const auto want = c.bytes();
  for (std::size_t i = 0; i + 2 < img.rgb.size(); i += 3)
    if (std::abs(img.rgb[i] - want[0]) <= 2 && std::abs(img.rgb[i + 1] - want[1]) <= 2 &&
        std::abs(img.rgb[i + 2] - want[2]) <= 2)
      return true;
  return false;
}
} // namespace

TEST_CASE("The pulls figure from synthetic files marks the source beyond 3 sigma, and a missing "
          "dataset is named and no image is written",
          "[plot]") {
  const fs::path dir = fresh_dir("pulls");
  fake_run(dir, true);
  DrawOptions o;
  o.formats = {Format::png};
  const auto files =
      draw_figures(Source::run, dir.string(), (dir / "figs").string(), {"pulls", "residuals"}, o);
  REQUIRE(files.size() == 2);
  const auto img = test::read_png((dir / "figs" / "fig-pulls.png").string());
  CHECK(has_colour(img, series(Series::accent)));   // the 4-sigma source
  CHECK(has_colour(img, series(Series::measured))); // the others

  const fs::path bad = fresh_dir("pulls-missing");
  fake_run(bad, false);
  try {
    draw_figures(Source::run, bad.string(), (bad / "figs").string(), {"pulls"}, o);
    FAIL("no error for a missing dataset");
  } catch (const InputError& e) {
    const std::string m = e.what();
    CHECK(m.find("comparison.h5") != std::string::npos);
    CHECK(m.find("/local/pull_W") != std::string::npos);
  }
  CHECK(!fs::exists(bad / "figs"));
}

// Measured catalogs to peculiar motions: signs, zero points, uncertainties and bad input.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>

#include "undertow/error.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/residuals/peculiar.hpp"
#include "undertow/residuals/summary.hpp"
#include "undertow/units.hpp"

using namespace undertow;
using namespace undertow::residuals;

namespace {

// A source with exactly these Galactocentric phase-space coordinates, observed from the Sun,
// with small errors.
Source observe(const sky::Galactocentric& g, const ResidualSettings& s, const std::string& name,
               double frac_err = 1e-4) {
  sky::Observed o;
  const double d = sky::from_galactocentric(g, s.sun, o);
  Source src;
  src.name = name;
  src.ra_deg = o.ra_deg, src.dec_deg = o.dec_deg;
  src.parallax_mas = 1 / d, src.parallax_err_mas = frac_err / d;
  src.pmra_masyr = o.pmra_masyr, src.pmra_err_masyr = 0.001;
  src.pmdec_masyr = o.pmdec_masyr, src.pmdec_err_masyr = 0.001;
  src.vlsr_kms = sky::helio_to_lsr(o.vhelio_kms, o.ra_deg, o.dec_deg, s.lsr),
  src.vlsr_err_kms = 0.1;
  return src;
}

sky::Galactocentric circular(double R, double psi, double z, double vc, double vr = 0,
                             double dv = 0, double vz = 0) {
  // position (-R cos psi, R sin psi); e_R = (-cos, sin), e_rot = (sin, cos)
  const double c = std::cos(psi), s = std::sin(psi);
  return {{-R * c, R * s, z}, {-vr * c + (vc + dv) * s, vr * s + (vc + dv) * c, vz}};
}

ResidualSettings settings(int i) {
  ResidualSettings s;
  s.sun.r0_kpc = 8.0 + 0.25 * i;
  s.sun.z_sun_kpc = 0.01 * (i - 1);
  s.sun.theta0_kms = 220 + 10 * i;
  s.sun.u_sun_kms = 11.1 - i, s.sun.v_sun_kms = 12.24 + 3 * i, s.sun.w_sun_kms = 7.25;
  s.rotation.kind = RotationCurve::Kind::linear;
  s.rotation.theta0_kms = s.sun.theta0_kms;
  s.rotation.r0_kpc = s.sun.r0_kpc;
  s.rotation.slope_kms_kpc = -1.5 + i;
  s.draws = 50;
  return s;
}

} // namespace

TEST_CASE("A source on a circular orbit at any azimuth has U_s = V_s = W_s = 0 to 1e-9 km/s for "
          "any R0, Theta0 and solar motion (definition of peculiar motion, design §3)",
          "[residuals]") {
  std::mt19937_64 rng(3);
  std::uniform_real_distribution<double> R(3, 15), psi(-3, 3);
  for (int i = 0; i < 3; ++i) {
    const auto s = settings(i);
    Catalog c;
    for (int k = 0; k < 100; ++k) {
      const double r = R(rng);
      c.sources.push_back(
          observe(circular(r, psi(rng), 0.0, s.rotation.at(r)), s, "c" + std::to_string(k)));
    }
    const auto res = compute_residuals(c, s);
    REQUIRE(res.sources.size() == 100);
    for (const auto& r : res.sources)
      for (int a = 0; a < 3; ++a)
        CHECK(std::fabs(r.uvw[a]) < 1e-9);
  }
}

TEST_CASE("Signs: a source moving toward the centre has U_s > 0, one ahead of circular rotation "
          "V_s > 0, one moving to the north pole W_s > 0 (conventions)",
          "[residuals]") {
  const auto s = settings(1);
  const double R = 9.0, vc = s.rotation.at(R);
  Catalog c;
  c.sources.push_back(observe(circular(R, 0.4, 0.0, vc, -5.0), s, "in")); // v_R < 0: inward
  c.sources.push_back(observe(circular(R, 0.4, 0.0, vc, 0, 7.0), s, "fast"));
  c.sources.push_back(observe(circular(R, 0.4, 0.0, vc, 0, 0, 3.0), s, "up"));
  const auto res = compute_residuals(c, s);
  CHECK(res.sources[0].uvw[0] == Approx(5.0).epsilon(1e-9));
  CHECK(res.sources[1].uvw[1] == Approx(7.0).epsilon(1e-9));
  CHECK(res.sources[2].uvw[2] == Approx(3.0).epsilon(1e-6));
}

TEST_CASE("Injection and recovery: sources lagging circular rotation by 7 km/s with small "
          "parallax errors give a mean V_s of -7 within its bootstrap error",
          "[residuals]") {
  auto s = settings(0);
  s.draws = 20;
  std::mt19937_64 rng(9);
  std::uniform_real_distribution<double> R(5, 11), psi(-0.6, 0.6);
  std::normal_distribution<double> pec(0, 8);
  Catalog c;
  for (int k = 0; k < 300; ++k) {
    const double r = R(rng);
    c.sources.push_back(
        observe(circular(r, psi(rng), 0.0, s.rotation.at(r), pec(rng), -7 + pec(rng), pec(rng)), s,
                "s" + std::to_string(k), 0.02));
  }
  const auto res = compute_residuals(c, s);
  const auto sum = summarise(res, 500, 1);
  REQUIRE(sum[0].group == "all");
  CHECK(std::fabs(sum[0].mean[1] + 7) < 3 * sum[0].mean_err[1]);
  CHECK(sum[0].mean_err[1] == Approx(8 / std::sqrt(300.0)).epsilon(0.25));
}

TEST_CASE("Monte Carlo and first-order uncertainties agree where errors are small (Johnson & "
          "Soderblom 1987: first-order propagation)",
          "[residuals]") {
  auto s = settings(2);
  s.draws = 20000;
  Catalog c;
  Source src = observe(circular(10.0, 0.9, 0.1, s.rotation.at(10.0), 10, -5, 2), s, "x", 0.01);
  src.pmra_err_masyr = 0.05, src.pmdec_err_masyr = 0.04, src.vlsr_err_kms = 3, src.corr_pm = 0.3;
  c.sources.push_back(src);
  const auto r = compute_residuals(c, s).sources.at(0);
  for (int k : {0, 4, 8})
    CHECK(std::sqrt(r.mc_cov[k]) == Approx(std::sqrt(r.lin_cov[k])).epsilon(0.03));
}

TEST_CASE("Bootstrap error of a mean equals sigma/sqrt(N) for Gaussian draws (Efron 1979)",
          "[residuals]") {
  std::mt19937_64 rng(12);
  std::normal_distribution<double> g(3.0, 2.0);
  std::vector<double> v(400);
  for (auto& x : v)
    x = g(rng);
  const auto m = bootstrap_moments(v, 4000, 7, 0);
  CHECK(m.mean_err == Approx(m.dispersion / std::sqrt(400.0)).epsilon(0.06));
  CHECK(m.dispersion_err ==
        Approx(m.dispersion / std::sqrt(2 * 400.0)).epsilon(0.15)); // common practice
}

TEST_CASE("Catalog reading: every bad row or column is a one-line error at its file and line",
          "[residuals]") {
  const std::string head =
      "name,ra_deg,dec_deg,parallax_mas,parallax_err_mas,pmra_masyr,pmra_err_masyr,"
      "pmdec_masyr,pmdec_err_masyr,vlsr_kms,vlsr_err_kms\n";
  const std::string good = "G1,10,20,0.5,0.05,-1,0.1,-2,0.1,30,5\n";
  CHECK(parse_catalog(head + good, "c.csv").sources.size() == 1);
  CHECK_THROWS_WITH(parse_catalog("", "c.csv"), "c.csv: empty file: no header row");
  CHECK_THROWS_WITH(parse_catalog(head, "c.csv"), "c.csv:1: no data rows");
  CHECK_THROWS_WITH(parse_catalog("name,ra_deg\nG1,10\n", "c.csv"),
                    Catch::StartsWith("c.csv:1: dec_deg: missing column"));
  CHECK_THROWS_WITH(parse_catalog(head + good + "G2,10,20,nan,0.05,-1,0.1,-2,0.1,30,5\n", "c.csv"),
                    "c.csv:3: parallax_mas: not a finite number: 'nan'");
  CHECK_THROWS_WITH(parse_catalog(head + "G2,10,20,0.5,0,-1,0.1,-2,0.1,30,5\n", "c.csv"),
                    "c.csv:2: parallax_err_mas: errors must be positive");
  CHECK_THROWS_WITH(parse_catalog(head + "G2,10,20,0.5,0.05,-1,0.1,-2,0.1,30\n", "c.csv"),
                    "c.csv:2: row has 10 fields, the header has 11");
  CHECK_THROWS_WITH(parse_catalog(head + "G2,400,20,0.5,0.05,-1,0.1,-2,0.1,30,5\n", "c.csv"),
                    "c.csv:2: ra_deg: must lie in [0, 360)");
  CHECK_THROWS_WITH(read_catalog("no/such.csv"), "no/such.csv: cannot open file");
}

TEST_CASE("A written catalog reads back", "[residuals]") {
  Catalog c;
  Source s;
  s.name = "M1";
  s.group = "arm-a";
  s.ra_deg = 123.25, s.dec_deg = -12.5, s.parallax_mas = 0.4, s.parallax_err_mas = 0.02;
  s.pmra_masyr = -1.5, s.pmra_err_masyr = 0.05, s.pmdec_masyr = 0.3, s.pmdec_err_masyr = 0.06;
  s.vlsr_kms = 45, s.vlsr_err_kms = 5, s.corr_pm = -0.2;
  c.sources = {s};
  const std::string path = "/tmp/undertow-catalog-roundtrip.csv";
  write_catalog(path, c);
  const auto r = read_catalog(path);
  REQUIRE(r.sources.size() == 1);
  CHECK(r.sources[0].name == "M1");
  CHECK(r.sources[0].group == "arm-a");
  CHECK(r.sources[0].ra_deg == Approx(123.25));
  CHECK(r.sources[0].corr_pm == Approx(-0.2));
}

TEST_CASE("A source next to the Sun moving on the local circular orbit (the Sun's velocity minus "
          "the solar motion) has zero peculiar motion",
          "[residuals]") {
  for (int i = 0; i < 3; ++i) {
    const auto s = settings(i);
    const auto sun = sky::sun(s.sun);
    Catalog c;
    for (int k = 0; k < 6; ++k) {
      const double a = k * 1.0472;
      // 20 pc from the Sun in the plane, moving with Theta0 in the direction of rotation there
      const double x = sun.r[0] + 0.02 * std::cos(a), y = sun.r[1] + 0.02 * std::sin(a);
      const double R = std::hypot(x, y), vc = s.rotation.at(R);
      c.sources.push_back(
          observe({{x, y, sun.r[2]}, {vc * y / R, -vc * x / R, 0}}, s, "n" + std::to_string(k)));
    }
    for (const auto& r : compute_residuals(c, s).sources)
      for (int a = 0; a < 3; ++a)
        CHECK(std::fabs(r.uvw[a]) < 1e-9);
  }
}

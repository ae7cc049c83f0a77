// The kinematic fit: the likelihood against an independent integration, its exact degeneracies,
// kinematic distances against the textbook formula, and the fit file's refusals.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <iostream>
#include <omp.h>

#include <Eigen/Dense>
#include <boost/math/quadrature/gauss_kronrod.hpp>

#include "support/kinematic_truth.hpp"
#include "undertow/fit/fit_file.hpp"
#include "undertow/fit/kinematic_distance.hpp"
#include "undertow/fit/likelihood.hpp"
#include "undertow/fit/report.hpp"
#include "undertow/sky/lsr.hpp"
#include "undertow/sky/solar_frame.hpp"
#include "undertow/units.hpp"

using namespace undertow;
using fit::Param;

namespace {

double at(const fit::FullParams& p, Param k) {
  return p[std::size_t(k)];
}

// ln p(measured | θ) of one source, integrated independently: the prediction at each distance
// through the sky module's Galactocentric transformation (checked against astropy), the intrinsic
// covariance through its numerical Jacobian, the 4-D Gaussian by Eigen, and the distance integral
// by Boost.Math's adaptive Gauss-Kronrod quadrature. A source whose catalog gives its distance
// has the measured distance, N(d_m | d, σ_d), where a parallax source has N(ϖ | 1/d + ϖ0, σ_ϖ).
double reference_ln_l(const residuals::Source& s, const fit::KinematicModel& m,
                      const fit::FullParams& p) {
  sky::SolarFrame sun;
  sun.r0_kpc = at(p, Param::r0);
  sun.z_sun_kpc = at(p, Param::z_sun);
  sun.theta0_kms = m.theta0(p);
  sun.u_sun_kms = at(p, Param::u_sun);
  sun.v_sun_kms = at(p, Param::v_sun);
  sun.w_sun_kms = at(p, Param::w_sun);
  const auto& pr = m.prior;
  const double off = s.parallax_offset_mas + at(p, Param::parallax_offset);
  Eigen::Matrix4d Cm = Eigen::Matrix4d::Zero();
  const bool given = s.has_distance();
  const double e[4] = {given ? s.distance_err_kpc : s.parallax_err_mas, s.pmra_err_masyr,
                       s.pmdec_err_masyr, s.vlsr_err_kms};
  for (int k = 0; k < 4; ++k)
    Cm(k, k) = e[k] * e[k];
  Cm(0, 1) = Cm(1, 0) = s.corr_w_pa * e[0] * e[1];
  Cm(0, 2) = Cm(2, 0) = s.corr_w_pd * e[0] * e[2];
  Cm(1, 2) = Cm(2, 1) = s.corr_pm * e[1] * e[2];
  const Eigen::Vector4d meas(given ? s.distance_kpc : s.parallax_mas, s.pmra_masyr, s.pmdec_masyr,
                             s.vlsr_kms);
  const auto rho_at = [&](double d, const sky::Vec3& r) {
    const double R = std::hypot(r[0], r[1]);
    if (pr.kind == fit::DistancePrior::Kind::disk)
      return std::exp(-R / at(p, Param::disk_scale_length) -
                      std::fabs(r[2]) / at(p, Param::disk_scale_height));
    if (pr.kind == fit::DistancePrior::Kind::edsd) return std::exp(-d / pr.edsd_length_kpc);
    return 1.0;
  };
  const auto position = [&](double d) {
    return sky::to_galactocentric({s.ra_deg, s.dec_deg, 0, 0, 0}, d, sun).r;
  };
  const auto observe = [&](const sky::Vec3& r, const sky::Vec3& v) {
    sky::Observed o;
    sky::from_galactocentric({r, v}, sun, o);
    return Eigen::Vector3d(o.pmra_masyr, o.pmdec_masyr,
                           sky::helio_to_lsr(o.vhelio_kms, s.ra_deg, s.dec_deg, m.lsr));
  };
  const auto integrand = [&](double d) {
    const sky::Vec3 r = position(d);
    const double R = std::hypot(r[0], r[1]);
    const sky::Vec3 c{-r[0] / R, -r[1] / R, 0}, f{r[1] / R, -r[0] / R, 0}, z{0, 0, 1};
    const double vphi = m.theta(R, p) + at(p, Param::mean_v);
    sky::Vec3 v;
    for (int k = 0; k < 3; ++k)
      v[std::size_t(k)] = vphi * f[std::size_t(k)] + at(p, Param::mean_u) * c[std::size_t(k)] +
                          at(p, Param::mean_w) * z[std::size_t(k)];
    const Eigen::Vector3d o0 = observe(r, v);
    Eigen::Matrix3d J; // the observables are linear in the velocity
    for (int k = 0; k < 3; ++k) {
      sky::Vec3 w = v;
      w[std::size_t(k)] += 1.0;
      J.col(k) = observe(r, w) - o0;
    }
    Eigen::Matrix3d S = Eigen::Matrix3d::Zero();
    const auto outer = [](const sky::Vec3& a) {
      Eigen::Vector3d x(a[0], a[1], a[2]);
      return Eigen::Matrix3d(x * x.transpose());
    };
    if (m.anisotropic)
      S = std::pow(at(p, Param::dispersion_u), 2) * outer(c) +
          std::pow(at(p, Param::dispersion_v), 2) * outer(f) +
          std::pow(at(p, Param::dispersion_w), 2) * outer(z);
    else
      S = std::pow(at(p, Param::dispersion), 2) * Eigen::Matrix3d::Identity();
    Eigen::Matrix4d C = Cm;
    C.block<3, 3>(1, 1) += J * S * J.transpose();
    const Eigen::Vector4d pred(given ? d : 1 / d + off, o0(0), o0(1), o0(2));
    const Eigen::Vector4d res = meas - pred;
    const Eigen::LDLT<Eigen::Matrix4d> ldlt(C);
    const double chi2 = res.dot(ldlt.solve(res));
    const double lndet = std::log(C.determinant());
    return std::exp(-0.5 * chi2 - 0.5 * lndet - 2 * std::log(2 * units::pi)) * rho_at(d, r) * d * d;
  };
  using GK = boost::math::quadrature::gauss_kronrod<double, 61>;
  const double num = GK::integrate(integrand, pr.distance_min_kpc, pr.distance_max_kpc, 20, 1e-12);
  const double den = GK::integrate(
      [&](double d) {
        const double sel =
            pr.parallax_snr_min > 0
                ? 0.5 * std::erfc(-((given ? d : 1 / d + off) / e[0] - pr.parallax_snr_min) /
                                  std::sqrt(2.0))
                : 1.0;
        return rho_at(d, position(d)) * d * d * sel;
      },
      pr.distance_min_kpc, pr.distance_max_kpc, 20, 1e-12);
  return std::log(num / den);
}

fit::FullParams truth_params(const fit::KinematicTruth& t) {
  return t.params;
}

} // namespace

TEST_CASE("The likelihood of each source equals an independent integration of the 4-D Gaussian "
          "over distance (Boost.Math Gauss-Kronrod, the sky module's transformation, Eigen)",
          "[fit]") {
  auto t = test::standard_truth(40, 7);
  auto cat = fit::simulate_catalog(t);
  // give some sources catalog correlations and a zero point, as astrometric catalogs have
  for (std::size_t i = 0; i < cat.sources.size(); i += 3) {
    cat.sources[i].corr_w_pa = 0.3, cat.sources[i].corr_w_pd = -0.2, cat.sources[i].corr_pm = 0.25;
    cat.sources[i].parallax_offset_mas = 0.005;
  }
  // and the same sources as a catalog of distances (d = 1/parallax, σ_d = σ_ϖ/ϖ² at 1.3 times
  // the error: a distance measurement of its own)
  auto dist = cat;
  dist.distances = true;
  for (auto& s : dist.sources) {
    s.distance_kpc = 1 / s.parallax_mas;
    s.distance_err_kpc = 1.3 * s.parallax_err_mas / (s.parallax_mas * s.parallax_mas);
    s.parallax_mas = s.parallax_err_mas = s.corr_w_pa = s.corr_w_pd = s.parallax_offset_mas = 0;
  }
  fit::FullParams p = truth_params(t);
  p[std::size_t(Param::z_sun)] = 0.02;
  p[std::size_t(Param::parallax_offset)] = -0.003;
  p[std::size_t(Param::dispersion_u)] = 9, p[std::size_t(Param::dispersion_v)] = 6;
  p[std::size_t(Param::dispersion_w)] = 4;
  p[std::size_t(Param::disk_scale_length)] = 3.5, p[std::size_t(Param::disk_scale_height)] = 0.2;
  p[std::size_t(Param::rotation_index)] = 0.05;
  struct Case {
    const char* what;
    fit::RotationForm form;
    bool aniso;
    fit::DistancePrior::Kind prior;
    double snr;
  };
  for (const Case& c : {Case{"linear, isotropic, uniform", fit::RotationForm::linear, false,
                             fit::DistancePrior::Kind::uniform, 0},
                        Case{"power law, per component, disk, S/N > 3",
                             fit::RotationForm::power_law, true, fit::DistancePrior::Kind::disk, 3},
                        Case{"flat, isotropic, edsd", fit::RotationForm::flat, false,
                             fit::DistancePrior::Kind::edsd, 0}}) {
    fit::KinematicModel m = t.model;
    m.rotation = c.form;
    m.anisotropic = c.aniso;
    m.prior.kind = c.prior;
    m.prior.edsd_length_kpc = 4;
    m.prior.parallax_snr_min = c.snr;
    fit::Likelihood::Offset off;
    off.value = at(p, Param::parallax_offset);
    for (const auto* catalog : {&cat, &dist}) {
      const fit::Likelihood L(*catalog, m, off);
      std::vector<double> lnl;
      L.per_source(p, lnl, nullptr);
      double worst = 0;
      for (std::size_t i = 0; i < catalog->sources.size(); ++i) {
        const double ref = reference_ln_l(catalog->sources[i], m, p);
        worst = std::max(worst, std::fabs(lnl[i] - ref));
      }
      INFO(c.what << (catalog == &dist ? ", distances given" : ", parallaxes")
                  << ": largest |ln L_i - reference| = " << worst);
      CHECK(worst < 2e-4);
    }
  }
}

TEST_CASE("ln L has the same bits for 1 and 2 OpenMP threads", "[fit]") {
  const auto t = test::standard_truth(150, 3);
  const auto cat = fit::simulate_catalog(t);
  const fit::Likelihood L(cat, t.model, {});
  const int before = omp_get_max_threads();
  omp_set_num_threads(1);
  const double a = L(t.params);
  omp_set_num_threads(2);
  const double b = L(t.params);
  omp_set_num_threads(before);
  CHECK(a == b);
  CHECK(std::isfinite(a));
}

TEST_CASE("With a flat or linear rotation curve only Θ0 + V☉ and Θ0 + V̄_s enter the data, and "
          "only W̄_s − W☉ (exact degeneracies of the model, checked on ln L)",
          "[fit]") {
  const auto t = test::standard_truth(60, 11);
  const auto cat = fit::simulate_catalog(t);
  for (auto form : {fit::RotationForm::flat, fit::RotationForm::linear}) {
    auto m = t.model;
    m.rotation = form;
    const fit::Likelihood L(cat, m, {});
    auto p = t.params, q = p;
    q[std::size_t(Param::theta0)] += 7;
    q[std::size_t(Param::v_sun)] -= 7;
    q[std::size_t(Param::mean_v)] -= 7;
    CHECK(L(q) == Approx(L(p)).margin(1e-8));
    auto w = p;
    w[std::size_t(Param::w_sun)] += 3;
    w[std::size_t(Param::mean_w)] += 3;
    CHECK(L(w) == Approx(L(p)).margin(1e-8));
  }
  // a power-law curve breaks the first degeneracy: the same shift changes ln L
  auto m = t.model;
  m.rotation = fit::RotationForm::power_law;
  const fit::Likelihood L(cat, m, {});
  auto p = t.params;
  p[std::size_t(Param::rotation_index)] = 0.1;
  auto q = p;
  q[std::size_t(Param::theta0)] += 7;
  q[std::size_t(Param::v_sun)] -= 7;
  q[std::size_t(Param::mean_v)] -= 7;
  CHECK(std::fabs(L(q) - L(p)) > 0.1);
}

TEST_CASE("A fit refuses degenerate parameters left free without a Gaussian prior, and says which",
          "[fit]") {
  const auto t = test::standard_truth(60, 11);
  auto s = test::standard_spec(t, 12);
  CHECK(fit::degeneracies(s).empty()); // V☉ has a Gaussian prior, W̄_s is fixed
  for (auto& q : s.params)
    if (q.param == Param::v_sun) q.prior = fit::Prior{fit::Prior::Kind::uniform, -50, 50, 0, 1};
  auto d = fit::degeneracies(s);
  REQUIRE(d.size() == 1);
  CHECK_THAT(d[0], Catch::Contains("theta0_kms, v_sun_kms and mean_v_kms"));
  for (auto& q : s.params)
    if (q.param == Param::mean_w)
      q = test::setting(Param::mean_w, true, 0, fit::Prior::Kind::uniform, -20, 20);
  d = fit::degeneracies(s);
  REQUIRE(d.size() == 2);
  CHECK_THAT(d[1], Catch::Contains("W̄_s − W☉"));
  const auto cat = fit::simulate_catalog(t);
  const fit::Likelihood L(cat, s.model, {});
  CHECK_THROWS_AS(fit::run_fit(s, L), InputError);
  // every parameter fixed: nothing to fit
  for (auto& q : s.params)
    q.free = false;
  CHECK_THROWS_WITH(fit::run_fit(s, L), Catch::Contains("every parameter is fixed"));
}

TEST_CASE("Kinematic distances: v_LSR of circular orbits is (Θ(R) R0/R − Θ0) sin l cos b, and the "
          "near and far roots give back the distances (Binney & Merrifield 1998, Galactic "
          "Astronomy, §9.2)",
          "[fit]") {
  fit::KinematicModel m;
  m.rotation = fit::RotationForm::flat;
  m.lsr = sky::LsrForm::components;
  fit::FullParams p{};
  p[std::size_t(Param::r0)] = 8.0;
  p[std::size_t(Param::theta0)] = 220;
  // the Sun moving with the Standard Solar Motion relative to the LSR, which itself circles
  p[std::size_t(Param::u_sun)] = 10.3;
  p[std::size_t(Param::v_sun)] = 15.3;
  p[std::size_t(Param::w_sun)] = 7.7;
  for (double l_deg : {30.0, 60.0, 135.0, 300.0}) {
    double ra, dec;
    sky::galactic_to_icrs(l_deg * units::deg, 0, ra, dec);
    for (double d : {2.0, 5.0, 9.0}) {
      const double R = std::sqrt(64 + d * d - 16 * d * std::cos(l_deg * units::deg));
      const double expected = (220 * 8 / R - 220) * std::sin(l_deg * units::deg);
      const double v = fit::circular_vlsr(ra / units::deg, dec / units::deg, d, m, p);
      CHECK(v == Approx(expected).margin(1e-9));
      const auto k = fit::kinematic_distance(ra / units::deg, dec / units::deg, v, m, p, 25);
      const bool near = std::fabs(k.near_kpc - d) < 1e-6, far = std::fabs(k.far_kpc - d) < 1e-6;
      CHECK((near || far));
    }
  }
  // beyond the terminal velocity at l = 30 deg: Θ0 (1 − sin l) = 110 km/s
  double ra, dec;
  sky::galactic_to_icrs(30 * units::deg, 0, ra, dec);
  const auto k = fit::kinematic_distance(ra / units::deg, dec / units::deg, 130, m, p, 25);
  CHECK(k.beyond_terminal);
  CHECK(k.tangent_kpc == Approx(8 * std::cos(30 * units::deg)).margin(0.02));
}

TEST_CASE("Kinematic distances are off by a factor of two for some sources of a catalog with "
          "spiral streaming of 15 km/s, and never for sources on circular orbits with small "
          "errors away from l = 0 and 180 deg",
          "[fit]") {
  auto t = test::standard_truth(300, 21);
  t.stream_kms = 15;
  t.errors.vlsr_kms = 1;
  const auto cat = fit::simulate_catalog(t);
  const auto count = [&](const residuals::Catalog& c, const fit::FullParams& truth) {
    int flagged = 0;
    for (const auto& s : c.sources) {
      // toward l = 0 and 180 deg v_LSR hardly changes with distance and kinematic distances are
      // undefined (common practice): only |sin l| > 0.35 counts
      double l, b;
      sky::icrs_to_galactic(s.ra_deg * units::deg, s.dec_deg * units::deg, l, b);
      if (std::fabs(std::sin(l)) < 0.35) continue;
      const double d = 1 / s.parallax_mas;
      const auto k = fit::kinematic_distance(s.ra_deg, s.dec_deg, s.vlsr_kms, t.model, truth);
      const double kin =
          std::fabs(k.near_kpc - d) < std::fabs(k.far_kpc - d) ? k.near_kpc : k.far_kpc;
      const bool f = std::isfinite(kin) && (kin / d >= 2 || kin / d <= 0.5);
      flagged += f;
    }
    return flagged;
  };
  const int streaming = count(cat, t.params);
  auto calm = t;
  calm.stream_kms = 0;
  calm.params[std::size_t(Param::dispersion)] = 0.5;
  calm.params[std::size_t(Param::mean_u)] = calm.params[std::size_t(Param::mean_v)] = 0;
  calm.errors.parallax_mas = 0.002;
  const int circular = count(fit::simulate_catalog(calm), calm.params);
  INFO("factor-two cases: " << streaming << " of 300 with streaming, " << circular
                            << " on circular orbits");
  CHECK(streaming >= 5);
  CHECK(circular == 0);
}

TEST_CASE("Fit files: strict keys, priors and refusals at the key's line", "[fit]") {
  const std::string head = "catalog = \"c.csv\"\n[distances]\ndistance_max_kpc = 15\n";
  const auto fails = [&](const std::string& body, const std::string& what) {
    INFO(body);
    CHECK_THROWS_WITH(fit::parse_fit_file(head + body, "f.toml"), Catch::Contains(what));
  };
  fails("[parameters]\nr0_kpcc = 8\n", "unknown parameter 'r0_kpcc'");
  fails("[parameters]\nr0_kpc = { start = 8, mean = 8, sigma = -1 }\n",
        "a prior's width must be positive");
  fails("[parameters]\nr0_kpc = { start = 12, min = 6, max = 11 }\n", "outside [min, max]");
  fails("[parameters]\ntheta0_kms = 230\nsun_angular_speed_kms_kpc = 30\n", "not both");
  fails("[parameters]\nrotation_index = 0.1\n", "is not used by this model");
  fails("[parameters]\nr0_kpc = { min = 6 }\n", "needs a start value");
  fails("[sampler]\nwalkerz = 3\n", "walkerz");
  fails("[rotation]\nform = \"wavy\"\n", "unknown rotation curve form");
  const auto f = fit::parse_fit_file(
      head + "[parameters]\nr0_kpc = { start = 8, min = 6, max = 11 }\nv_sun_kms = { mean = 12.24, "
             "sigma = 2 }\nu_sun_kms = 11\n",
      "f.toml");
  int free = 0;
  for (const auto& q : f.spec.params) {
    free += q.free;
    if (q.param == Param::v_sun) {
      CHECK(q.prior.kind == fit::Prior::Kind::gaussian);
      CHECK(q.value == 12.24);
    }
    if (q.param == Param::u_sun) CHECK((!q.free && q.value == 11));
    if (q.param == Param::w_sun) CHECK((!q.free && q.value == fit::default_value(Param::w_sun)));
  }
  CHECK(free == 2);
}

TEST_CASE("About 20 sources with maser-like errors give posterior widths within a factor two of "
          "0.6 kpc in R0 and 16 km/s in Theta0 (a fact of the trade for early fits of this kind, "
          "common practice, the sample size from memory)",
          "[fit]") {
  using K = fit::Prior::Kind;
  std::vector<double> w_r0, w_th;
  for (std::uint64_t seed = 1; seed <= 10; ++seed) {
    auto t = test::standard_truth(20, 300 + seed);
    t.model.rotation = fit::RotationForm::flat;
    // an early sample: nearby enough for 0.02 mas parallaxes, in a northern array's sky
    t.distance_min_kpc = 1, t.distance_max_kpc = 7;
    t.model.prior.distance_min_kpc = 1, t.model.prior.distance_max_kpc = 7;
    t.dec_min_deg = -30;
    t.errors.parallax_mas = 0.02;
    t.errors.pm_masyr = 0.1; // a few km/s at a few kpc
    t.errors.vlsr_kms = 5;
    const auto cat = fit::simulate_catalog(t);
    REQUIRE(cat.sources.size() == 20);
    fit::FitSpec s;
    s.file = "early";
    s.model = t.model;
    const auto& p = t.params;
    // free: R0, Θ0, the mean motion in the plane and σ; the solar motion fixed (as early fits
    // took it from Hipparcos-era measurements) and W̄_s = 0
    s.params = {test::setting(Param::r0, true, 8.0, K::uniform, 5, 12),
                test::setting(Param::theta0, true, 230, K::uniform, 150, 320),
                test::setting(Param::u_sun, false, p[std::size_t(Param::u_sun)]),
                test::setting(Param::v_sun, false, p[std::size_t(Param::v_sun)]),
                test::setting(Param::w_sun, false, p[std::size_t(Param::w_sun)]),
                test::setting(Param::z_sun, false, 0),
                test::setting(Param::mean_u, true, 0, K::uniform, -40, 40),
                test::setting(Param::mean_v, true, 0, K::uniform, -40, 40),
                test::setting(Param::mean_w, false, 0),
                test::setting(Param::dispersion, true, 5, K::uniform, 0.5, 30),
                test::setting(Param::parallax_offset, false, 0),
                test::setting(Param::disk_scale_length, false, 5),
                test::setting(Param::disk_scale_height, false, 0.05)};
    s.sampler.seed = seed;
    const fit::Likelihood L(cat, s.model, {});
    const auto r = fit::run_fit(s, L);
    REQUIRE(r.converged);
    for (const auto& m : r.summary) {
      if (m.param == Param::r0) w_r0.push_back(0.5 * (m.hi - m.lo));
      if (m.param == Param::theta0) w_th.push_back(0.5 * (m.hi - m.lo));
    }
  }
  std::sort(w_r0.begin(), w_r0.end());
  std::sort(w_th.begin(), w_th.end());
  const double r0 = 0.5 * (w_r0[4] + w_r0[5]), th = 0.5 * (w_th[4] + w_th[5]);
  std::cout << "20 maser-like sources: median posterior half-width R0 " << r0 << " kpc (range "
            << w_r0.front() << "-" << w_r0.back() << "), Theta0 " << th << " km/s (range "
            << w_th.front() << "-" << w_th.back() << ")\n";
  CHECK(r0 > 0.3);
  CHECK(r0 < 1.2);
  CHECK(th > 8);
  CHECK(th < 32);
}

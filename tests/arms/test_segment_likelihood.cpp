// The arm segment's likelihood (arms/segment_likelihood.hpp) against adaptive Gauss-Kronrod
// quadrature of the same integrals along each line of sight (Boost.Math gauss_kronrod), its
// grids' convergence, and the naive 1/ϖ form against its closed form.
#include <catch2/catch.hpp>

#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <cmath>

#include "arms/arm_truth.hpp"
#include "undertow/arms/spiral_geometry.hpp"
#include "undertow/fit/distance_prior.hpp"
#include "undertow/sky/galactic.hpp"

using namespace undertow;

namespace {

// ln ∫ N(ϖ | 1/d) q(d) dd − ln ∫ q(d) dd for one source, q(d) = d² exp(−δ²/2w²) exp(−|z|/h_z)
double reference_ln_l(const residuals::Source& s, const fit::Geometry& g, const arms::SightLines& l,
                      double psi_ref, double pitch_deg, double ln_r, double w) {
  const auto n = sky::galactic_direction(s.ra_deg, s.dec_deg);
  const double t = std::tan(pitch_deg * units::deg), c = std::cos(pitch_deg * units::deg);
  const auto q = [&](double d) {
    double x = 0, y = 0, z = 0;
    fit::galactocentric_xyz(d, n.data(), g.r0_kpc, g.z_sun_kpc, x, y, z);
    const double R = std::hypot(x, y);
    const double delta =
        arms::distance_across_arm(R, arms::azimuth_from(std::atan2(y, -x), psi_ref), ln_r, t, c);
    // the distance range's soft edges (segment_likelihood.hpp)
    const double edge = std::max(0.1, l.width_min_kpc);
    const double beyond = std::max({0.0, l.distance_min_kpc - d, d - l.distance_max_kpc}) / edge;
    return d * d *
           std::exp(-0.5 * delta * delta / (w * w) - 0.5 * beyond * beyond -
                    std::fabs(z) / l.scale_height_kpc);
  };
  const auto meas = [&](double d) {
    const double r = s.parallax_mas - 1 / d;
    return std::exp(-0.5 * r * r / (s.parallax_err_mas * s.parallax_err_mas));
  };
  // adaptive Gauss-Kronrod on 100 pieces, so that no narrow peak goes unseen
  const auto integral = [&](auto f) {
    using GK = boost::math::quadrature::gauss_kronrod<double, 61>;
    const double edge = std::max(0.1, l.width_min_kpc);
    const double lo = std::max(0.05 * l.width_min_kpc, l.distance_min_kpc - 6 * edge),
                 hi = l.distance_max_kpc + 6 * edge;
    double sum = 0, err = 0;
    for (int k = 0; k < 100; ++k)
      sum += GK::integrate(f, lo + k * (hi - lo) / 100, lo + (k + 1) * (hi - lo) / 100, 8, 1e-12,
                           &err);
    return sum;
  };
  return std::log(integral([&](double d) { return meas(d) * q(d); })) - std::log(integral(q));
}

} // namespace

TEST_CASE("arms: the segment likelihood equals adaptive quadrature along each sight line",
          "[arms]") {
  for (double frac : {0.0, 0.2}) { // fixed 0.012 mas errors, and 20 % of the parallax
    auto t = test::arm_truth(14, 0.2, 12, 77);
    if (frac > 0) {
      t.errors.kind = observe::ErrorModel::Kind::fractional;
      t.errors.parallax_fraction = frac;
    }
    t.placement.psi_min_deg = -180, t.placement.psi_max_deg = 180; // no window edges
    const auto cat = fit::simulate_catalog(t);
    const auto g = test::arm_geometry(t);
    const auto lines = test::arm_sight_lines(t);
    const double psi = arms::reference_azimuth(cat.sources, g);
    const arms::SegmentLikelihood L(cat.sources, g, psi, lines);
    // differences between parameter points: the likelihood is defined up to a constant
    const double a[3] = {14, std::log(9.5) - psi * std::tan(14 * units::deg), 0.2};
    for (const auto& b :
         {std::array<double, 3>{12, a[1] + 0.02, 0.3}, std::array<double, 3>{17, a[1] - 0.03, 0.12},
          std::array<double, 3>{14, a[1], 0.6}}) {
      double ref = 0;
      for (const auto& s : cat.sources)
        ref += reference_ln_l(s, g, lines, psi, a[0], a[1], a[2]) -
               reference_ln_l(s, g, lines, psi, b[0], b[1], b[2]);
      const double ours = L(a[0], a[1], a[2]) - L(b[0], b[1], b[2]);
      INFO("fraction " << frac << " point " << b[0] << ", " << b[1] << ", " << b[2]);
      CHECK(std::fabs(ours - ref) < 1e-3);
    }
  }
}

TEST_CASE("arms: the likelihood's grids have converged", "[arms]") {
  auto t = test::arm_truth(10, 0.15, 20, 78);
  const auto cat = fit::simulate_catalog(t);
  const auto g = test::arm_geometry(t);
  auto lines = test::arm_sight_lines(t);
  const double psi = arms::reference_azimuth(cat.sources, g);
  lines.window_lo = -0.3, lines.window_hi = 0.5; // with the window's edges
  const arms::SegmentLikelihood L(cat.sources, g, psi, lines);
  lines.width_min_kpc /= 3; // three times finer grids
  const arms::SegmentLikelihood fine(cat.sources, g, psi, lines);
  const double lr = std::log(9.5) - psi * std::tan(10 * units::deg);
  for (double w : {0.05, 0.15, 0.5})
    for (double p : {8.0, 10.0, 13.0}) {
      const double d = (L(p, lr, w) - L(10, lr, 0.15)) - (fine(p, lr, w) - fine(10, lr, 0.15));
      CHECK(std::fabs(d) < 1e-4);
    }
}

TEST_CASE("arms: the naive likelihood is a Gaussian in the distance across the arm", "[arms]") {
  auto t = test::arm_truth(14, 0.2, 10, 79);
  const auto cat = fit::simulate_catalog(t);
  const auto g = test::arm_geometry(t);
  const double psi = arms::reference_azimuth(cat.sources, g);
  const arms::SegmentLikelihood L(cat.sources, g, psi, test::arm_sight_lines(t));
  double ref = 0;
  const double p = 14, lr = std::log(9.4), w = 0.3;
  for (const auto& s : cat.sources) {
    const auto n = sky::galactic_direction(s.ra_deg, s.dec_deg);
    double x = 0, y = 0, z = 0;
    fit::galactocentric_xyz(1 / s.parallax_mas, n.data(), g.r0_kpc, g.z_sun_kpc, x, y, z);
    const double R = std::hypot(x, y),
                 dpsi = std::remainder(std::atan2(y, -x) - psi, 2 * units::pi);
    const double delta =
        R * (std::log(R) - (lr - dpsi * std::tan(p * units::deg))) * std::cos(p * units::deg);
    ref += -0.5 * delta * delta / (w * w) - std::log(w);
  }
  CHECK(L.naive(p, lr, w) == Approx(ref).epsilon(1e-12));
}

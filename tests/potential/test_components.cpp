// Unit tests of the axisymmetric potential components (include/undertow/potential/*.hpp).
//
// Every check names its source beside it. Facts used throughout:
//  * a = -grad Phi (definition of the potential), checked against Richardson-extrapolated central
//    differences of Phi (tests/support/numdiff.hpp);
//  * Poisson's equation, laplacian Phi = 4 pi G rho;
//  * Gauss's theorem for a spherical mass distribution, M(r) = r^2 |a_r| / G;
//  * M(r) = integral of 4 pi r^2 rho dr (definition of the enclosed mass), and
//    Phi(r) = -G M(r) / r - 4 pi G int_r^inf rho r' dr' (Binney & Tremaine 2008, eq. 2.28;
//    equation number from memory), both by Gauss-Kronrod quadrature (Boost.Math).
//
// Units: kpc, km/s, Msun; G = units::G.
#include <catch2/catch.hpp>

#include <boost/math/quadrature/gauss_kronrod.hpp>

#include <array>
#include <cmath>
#include <cstdint>
#include <functional>
#include <initializer_list>
#include <limits>
#include <random>
#include <set>
#include <string>
#include <type_traits>
#include <variant>
#include <vector>

#include "support/numdiff.hpp"
#include "undertow/potential/component.hpp"

namespace {

using namespace undertow::potential;
using undertow::detail::ParameterError;
using undertow::test::V3;
namespace numdiff = undertow::test;

constexpr double G = undertow::units::G;
constexpr double pi = undertow::units::pi;
constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

double norm(const V3& p) {
  return std::sqrt(p[0] * p[0] + p[1] * p[1] + p[2] * p[2]);
}

// ---------------------------------------------------------------------------------------------
// Evaluation through the variant, as a model does.

double phi(const ComponentShape& s, const V3& p) {
  return std::visit([&](const auto& c) { return c.potential(p[0], p[1], p[2]); }, s);
}
V3 accel(const ComponentShape& s, const V3& p) {
  V3 a{0, 0, 0};
  std::visit([&](const auto& c) { c.add_accel(p[0], p[1], p[2], a[0], a[1], a[2]); }, s);
  return a;
}
double rho(const ComponentShape& s, const V3& p) {
  return std::visit([&](const auto& c) { return c.density(p[0], p[1], p[2]); }, s);
}

template <class C> constexpr bool is_spherical = requires(const C& c) {
  c.enclosed_mass(1.0);
};

bool spherical(const ComponentShape& s) {
  return std::visit([](const auto& c) { return is_spherical<std::decay_t<decltype(c)>>; }, s);
}
double enclosed(const ComponentShape& s, double r) {
  return std::visit(
      [&](const auto& c) -> double {
        if constexpr (is_spherical<std::decay_t<decltype(c)>>)
          return c.enclosed_mass(r);
        else
          return kNaN;
      },
      s);
}

// ---------------------------------------------------------------------------------------------
// Deterministic points: a fixed-seed mt19937_64 turned into doubles by hand (the standard
// distributions are implementation-defined), log-uniform in r, isotropic in direction, plus a
// few hand-picked points on the axes and near the midplane.

class Sampler {
public:
  explicit Sampler(std::uint64_t seed) : eng_(seed) {}
  double uniform() { return static_cast<double>(eng_() >> 11) * 0x1.0p-53; }
  V3 point(double rmin, double rmax) {
    const double r = rmin * std::pow(rmax / rmin, uniform());
    const double ct = 2 * uniform() - 1, st = std::sqrt(1 - ct * ct), ph = 2 * pi * uniform();
    return {r * st * std::cos(ph), r * st * std::sin(ph), r * ct};
  }

private:
  std::mt19937_64 eng_;
};

std::vector<V3> test_points(std::uint64_t seed, int n_random = 60) {
  Sampler s(seed);
  std::vector<V3> pts{{8.0, 0.0, 0.0},   {0.0, 0.0, 3.0},  {0.0, 0.15, 0.0}, {5.0, 5.0, 0.05},
                      {25.0, 0.0, 10.0}, {0.1, 0.1, -0.1}, {-2.0, 1.0, 0.3}, {0.0, -29.0, 0.0},
                      {1.0, 0.0, -12.0}, {14.0, -3.0, 0.0}};
  for (int i = 0; i < n_random; ++i)
    pts.push_back(s.point(0.1, 30.0));
  return pts;
}

// ---------------------------------------------------------------------------------------------
// The parameter sets. `length` is the distance from the point to the nearest (complex)
// singularity of Phi, i.e. the scale on which Phi varies there; finite-difference steps are a
// fixed fraction of it (common practice for finite differences). `skip` removes points whose
// stencil would straddle a density jump.

struct Case {
  std::string name;
  ComponentShape shape;
  std::function<double(const V3&)> length;
  std::function<bool(const V3&)> skip;
  double poisson_step; // h / length for the Laplacian
  // If set, the Laplacian is taken as d2/dx2 + d2/dy2 with steps from `length_R` plus d2/dz2
  // with steps from `length_z` (for disks, whose Phi varies much faster in z than in R).
  std::function<double(const V3&)> length_R = {}, length_z = {};
};

Case make_case(
    std::string name, ComponentShape s, std::function<double(const V3&)> length,
    double poisson_step = 5e-3,
    std::function<bool(const V3&)> skip = [](const V3&) { return false; }) {
  return {std::move(name), std::move(s), std::move(length), std::move(skip), poisson_step};
}

const auto by_radius = [](const V3& p) { return norm(p); };
std::function<double(const V3&)> cored(double core) {
  return [core](const V3& p) { return std::hypot(norm(p), core); };
}

std::vector<Case> all_cases() {
  std::vector<Case> v;
  // Kepler: Sgr A*-like black hole and galaxy-like masses.
  v.push_back(make_case("point mass 4.1e6", PointMass::make(4.1e6), by_radius));
  v.push_back(make_case("point mass 1e11", PointMass::make(1e11), by_radius));
  v.push_back(make_case("point mass 1e12", PointMass::make(1e12), by_radius));
  // Plummer: compact bulge, cluster-like, extended halo.
  v.push_back(make_case("plummer 1e10 0.3", Plummer::make(1e10, 0.3), cored(0.3)));
  v.push_back(make_case("plummer 5e10 3", Plummer::make(5e10, 3.0), cored(3.0)));
  v.push_back(make_case("plummer 1e12 20", Plummer::make(1e12, 20.0), cored(20.0)));
  // Hernquist: bulges and a halo.
  v.push_back(make_case("hernquist 1e10 0.5", Hernquist::make(1e10, 0.5), by_radius));
  v.push_back(make_case("hernquist 5e10 0.7", Hernquist::make(5e10, 0.7), by_radius));
  v.push_back(make_case("hernquist 1e12 20", Hernquist::make(1e12, 20.0), by_radius));
  // Isochrone.
  v.push_back(make_case("isochrone 1e10 0.3", Isochrone::make(1e10, 0.3), cored(0.3)));
  v.push_back(make_case("isochrone 1e11 2.5", Isochrone::make(1e11, 2.5), cored(2.5)));
  v.push_back(make_case("isochrone 1e12 10", Isochrone::make(1e12, 10.0), cored(10.0)));
  // Miyamoto-Nagai: thin, thick, a = 0 (Plummer) and a = b disks. With zeta = sqrt(z^2 + b^2),
  // Phi = -GM / sqrt(R^2 + a^2 + 2 a zeta + zeta^2) has a branch point of amplitude ~ a where
  // zeta = 0, at a distance zeta in z, and poles at a distance d = sqrt(R^2 + (a + zeta)^2).
  // The z step follows zeta (d when a = 0), the R steps follow d.
  const auto mn_case = [](std::string name, double m, double a, double b) {
    const auto zeta = [b](const V3& p) { return std::hypot(p[2], b); };
    const auto d = [a, zeta](const V3& p) { return std::hypot(p[0], p[1], a + zeta(p)); };
    Case c = make_case(std::move(name), MiyamotoNagai::make(m, a, b), zeta);
    c.length_R = d;
    c.length_z = a == 0 ? std::function<double(const V3&)>(d) : zeta;
    return c;
  };
  v.push_back(mn_case("miyamoto-nagai 6.8e10 3 0.28", 6.8e10, 3.0, 0.28));
  v.push_back(mn_case("miyamoto-nagai 5e10 6.5 0.26", 5e10, 6.5, 0.26));
  v.push_back(mn_case("miyamoto-nagai 1e11 15 3", 1e11, 15.0, 3.0));
  v.push_back(mn_case("miyamoto-nagai 2e10 0 1", 2e10, 0.0, 1.0));
  v.push_back(mn_case("miyamoto-nagai 1e10 0.3 0.3", 1e10, 0.3, 0.3));

  // NFW: by scale density and by virial mass.
  v.push_back(make_case("nfw rho_s 1e7 rs 16", Nfw::make(1e7, 16.0), by_radius));
  v.push_back(make_case("nfw rho_s 3e8 rs 0.8", Nfw::make(3e8, 0.8), by_radius));
  v.push_back(
      make_case("nfw virial 1e12 c10 200 h70", Nfw::make_virial(1e12, 10, 200, 70), by_radius));
  v.push_back(
      make_case("nfw virial 1e11 c15 100 h67.7", Nfw::make_virial(1e11, 15, 100, 67.7), by_radius));
  // Logarithmic: Phi is singular where Rc^2 + R^2 + z^2/q^2 = 0.
  const auto log_length = [](double rc, double q) {
    return [rc, q](const V3& p) { return std::min(1.0, q) * std::hypot(norm(p), rc); };
  };
  v.push_back(
      make_case("logarithmic 220 0 1", Logarithmic::make(220, 0.0, 1.0), log_length(0.0, 1.0)));
  v.push_back(
      make_case("logarithmic 200 1 0.8", Logarithmic::make(200, 1.0, 0.8), log_length(1.0, 0.8)));
  v.push_back(make_case("logarithmic 180 12 1.25", Logarithmic::make(180, 12.0, 1.25),
                        log_length(12.0, 1.25)));
  v.push_back(make_case("logarithmic 240 0.5 0.75", Logarithmic::make(240, 0.5, 0.75),
                        log_length(0.5, 0.75)));
  // Burkert: dwarf-like and Milky-Way-like cores. Phi(r) has odd powers of r (rho is linear in r
  // at the centre), so the length is r; the odd part is small, r / r0, near the centre, where the
  // large constant Phi(0) sets the rounding of the second difference: there a larger step is
  // both safe and needed (see the Poisson test).
  v.push_back(make_case("burkert 3e8 0.5", Burkert::make(3e8, 0.5), by_radius, 2e-2));
  v.push_back(make_case("burkert 5e7 3", Burkert::make(5e7, 3.0), by_radius, 2e-2));
  v.push_back(make_case("burkert 1e7 12", Burkert::make(1e7, 12.0), by_radius, 2e-2));
  // Power law with a Gaussian cut-off: a cusped bulge, a Gaussian sphere (alpha = 0) and alpha = 1.
  // The Gaussian varies on rc^2 / r at r > rc, but only in the part of Phi of the size of rho,
  // which is tiny there; the rounding is set by all of Phi ~ G M / r, so the step follows r:
  // the truncation error of the Gaussian part is then (h r / rc^2)^4 f^(6) / 1440 ~ 1e-6 of
  // its own Laplacian at r = 4 rc (common practice for finite differences).
  const auto plc_length = [](double alpha, double rc) {
    return [alpha, rc](const V3& p) { return alpha > 0 ? norm(p) : std::hypot(norm(p), 0.2 * rc); };
  };
  v.push_back(make_case("tapered-cusp 1e9 1 1.8 1.9", TaperedCusp::make(1e9, 1, 1.8, 1.9),
                        plc_length(1.8, 1.9)));
  v.push_back(make_case("tapered-cusp 2e8 1 0 5", TaperedCusp::make(2e8, 1, 0.0, 5.0),
                        plc_length(0.0, 5.0)));
  v.push_back(make_case("tapered-cusp 5e8 2 1 3", TaperedCusp::make(5e8, 2, 1.0, 3.0),
                        plc_length(1.0, 3.0)));
  // Allen & Santillan halo; one with the cut inside the sampled radii (points near it skipped).
  v.push_back(make_case("allen-santillan 1e11 12 2.02 100",
                        AllenSantillanHalo::make(1e11, 12.0, 2.02, 100.0), by_radius));
  v.push_back(make_case("allen-santillan 2e11 20 2.5 200",
                        AllenSantillanHalo::make(2e11, 20.0, 2.5, 200.0), by_radius));
  v.push_back(make_case("allen-santillan 8e10 3 1.5 15",
                        AllenSantillanHalo::make(8e10, 3.0, 1.5, 15.0), by_radius, 5e-3,
                        [](const V3& p) { return std::fabs(norm(p) - 15.0) < 0.1 * norm(p); }));
  return v;
}

// ---------------------------------------------------------------------------------------------
// Quadratures (Boost.Math adaptive Gauss-Kronrod, 61 points), in ln r so that cusps and long
// tails are smooth.

double quad(const std::function<double(double)>& f, double a, double b, double tol = 1e-13,
            unsigned depth = 15) {
  using boost::math::quadrature::gauss_kronrod;
  double err = 0;
  return gauss_kronrod<double, 61>::integrate(f, a, b, depth, tol, &err);
}

double radial_density(const ComponentShape& s, double r) {
  return rho(s, {0.6 * r, 0.0, 0.8 * r});
}

// Where the density stops (the Allen-Santillan cut), else +inf.
double density_edge(const ComponentShape& s) {
  if (const auto* h = std::get_if<AllenSantillanHalo>(&s)) return h->cut;
  return kInf;
}

// M(r) = int_0^r 4 pi r'^2 rho dr'; the part below 1e-12 r is < 1e-14 of it for rho ~ r^-alpha,
// alpha < 2.
double mass_by_quadrature(const ComponentShape& s, double r) {
  const double top = std::min(r, density_edge(s));
  return quad(
      [&](double t) {
        const double x = std::exp(t);
        return 4 * pi * x * x * x * radial_density(s, x);
      },
      std::log(1e-12 * top), std::log(top));
}

// int_r^inf rho r' dr' (upper limit 1e20 kpc or the density edge: for rho ~ r^-3 the tail
// beyond is < 1e-19 of the rest).
double outer_by_quadrature(const ComponentShape& s, double r) {
  const double top = std::min(1e20, density_edge(s));
  if (r >= top) return 0.0;
  return quad(
      [&](double t) {
        const double x = std::exp(t);
        return x * x * radial_density(s, x);
      },
      std::log(r), std::log(top));
}

template <class F> std::string thrown_key(F&& f) {
  try {
    f();
  } catch (const ParameterError& e) {
    return e.key;
  } catch (...) {
    return "<other exception>";
  }
  return "<no exception>";
}

// Circular speed squared in the plane z = 0 at radius R and azimuth phi: v_c^2 = R |a_R|.
double vc2(const ComponentShape& s, double R, double azimuth = 0.7) {
  const V3 p{R * std::cos(azimuth), R * std::sin(azimuth), 0.0};
  const V3 a = accel(s, p);
  return -(a[0] * p[0] + a[1] * p[1]); // R * (-a . R_hat)
}

const std::vector<double> radii{0.1, 0.3, 1.0, 2.0, 5.0, 8.0, 15.0, 30.0};

} // namespace

// =============================================================================================
// 1. Force and potential agree.

TEST_CASE("Force equals minus the gradient of the potential (definition of Phi, Richardson "
          "central differences)",
          "[components]") {
  for (const Case& c : all_cases()) {
    DYNAMIC_SECTION(c.name) {
      int checked = 0;
      for (const V3& p : test_points(0x5eed0001)) {
        if (c.skip(p)) continue;
        const double h = 1e-3 * c.length(p);
        const V3 g = numdiff::gradient([&](const V3& q) { return phi(c.shape, q); }, p, h);
        const V3 a = accel(c.shape, p);
        const double err = std::hypot(a[0] + g[0], a[1] + g[1], a[2] + g[2]) / norm(a);
        INFO("point (" << p[0] << ", " << p[1] << ", " << p[2] << "), |a| = " << norm(a));
        CHECK(err <= 1e-7);
        ++checked;
      }
      REQUIRE(checked >= 50);
    }
  }
}

TEST_CASE("add_accel adds -grad Phi to the accumulators instead of overwriting them (interface "
          "contract in the component headers)",
          "[components]") {
  const V3 p{3.0, -1.5, 0.7};
  for (const Case& c : all_cases()) {
    DYNAMIC_SECTION(c.name) {
      const V3 a = accel(c.shape, p);
      double ax = 100.0, ay = -200.0, az = 300.0;
      std::visit([&](const auto& k) { k.add_accel(p[0], p[1], p[2], ax, ay, az); }, c.shape);
      CHECK(ax - 100.0 == Approx(a[0]).epsilon(1e-12).margin(1e-12));
      CHECK(ay + 200.0 == Approx(a[1]).epsilon(1e-12).margin(1e-12));
      CHECK(az - 300.0 == Approx(a[2]).epsilon(1e-12).margin(1e-12));
    }
  }
}

// =============================================================================================
// 2. Poisson's equation.
//
// The Richardson second difference has rounding error ~ 50 eps |Phi| / h^2 and truncation
// ~ (h/L)^4 |Phi| / L^2; both scale with the size of the individual terms of the Laplacian,
// not with rho. Where 4 pi G rho is tiny compared with those terms (a point mass anywhere, the
// outskirts of a Plummer sphere or of a Gaussian cut-off, far above a Miyamoto-Nagai disk) the
// check is made relative to 1e-3 |a| / r, the size of the terms, instead: it then requires the
// terms to cancel to 1e-8 of themselves.

TEST_CASE("Poisson's equation: laplacian Phi = 4 pi G rho (Poisson's equation)", "[components]") {
  for (const Case& c : all_cases()) {
    DYNAMIC_SECTION(c.name) {
      int checked = 0;
      for (const V3& p : test_points(0x5eed0002)) {
        if (c.skip(p)) continue;
        double lap = 0;
        if (c.length_z) { // in-plane and vertical parts with their own steps
          const auto in_plane = [&](const V3& q) { return phi(c.shape, {q[0], q[1], p[2]}); };
          const auto vertical = [&](const V3& q) { return phi(c.shape, {p[0], p[1], q[2]}); };
          lap = numdiff::laplacian(in_plane, p, c.poisson_step * c.length_R(p)) +
                numdiff::laplacian(vertical, p, c.poisson_step * c.length_z(p));
        } else {
          lap = numdiff::laplacian([&](const V3& q) { return phi(c.shape, q); }, p,
                                   c.poisson_step * c.length(p));
        }
        const double source = 4 * pi * G * rho(c.shape, p);
        const double scale = std::max(source, 1e-3 * norm(accel(c.shape, p)) / norm(p));
        INFO("point (" << p[0] << ", " << p[1] << ", " << p[2] << "), laplacian " << lap
                       << ", 4 pi G rho " << source);
        CHECK(std::fabs(lap - source) / scale <= 1e-5);
        ++checked;
      }
      REQUIRE(checked >= 50);
    }
  }
}

// =============================================================================================
// 3. Spherical components: enclosed mass and the zero point of the potential.

TEST_CASE("Spherical components: the force is central and enclosed_mass(r) = r^2 |a| / G "
          "(Gauss's theorem)",
          "[components]") {
  for (const Case& c : all_cases()) {
    if (!spherical(c.shape)) continue;
    DYNAMIC_SECTION(c.name) {
      for (const V3& p : test_points(0x5eed0003, 40)) {
        const V3 a = accel(c.shape, p);
        const double r = norm(p), am = norm(a);
        INFO("r = " << r);
        // central: a x r = 0 and a points inward
        const V3 cross{a[1] * p[2] - a[2] * p[1], a[2] * p[0] - a[0] * p[2],
                       a[0] * p[1] - a[1] * p[0]};
        CHECK(norm(cross) <= 1e-13 * am * r);
        CHECK(a[0] * p[0] + a[1] * p[1] + a[2] * p[2] < 0);
        CHECK(r * r * am / G == Approx(enclosed(c.shape, r)).epsilon(1e-12));
      }
    }
  }
}

TEST_CASE("Spherical components: enclosed_mass(r) = int_0^r 4 pi r'^2 rho dr' (definition of the "
          "enclosed mass, Gauss-Kronrod quadrature)",
          "[components]") {
  for (const Case& c : all_cases()) {
    if (!spherical(c.shape) || std::holds_alternative<PointMass>(c.shape)) continue;
    DYNAMIC_SECTION(c.name) {
      for (double r : {0.1, 0.5, 1.0, 3.0, 8.0, 14.0, 16.0, 30.0, 120.0, 500.0}) {
        INFO("r = " << r);
        CHECK(enclosed(c.shape, r) == Approx(mass_by_quadrature(c.shape, r)).epsilon(1e-10));
      }
    }
  }
}

TEST_CASE("Point mass: density zero away from the centre and enclosed mass M at every radius "
          "(Newton's point mass, Gauss's theorem)",
          "[components]") {
  const auto k = PointMass::make(4.1e6);
  for (double r : radii) {
    CHECK(k.density(r, 0.0, 0.0) == 0.0);
    CHECK(k.enclosed_mass(r) == Approx(4.1e6).epsilon(1e-14));
  }
}

TEST_CASE("Spherical components: potential zero point Phi(r) = -G M(r)/r - 4 pi G int_r^inf rho "
          "r' dr' (Binney & Tremaine 2008 eq. 2.28, number from memory)",
          "[components]") {
  for (const Case& c : all_cases()) {
    if (!spherical(c.shape) || std::holds_alternative<PointMass>(c.shape)) continue;
    DYNAMIC_SECTION(c.name) {
      for (double r : {0.1, 0.5, 1.0, 3.0, 8.0, 14.0, 16.0, 30.0, 120.0}) {
        const double expected =
            -G * mass_by_quadrature(c.shape, r) / r - 4 * pi * G * outer_by_quadrature(c.shape, r);
        INFO("r = " << r);
        CHECK(phi(c.shape, {0.0, 0.6 * r, -0.8 * r}) == Approx(expected).epsilon(1e-10));
      }
    }
  }
}

TEST_CASE("Components that vanish at infinity do, and the logarithmic potential grows without "
          "bound (vanishes_at_infinity flag, Gauss's theorem, r Phi -> -G M)",
          "[components]") {
  for (const Case& c : all_cases()) {
    DYNAMIC_SECTION(c.name) {
      const Component comp{"x", c.shape};
      const double far = 1e9, near = 1.0;
      if (comp.vanishes_at_infinity()) {
        CHECK(std::fabs(phi(c.shape, {0.0, 0.0, far})) <
              1e-6 * std::fabs(phi(c.shape, {near, 0, 0})));
        // finite total mass (all but NFW and Burkert, whose M(r) grows as ln r): r Phi -> -G M
        double total = kNaN;
        if (const auto* mn = std::get_if<MiyamotoNagai>(&c.shape))
          total = mn->total_mass();
        else if (!std::holds_alternative<Nfw>(c.shape) && !std::holds_alternative<Burkert>(c.shape))
          total = enclosed(c.shape, far);
        if (!std::isnan(total))
          CHECK(far * phi(c.shape, {0.6 * far, 0.0, 0.8 * far}) ==
                Approx(-G * total).epsilon(1e-6));
      } else {
        CHECK(phi(c.shape, {far, 0.0, 0.0}) > phi(c.shape, {1e3, 0.0, 0.0}));
        CHECK(phi(c.shape, {1e3, 0.0, 0.0}) > phi(c.shape, {near, 0.0, 0.0}));
      }
    }
  }
}

TEST_CASE("Component::kind() names the shape and every kind is distinct (interface contract)",
          "[components]") {
  std::set<std::string> kinds;
  const std::vector<std::pair<ComponentShape, std::string>> shapes{
      {PointMass::make(1e10), "point-mass"},
      {Plummer::make(1e10, 1), "plummer"},
      {Hernquist::make(1e10, 1), "hernquist"},
      {Isochrone::make(1e10, 1), "isochrone"},
      {MiyamotoNagai::make(1e10, 3, 0.3), "miyamoto-nagai"},
      {Nfw::make(1e7, 16), "nfw"},
      {Logarithmic::make(220, 0, 1), "logarithmic"},
      {Burkert::make(1e7, 10), "burkert"},
      {TaperedCusp::make(1e9, 1, 1.8, 1.9), "tapered-cusp"},
      {AllenSantillanHalo::make(1e11, 12, 2.02, 100), "allen-santillan-halo"}};
  for (const auto& [shape, kind] : shapes) {
    const Component comp{"label", shape};
    CHECK(std::string(comp.kind()) == kind);
    kinds.insert(comp.kind());
    CHECK(comp.vanishes_at_infinity() == (kind != "logarithmic"));
  }
  CHECK(kinds.size() == shapes.size());
}

// =============================================================================================
// 4. Closed forms, component by component.

TEST_CASE("Point mass: v_c^2 = G M / R (Kepler, Binney & Tremaine 2008 §2.2.2a)", "[components]") {
  const double m = GENERATE(4.1e6, 1e10, 1e12);
  const ComponentShape s = PointMass::make(m);
  for (double R : radii)
    CHECK(vc2(s, R) == Approx(G * m / R).epsilon(1e-13));
  CHECK(phi(s, {3.0, 4.0, 0.0}) == Approx(-G * m / 5.0).epsilon(1e-14));
}

TEST_CASE("Plummer: v_c^2 = G M R^2 / (R^2 + b^2)^(3/2), rho(0) = 3M/(4 pi b^3) and "
          "M(r) = M r^3/(r^2+b^2)^(3/2) (Plummer 1911, Binney & Tremaine 2008 eqs. 2.44, "
          "from memory)",
          "[components]") {
  const auto [m, b] = GENERATE(std::pair{1e10, 0.3}, std::pair{5e10, 3.0}, std::pair{1e12, 20.0});
  const ComponentShape s = Plummer::make(m, b);
  for (double R : radii) {
    CHECK(vc2(s, R) == Approx(G * m * R * R / std::pow(R * R + b * b, 1.5)).epsilon(1e-13));
    CHECK(enclosed(s, R) == Approx(m * R * R * R / std::pow(R * R + b * b, 1.5)).epsilon(1e-13));
  }
  CHECK(rho(s, {0, 0, 0}) == Approx(3 * m / (4 * pi * b * b * b)).epsilon(1e-14));
  CHECK(enclosed(s, 1e7 * b) == Approx(m).epsilon(1e-12));
}

TEST_CASE("Hernquist: v_c^2 = G M r / (r + a)^2 and M(r) = M r^2/(r + a)^2 (Hernquist 1990, ApJ "
          "356, 359, eqs. 3 and 5 for M(r) and Phi, numbers from memory)",
          "[components]") {
  const auto [m, a] = GENERATE(std::pair{1e10, 0.5}, std::pair{5e10, 0.7}, std::pair{1e12, 20.0});
  const ComponentShape s = Hernquist::make(m, a);
  for (double R : radii) {
    CHECK(vc2(s, R) == Approx(G * m * R / ((R + a) * (R + a))).epsilon(1e-13));
    CHECK(enclosed(s, R) == Approx(m * R * R / ((R + a) * (R + a))).epsilon(1e-13));
  }
  // half-mass radius (1 + sqrt 2) a (Hernquist 1990, from memory)
  CHECK(enclosed(s, (1 + std::sqrt(2.0)) * a) == Approx(0.5 * m).epsilon(1e-13));
  // rho(a) = M / (16 pi a^3) from rho = M a / (2 pi r (r + a)^3) (Hernquist 1990 eq. 2, from
  // memory)
  CHECK(rho(s, {0, a, 0}) == Approx(m / (16 * pi * a * a * a)).epsilon(1e-13));
}

TEST_CASE("Isochrone: v_c^2 = G M r^2 / ((b + s)^2 s), s = sqrt(b^2 + r^2), and rho(0) = "
          "3M/(16 pi b^3) (Henon 1959, Binney & Tremaine 2008 §2.2.2d, from memory)",
          "[components]") {
  const auto [m, b] = GENERATE(std::pair{1e10, 0.3}, std::pair{1e11, 2.5}, std::pair{1e12, 10.0});
  const ComponentShape s = Isochrone::make(m, b);
  for (double R : radii) {
    const double sq = std::sqrt(b * b + R * R);
    CHECK(vc2(s, R) == Approx(G * m * R * R / ((b + sq) * (b + sq) * sq)).epsilon(1e-13));
  }
  CHECK(rho(s, {0, 0, 0}) == Approx(3 * m / (16 * pi * b * b * b)).epsilon(1e-13));
  CHECK(phi(s, {0, 0, 0}) == Approx(-G * m / (2 * b)).epsilon(1e-14));
  CHECK(enclosed(s, 1e7 * b) == Approx(m).epsilon(1e-6));
}

TEST_CASE("NFW: rho(r_s) = rho_s / 4 and v_c^2 = (4 pi G rho_s r_s^3 / r) [ln(1+x) - x/(1+x)] "
          "(Navarro, Frenk & White 1996, ApJ 462, 563, from memory)",
          "[components]") {
  const auto [rho_s, rs] = GENERATE(std::pair{1e7, 16.0}, std::pair{3e8, 0.8});
  const ComponentShape s = Nfw::make(rho_s, rs);
  CHECK(rho(s, {rs, 0, 0}) == Approx(rho_s / 4).epsilon(1e-13));
  CHECK(rho(s, {0, 0, 0.1 * rs}) == Approx(rho_s / (0.1 * 1.1 * 1.1)).epsilon(1e-13));
  for (double R : radii) {
    const double x = R / rs;
    const double m = 4 * pi * rho_s * rs * rs * rs * (std::log1p(x) - x / (1 + x));
    CHECK(vc2(s, R) == Approx(G * m / R).epsilon(1e-12));
    CHECK(enclosed(s, R) == Approx(m).epsilon(1e-12));
  }
}

TEST_CASE("NFW make_virial: M(r_vir = c r_s) = M_vir and the mean density inside r_vir is "
          "overdensity x rho_crit, rho_crit = 3 H0^2 / (8 pi G) (common practice)",
          "[components]") {
  struct V {
    double m, c, delta, h;
  };
  const V v = GENERATE(V{1e12, 10, 200, 70}, V{1e11, 15, 100, 67.7}, V{2e12, 6.5, 200, 100},
                       V{1e10, 20, 337, 50});
  const auto n = Nfw::make_virial(v.m, v.c, v.delta, v.h);
  const double h0 = v.h / 1000; // km/s/kpc
  const double rho_crit = 3 * h0 * h0 / (8 * pi * G);
  const double rvir = v.c * n.rs;
  CHECK(n.enclosed_mass(rvir) == Approx(v.m).epsilon(1e-12));
  CHECK(v.m / (4.0 / 3.0 * pi * rvir * rvir * rvir) == Approx(v.delta * rho_crit).epsilon(1e-12));
  // Gauss's theorem at r_vir
  double ax = 0, ay = 0, az = 0;
  n.add_accel(0.0, rvir, 0.0, ax, ay, az);
  CHECK(rvir * rvir * std::fabs(ay) / G == Approx(v.m).epsilon(1e-12));
}

TEST_CASE("Critical density: 3 H0^2 / (8 pi G) = 277.5366 h^2 Msun/kpc^3 (PDG value "
          "2.775366e11 h^2 Msun/Mpc^3, from memory)",
          "[components]") {
  // A Nfw halo built with H0 = 100 km/s/Mpc: M_vir = (4/3) pi r_vir^3 * Delta * rho_crit.
  const auto n = Nfw::make_virial(1e12, 10, 200, 100);
  const double rvir = 10 * n.rs;
  const double rho_crit = 1e12 / (4.0 / 3.0 * pi * rvir * rvir * rvir * 200);
  CHECK(rho_crit == Approx(277.5366).epsilon(1e-6));
  // and r_200 of a 1e12 Msun halo for h = 0.7 is 206.3 kpc (common practice)
  const auto mw = Nfw::make_virial(1e12, 10, 200, 70);
  CHECK(10 * mw.rs == Approx(206.3).epsilon(5e-4));
}

TEST_CASE("Miyamoto-Nagai: midplane v_c^2 = G M R^2 / (R^2 + (a+b)^2)^(3/2) (Miyamoto & Nagai "
          "1975, PASJ 27, 533, Binney & Tremaine 2008 §2.3.1, from memory)",
          "[components]") {
  const auto [m, a, b] = GENERATE(std::tuple{6.8e10, 3.0, 0.28}, std::tuple{5e10, 6.5, 0.26},
                                  std::tuple{1e11, 15.0, 3.0}, std::tuple{2e10, 0.0, 1.0});
  const ComponentShape s = MiyamotoNagai::make(m, a, b);
  for (double R : radii) {
    const double ab = a + b;
    CHECK(vc2(s, R) == Approx(G * m * R * R / std::pow(R * R + ab * ab, 1.5)).epsilon(1e-13));
    // no vertical force in the midplane (reflection symmetry z -> -z)
    const V3 acc = accel(s, {R, 0.0, 0.0});
    CHECK(acc[2] == 0.0);
  }
  // vertical force points to the plane
  CHECK(accel(s, {8.0, 0.0, 0.5})[2] < 0);
  CHECK(accel(s, {8.0, 0.0, -0.5})[2] > 0);
}

TEST_CASE("Miyamoto-Nagai with a = 0 is a Plummer sphere of scale b (Miyamoto & Nagai 1975)",
          "[components]") {
  const ComponentShape mn = MiyamotoNagai::make(3e10, 0.0, 1.7);
  const ComponentShape pl = Plummer::make(3e10, 1.7);
  for (const V3& p : test_points(0x5eed0004, 30)) {
    CHECK(phi(mn, p) == Approx(phi(pl, p)).epsilon(1e-14));
    CHECK(rho(mn, p) == Approx(rho(pl, p)).epsilon(1e-13));
    const V3 a1 = accel(mn, p), a2 = accel(pl, p);
    for (int k = 0; k < 3; ++k)
      CHECK(a1[k] == Approx(a2[k]).epsilon(1e-13).margin(1e-13 * norm(a2)));
  }
}

TEST_CASE("Miyamoto-Nagai: total mass from Gauss's theorem at large r and from the volume "
          "integral of rho (Gauss's theorem, Miyamoto & Nagai 1975)",
          "[components]") {
  const auto [m, a_, b_] = GENERATE(std::tuple{6.8e10, 3.0, 0.28}, std::tuple{1e11, 15.0, 3.0});
  const double a = a_, b = b_; // lambdas capture variables, not structured bindings (clang 14)
  const auto mn = MiyamotoNagai::make(m, a, b);
  CHECK(mn.total_mass() == Approx(m).epsilon(1e-14));
  // r^2 |a| / G -> M: the correction is of order (a + b) / r
  for (const V3& dir : {V3{1, 0, 0}, V3{0, 0, 1}, V3{0.6, 0, 0.8}}) {
    const double r = 1e10;
    const ComponentShape s = mn;
    const double am = norm(accel(s, {dir[0] * r, dir[1] * r, dir[2] * r}));
    CHECK(r * r * am / G == Approx(m).epsilon(1e-8));
  }
  // M = int 2 pi R dR int dz rho, in ln R and ln z (the density is even in z)
  const auto inner = [&](double R) {
    return 2 * quad(
                   [&](double t) {
                     const double z = std::exp(t);
                     return z * mn.density(R, 0.0, z);
                   },
                   std::log(1e-9 * b), std::log(1e9 * (a + b)), 1e-10, 8);
  };
  const double total = quad(
      [&](double u) {
        const double R = std::exp(u);
        return 2 * pi * R * R * inner(R);
      },
      std::log(1e-9 * b), std::log(1e9 * (a + b)), 1e-9, 8);
  CHECK(total == Approx(m).epsilon(1e-6));
}

TEST_CASE("Logarithmic, q = 1 and R_c = 0: v_c = v0 at every R (Binney & Tremaine 2008 §2.3.2)",
          "[components]") {
  const double v0 = GENERATE(180.0, 220.0, 240.0);
  const ComponentShape s = Logarithmic::make(v0, 0.0, 1.0);
  for (double R : {0.01, 0.1, 1.0, 8.0, 30.0, 1000.0}) {
    CHECK(std::sqrt(vc2(s, R)) == Approx(v0).epsilon(1e-13));
  }
  // a flat rotation curve: Phi(r2) - Phi(r1) = v0^2 ln(r2/r1)
  CHECK(phi(s, {0.0, 20.0, 0.0}) - phi(s, {0.0, 2.0, 0.0}) ==
        Approx(v0 * v0 * std::log(10.0)).epsilon(1e-13));
}

TEST_CASE("Logarithmic: midplane v_c^2 = v0^2 R^2 / (R_c^2 + R^2) for any q (Binney & Tremaine "
          "2008 §2.3.2, eq. 2.71, from memory)",
          "[components]") {
  const auto [v0, rc, q] = GENERATE(std::tuple{200.0, 1.0, 0.8}, std::tuple{180.0, 12.0, 1.25},
                                    std::tuple{240.0, 0.5, 0.75});
  const ComponentShape s = Logarithmic::make(v0, rc, q);
  for (double R : radii)
    CHECK(vc2(s, R) == Approx(v0 * v0 * R * R / (rc * rc + R * R)).epsilon(1e-13));
  // central density v0^2 (2 q^2 + 1) / (4 pi G q^2 R_c^2) (B&T 2008 eq. 2.71b at the centre)
  CHECK(rho(s, {0, 0, 0}) ==
        Approx(v0 * v0 * (2 * q * q + 1) / (4 * pi * G * q * q * rc * rc)).epsilon(1e-13));
}

TEST_CASE(
    "Burkert: rho(0) = rho0, rho(r0) = rho0/4 and M(r) = 2 pi rho0 r0^3 [ln(1+x) + "
    "ln(1+x^2)/2 - atan x] equal to the integral of its density (Burkert 1995, ApJL 447, L25, "
    "from memory, Gauss-Kronrod quadrature)",
    "[components]") {
  const auto [rho0, r0] = GENERATE(std::pair{3e8, 0.5}, std::pair{5e7, 3.0}, std::pair{1e7, 12.0});
  const auto k = Burkert::make(rho0, r0);
  const ComponentShape s = k;
  CHECK(k.density(0, 0, 0) == Approx(rho0).epsilon(1e-14));
  CHECK(k.density(0, r0, 0) == Approx(rho0 / 4).epsilon(1e-14));
  for (double r : {0.05, 0.3, 1.0, 3.0, 10.0, 30.0, 300.0}) {
    const double x = r / r0;
    const double closed =
        2 * pi * rho0 * r0 * r0 * r0 * (std::log1p(x) + 0.5 * std::log1p(x * x) - std::atan(x));
    INFO("r = " << r);
    CHECK(k.enclosed_mass(r) == Approx(closed).epsilon(1e-12));
    CHECK(k.enclosed_mass(r) == Approx(mass_by_quadrature(s, r)).epsilon(1e-10));
  }
}

TEST_CASE("Power law with cut-off: total_mass() = enclosed_mass(r -> inf) = integral of rho, and "
          "rho(r1) = rho1 exp(-(r1/rc)^2) (definition in tapered_cusp.hpp, Gauss-Kronrod "
          "quadrature)",
          "[components]") {
  const auto [rho1, r1, alpha, rc] =
      GENERATE(std::tuple{1e9, 1.0, 1.8, 1.9}, std::tuple{2e8, 1.0, 0.0, 5.0},
               std::tuple{5e8, 2.0, 1.0, 3.0}, std::tuple{1e10, 0.5, 1.99, 0.8});
  const auto k = TaperedCusp::make(rho1, r1, alpha, rc);
  const ComponentShape s = k;
  CHECK(k.density(r1, 0, 0) == Approx(rho1 * std::exp(-(r1 / rc) * (r1 / rc))).epsilon(1e-14));
  CHECK(k.enclosed_mass(20 * rc) == Approx(k.total_mass()).epsilon(1e-14));
  CHECK(k.enclosed_mass(1e3 * rc) == Approx(k.total_mass()).epsilon(1e-14));
  CHECK(mass_by_quadrature(s, 30 * rc) == Approx(k.total_mass()).epsilon(1e-10));
  // alpha = 0: a Gaussian sphere of total mass pi^(3/2) rho1 rc^3 (Gaussian integral)
  if (alpha == 0.0)
    CHECK(k.total_mass() == Approx(std::pow(pi, 1.5) * rho1 * rc * rc * rc).epsilon(1e-13));
  // alpha = 1: M(r) = 2 pi rho1 r1 rc^2 (1 - exp(-(r/rc)^2)) (elementary integral)
  if (alpha == 1.0)
    for (double r : radii)
      CHECK(
          k.enclosed_mass(r) ==
          Approx(2 * pi * rho1 * r1 * rc * rc * -std::expm1(-(r / rc) * (r / rc))).epsilon(1e-12));
}

TEST_CASE("Allen-Santillan halo: beyond the cut it is a point mass M(cut), and Phi and the force "
          "are continuous at the cut (Allen & Santillan 1991, RMxAA 22, 255)",
          "[components]") {
  const auto [m, a, g, cut] =
      GENERATE(std::tuple{1e11, 12.0, 2.02, 100.0}, std::tuple{8e10, 3.0, 1.5, 15.0},
               std::tuple{2e11, 20.0, 2.5, 200.0});
  const auto k = AllenSantillanHalo::make(m, a, g, cut);
  const ComponentShape s = k;
  const double y = cut / a;
  const double mcut = m * std::pow(y, g) / (1 + std::pow(y, g - 1)); // header eq. for M(r)
  CHECK(k.enclosed_mass(cut) == Approx(mcut).epsilon(1e-13));
  for (double r : {1.0001 * cut, 1.5 * cut, 10 * cut, 1e4 * cut}) {
    INFO("r = " << r);
    CHECK(k.enclosed_mass(r) == Approx(mcut).epsilon(1e-13));
    CHECK(k.density(0, r, 0) == 0.0);
    CHECK(phi(s, {0.0, 0.0, r}) == Approx(-G * mcut / r).epsilon(1e-13));
    CHECK(r * r * norm(accel(s, {r, 0.0, 0.0})) / G == Approx(mcut).epsilon(1e-13));
  }
  const double eps = 1e-9;
  const V3 in{0.0, cut * (1 - eps), 0.0}, out{0.0, cut * (1 + eps), 0.0};
  CHECK(phi(s, in) == Approx(phi(s, out)).epsilon(1e-8));
  CHECK(accel(s, in)[1] == Approx(accel(s, out)[1]).epsilon(1e-7));
  // just inside the cut the potential is -G M(cut)/cut (the integral over [r, cut] vanishes)
  CHECK(phi(s, {cut, 0.0, 0.0}) == Approx(-G * mcut / cut).epsilon(1e-13));
  // M(r) for r < cut follows the closed form
  for (double r : radii) {
    if (r >= cut) continue;
    const double yr = r / a;
    CHECK(k.enclosed_mass(r) ==
          Approx(m * std::pow(yr, g) / (1 + std::pow(yr, g - 1))).epsilon(1e-13));
  }
}

// =============================================================================================
// 5. Parameter validation.

namespace {
const auto bad_positive = {0.0, -1.0, -1e-300, kNaN, kInf, -kInf};
const auto bad_non_negative = {-1.0, -1e-300, kNaN, kInf, -kInf};
} // namespace

TEST_CASE("Validation: zero, negative, NaN and infinite masses and scales throw ParameterError "
          "naming the key (common practice)",
          "[components]") {
  for (double bad : bad_positive) {
    INFO("bad value " << bad);
    CHECK(thrown_key([&] { (void)PointMass::make(bad); }) == "mass_msun");
    CHECK(thrown_key([&] { (void)Plummer::make(bad, 1.0); }) == "mass_msun");
    CHECK(thrown_key([&] { (void)Plummer::make(1e10, bad); }) == "scale_kpc");
    CHECK(thrown_key([&] { (void)Hernquist::make(bad, 1.0); }) == "mass_msun");
    CHECK(thrown_key([&] { (void)Hernquist::make(1e10, bad); }) == "scale_kpc");
    CHECK(thrown_key([&] { (void)Isochrone::make(bad, 1.0); }) == "mass_msun");
    CHECK(thrown_key([&] { (void)Isochrone::make(1e10, bad); }) == "scale_kpc");
    CHECK(thrown_key([&] { (void)MiyamotoNagai::make(bad, 3.0, 0.3); }) == "mass_msun");
    CHECK(thrown_key([&] { (void)MiyamotoNagai::make(1e10, 3.0, bad); }) == "vertical_scale_kpc");
    CHECK(thrown_key([&] { (void)Nfw::make(bad, 16.0); }) == "density_msun_kpc3");
    CHECK(thrown_key([&] { (void)Nfw::make(1e7, bad); }) == "scale_kpc");
    CHECK(thrown_key([&] { (void)Nfw::make_virial(bad, 10, 200, 70); }) == "virial_mass_msun");
    CHECK(thrown_key([&] { (void)Nfw::make_virial(1e12, bad, 200, 70); }) == "concentration");
    CHECK(thrown_key([&] { (void)Nfw::make_virial(1e12, 10, bad, 70); }) == "overdensity");
    CHECK(thrown_key([&] { (void)Nfw::make_virial(1e12, 10, 200, bad); }) == "hubble_kms_mpc");
    CHECK(thrown_key([&] { (void)Logarithmic::make(bad, 1.0, 0.9); }) == "speed_kms");
    CHECK(thrown_key([&] { (void)Logarithmic::make(220, 1.0, bad); }) == "flattening");
    CHECK(thrown_key([&] { (void)Burkert::make(bad, 3.0); }) == "density_msun_kpc3");
    CHECK(thrown_key([&] { (void)Burkert::make(5e7, bad); }) == "core_kpc");
    CHECK(thrown_key([&] { (void)TaperedCusp::make(bad, 1, 1.8, 1.9); }) == "density_msun_kpc3");
    CHECK(thrown_key([&] { (void)TaperedCusp::make(1e9, bad, 1.8, 1.9); }) ==
          "reference_radius_kpc");
    CHECK(thrown_key([&] { (void)TaperedCusp::make(1e9, 1, 1.8, bad); }) == "cutoff_kpc");
    CHECK(thrown_key([&] { (void)AllenSantillanHalo::make(bad, 12, 2.02, 100); }) == "mass_msun");
    CHECK(thrown_key([&] { (void)AllenSantillanHalo::make(1e11, bad, 2.02, 100); }) == "scale_kpc");
    CHECK(thrown_key([&] { (void)AllenSantillanHalo::make(1e11, 12, bad, 100); }) == "exponent");
    CHECK(thrown_key([&] { (void)AllenSantillanHalo::make(1e11, 12, 2.02, bad); }) == "cutoff_kpc");
  }
}

// Miyamoto & Nagai (1975): a = 0 is Plummer's sphere; Binney & Tremaine (2008) §2.3.2: R_c = 0
// is the scale-free logarithmic potential; alpha = 0 is a Gaussian sphere.
TEST_CASE("Validation: Miyamoto-Nagai a, logarithmic core and power-law slope accept 0 and reject "
          "negative, NaN and infinite values (Miyamoto & Nagai 1975, Binney & Tremaine 2008)",
          "[components]") {
  CHECK_NOTHROW((void)MiyamotoNagai::make(1e10, 0.0, 0.3));
  CHECK_NOTHROW((void)Logarithmic::make(220, 0.0, 1.0));
  CHECK_NOTHROW((void)TaperedCusp::make(1e9, 1, 0.0, 1.9));
  for (double bad : bad_non_negative) {
    INFO("bad value " << bad);
    CHECK(thrown_key([&] { (void)MiyamotoNagai::make(1e10, bad, 0.3); }) == "radial_scale_kpc");
    CHECK(thrown_key([&] { (void)Logarithmic::make(220, bad, 1.0); }) == "core_kpc");
    CHECK(thrown_key([&] { (void)TaperedCusp::make(1e9, 1, bad, 1.9); }) == "slope");
  }
}

TEST_CASE("Validation: logarithmic flattening below 1/sqrt(2) throws, since the density turns "
          "negative on the z axis (Binney & Tremaine 2008 §2.3.2)",
          "[components]") {
  for (double q : {0.7071, 0.7, 0.5, 0.1})
    CHECK(thrown_key([&] { (void)Logarithmic::make(220, 1.0, q); }) == "flattening");
  for (double q : {0.7072, 0.75, 1.0, 1.5})
    CHECK_NOTHROW((void)Logarithmic::make(220, 1.0, q));
  // every accepted q gives a non-negative density, also on the z axis with R_c = 0, where the
  // density is proportional to 2 - 1/q^2
  for (double q : {0.7072, 0.75, 1.0, 1.5, 1 / std::sqrt(2.0)}) {
    INFO("q = " << q);
    const auto k = Logarithmic::make(220, 0.0, q);
    CHECK(k.density(0.0, 0.0, 5.0) >= 0.0);
    CHECK(k.density(0.0, 0.0, 0.3) >= 0.0);
  }
}

TEST_CASE("Validation: power-law slope alpha >= 2 throws (the mass inside any r diverges, "
          "definition of M(r))",
          "[components]") {
  for (double alpha : {2.0, 2.5, 3.0, 10.0})
    CHECK(thrown_key([&] { (void)TaperedCusp::make(1e9, 1, alpha, 1.9); }) == "slope");
  for (double alpha : {0.0, 1.0, 1.8, 1.999})
    CHECK_NOTHROW((void)TaperedCusp::make(1e9, 1, alpha, 1.9));
}

TEST_CASE("Validation: Allen-Santillan exponent outside (1, 3) throws (M(r) ~ r^gamma at small r "
          "and ~ r at large r need 1 < gamma < 3, Allen & Santillan 1991)",
          "[components]") {
  for (double g : {0.5, 1.0, 3.0, 4.0})
    CHECK(thrown_key([&] { (void)AllenSantillanHalo::make(1e11, 12, g, 100); }) == "exponent");
  for (double g : {1.01, 2.02, 2.99})
    CHECK_NOTHROW((void)AllenSantillanHalo::make(1e11, 12, g, 100));
}

// =============================================================================================
// 6. Mass scaling.

TEST_CASE("scale_mass(s) multiplies potential, force and density by s (linearity of Poisson's "
          "equation)",
          "[components]") {
  const double factor = GENERATE(2.5, 0.37);
  for (const Case& c : all_cases()) {
    DYNAMIC_SECTION(c.name << " x " << factor) {
      ComponentShape scaled = c.shape;
      std::visit([&](auto& k) { k.scale_mass(factor); }, scaled);
      for (const V3& p : test_points(0x5eed0005, 20)) {
        CHECK(phi(scaled, p) == Approx(factor * phi(c.shape, p)).epsilon(1e-13));
        CHECK(rho(scaled, p) == Approx(factor * rho(c.shape, p)).epsilon(1e-13));
        const V3 a0 = accel(c.shape, p), a1 = accel(scaled, p);
        for (int k = 0; k < 3; ++k)
          CHECK(a1[k] == Approx(factor * a0[k]).epsilon(1e-13).margin(1e-15 * norm(a0)));
      }
      if (spherical(c.shape))
        CHECK(enclosed(scaled, 7.0) == Approx(factor * enclosed(c.shape, 7.0)).epsilon(1e-13));
    }
  }
}

// Pointwise evaluation of a model (scalar libm) and its densities.
#include "undertow/potential/model.hpp"

#include <stdexcept>
#include <type_traits>

#include "undertow/detail/hyperdual.hpp"
#include "undertow/error.hpp"

namespace undertow::potential {
namespace {

template <class S> double shape_density(const S& s, const typename S::At& w, const Vec3& r) {
  if constexpr (requires { s.density(w, r[0], r[1], r[2]); }) {
    return s.density(w, r[0], r[1], r[2]);
  } else {
    // No closed form written out: the exact Laplacian of the potential by hyper-dual numbers.
    const auto f = [&](const auto& x, const auto& y, const auto& z) {
      return s.potential_t(w, x, y, z);
    };
    return detail::laplacian(f, r[0], r[1], r[2]) / (4 * units::pi * units::G);
  }
}

void add_spiral_pointwise(const LogSpiral& s, const LogSpiral::At& w, const Vec3& r, Vec3& a) {
  switch (s.m) {
  case 1:
    return s.add_accel_m<1>(w, r[0], r[1], r[2], a[0], a[1], a[2]);
  case 2:
    return s.add_accel_m<2>(w, r[0], r[1], r[2], a[0], a[1], a[2]);
  case 3:
    return s.add_accel_m<3>(w, r[0], r[1], r[2], a[0], a[1], a[2]);
  case 4:
    return s.add_accel_m<4>(w, r[0], r[1], r[2], a[0], a[1], a[2]);
  case 5:
    return s.add_accel_m<5>(w, r[0], r[1], r[2], a[0], a[1], a[2]);
  case 6:
    return s.add_accel_m<6>(w, r[0], r[1], r[2], a[0], a[1], a[2]);
  case 8:
    return s.add_accel_m<8>(w, r[0], r[1], r[2], a[0], a[1], a[2]);
  default:
    return s.add_accel(w, r[0], r[1], r[2], a[0], a[1], a[2]);
  }
}

} // namespace

Vec3 Model::component_acceleration(std::size_t i, const Vec3& r) const {
  Vec3 a{0, 0, 0};
  std::visit([&](const auto& c) { c.add_accel(r[0], r[1], r[2], a[0], a[1], a[2]); },
             components.at(i).shape);
  return a;
}
double Model::component_potential(std::size_t i, const Vec3& r) const {
  return std::visit([&](const auto& c) { return c.potential(r[0], r[1], r[2]); },
                    components.at(i).shape);
}
double Model::component_density(std::size_t i, const Vec3& r) const {
  return std::visit([&](const auto& c) { return c.density(r[0], r[1], r[2]); },
                    components.at(i).shape);
}

Vec3 Model::pattern_acceleration(std::size_t i, const Vec3& r, double t_myr) const {
  const Pattern& p = patterns.at(i);
  Vec3 a{0, 0, 0};
  const double g = p.growth.factor(t_myr);
  if (g == 0) return a;
  const double ang = p.angle_at(t_myr);
  std::visit(
      [&](const auto& s) {
        using S = std::decay_t<decltype(s)>;
        if constexpr (std::is_same_v<S, LogSpiral>) {
          if (s.m <= 8 && s.m != 7) return add_spiral_pointwise(s, s.at(g, ang), r, a);
        }
        s.add_accel(s.at(g, ang), r[0], r[1], r[2], a[0], a[1], a[2]);
      },
      p.shape);
  return a;
}
double Model::pattern_potential(std::size_t i, const Vec3& r, double t_myr) const {
  const Pattern& p = patterns.at(i);
  const double g = p.growth.factor(t_myr);
  if (g == 0) return 0;
  const double ang = p.angle_at(t_myr);
  return std::visit([&](const auto& s) { return s.potential(s.at(g, ang), r[0], r[1], r[2]); },
                    p.shape);
}
double Model::pattern_density(std::size_t i, const Vec3& r, double t_myr) const {
  const Pattern& p = patterns.at(i);
  const double g = p.growth.factor(t_myr);
  if (g == 0) return 0;
  const double ang = p.angle_at(t_myr);
  return std::visit([&](const auto& s) { return shape_density(s, s.at(g, ang), r); }, p.shape);
}

Vec3 Model::axisymmetric_acceleration(const Vec3& r) const {
  Vec3 a{0, 0, 0};
  for (const auto& c : components)
    std::visit([&](const auto& s) { s.add_accel(r[0], r[1], r[2], a[0], a[1], a[2]); }, c.shape);
  return a;
}
double Model::axisymmetric_potential(const Vec3& r) const {
  double phi = 0;
  for (const auto& c : components)
    phi += std::visit([&](const auto& s) { return s.potential(r[0], r[1], r[2]); }, c.shape);
  return phi;
}
double Model::axisymmetric_density(const Vec3& r) const {
  double rho = 0;
  for (std::size_t i = 0; i < components.size(); ++i)
    rho += component_density(i, r);
  return rho;
}

Vec3 Model::acceleration_pointwise(const Vec3& r, double t_myr) const {
  Vec3 a = axisymmetric_acceleration(r);
  for (std::size_t i = 0; i < patterns.size(); ++i) {
    const Vec3 b = pattern_acceleration(i, r, t_myr);
    a[0] += b[0];
    a[1] += b[1];
    a[2] += b[2];
  }
  return a;
}
double Model::potential_pointwise(const Vec3& r, double t_myr) const {
  double phi = axisymmetric_potential(r);
  for (std::size_t i = 0; i < patterns.size(); ++i)
    phi += pattern_potential(i, r, t_myr);
  return phi;
}
double Model::density(const Vec3& r, double t_myr) const {
  double rho = axisymmetric_density(r);
  for (std::size_t i = 0; i < patterns.size(); ++i)
    rho += pattern_density(i, r, t_myr);
  return rho;
}

bool Model::vanishes_at_infinity() const {
  for (const auto& c : components)
    if (!c.vanishes_at_infinity()) return false;
  return true;
}

std::size_t Model::component_index(const std::string& label) const {
  std::string known;
  for (std::size_t i = 0; i < components.size(); ++i) {
    if (components[i].label == label) return i;
    known += (known.empty() ? "" : ", ") + components[i].label;
  }
  throw InputError("no component labelled '" + label + "' (components: " + known + ")");
}

} // namespace undertow::potential

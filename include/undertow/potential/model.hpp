#pragma once
// A galaxy model: axisymmetric components plus rotating patterns, evaluated in batches over
// structure-of-arrays positions. Positions kpc, time Myr, potential (km/s)^2, acceleration
// (km/s)^2/kpc, density Msun/kpc^3.
#include <array>
#include <cstddef>
#include <span>
#include <string>
#include <vector>

#include "undertow/potential/component.hpp"
#include "undertow/potential/pattern.hpp"

namespace undertow::potential {

using Vec3 = std::array<double, 3>;

class Model {
public:
  std::string name;
  std::string description;
  std::vector<Component> components;
  std::vector<Pattern> patterns;

  // Batched evaluation: every position goes through the same vectorised arithmetic whatever its
  // place in the batch (tails are padded), so a tracer's result does not depend on the batch.
  void accelerations(std::span<const double> x, std::span<const double> y,
                     std::span<const double> z, double t_myr, std::span<double> ax,
                     std::span<double> ay, std::span<double> az) const;
  void potentials(std::span<const double> x, std::span<const double> y, std::span<const double> z,
                  double t_myr, std::span<double> phi) const;

  // One position through the batched path (same bits as in a batch).
  Vec3 acceleration(const Vec3& r, double t_myr) const;
  double potential(const Vec3& r, double t_myr) const;

  // One position at a time with scalar libm: the plain reference path (also used by the
  // dynamics module, where accuracy to the last ulp matters more than speed).
  Vec3 acceleration_pointwise(const Vec3& r, double t_myr) const;
  double potential_pointwise(const Vec3& r, double t_myr) const;
  Vec3 axisymmetric_acceleration(const Vec3& r) const;
  double axisymmetric_potential(const Vec3& r) const;
  // Density of everything, patterns included (Msun/kpc^3).
  double density(const Vec3& r, double t_myr) const;
  double axisymmetric_density(const Vec3& r) const;

  // Per component (index into components), pointwise.
  Vec3 component_acceleration(std::size_t i, const Vec3& r) const;
  double component_potential(std::size_t i, const Vec3& r) const;
  double component_density(std::size_t i, const Vec3& r) const;
  Vec3 pattern_acceleration(std::size_t i, const Vec3& r, double t_myr) const;
  double pattern_potential(std::size_t i, const Vec3& r, double t_myr) const;
  double pattern_density(std::size_t i, const Vec3& r, double t_myr) const;

  bool vanishes_at_infinity() const;
  // Index of the component with this label, or throws InputError naming the known labels.
  std::size_t component_index(const std::string& label) const;
};

// Batch geometry: positions are processed in tiles of this many, padded to a whole number of
// vector blocks.
inline constexpr std::size_t kBlock = 8;
inline constexpr std::size_t kTile = 256;

} // namespace undertow::potential

#pragma once
// Simulated young sources as a field of velocities over the Galactic plane: a k-d tree
// (nanoflann) over their Galactocentric (x, y) finds the sources nearest a point, or those
// within a radius, and gives the sample mean and the matrix of sums of squares of their
// 3-vectors (Galactocentric velocities, or peculiar motions U_s, V_s, W_s). Queries are const
// and thread-safe; ties in distance are broken by index, so results do not depend on threads.
#include <array>
#include <cstddef>
#include <memory>
#include <vector>

namespace undertow::compare {

struct SampleMoments {
  std::size_t k = 0;
  std::array<double, 3> mean{};
  std::array<double, 6> ss{}; // sum of (v - mean)(v - mean)^T: xx, xy, xz, yy, yz, zz
  double radius_kpc = 0;      // distance of the farthest source used
};

class NeighbourField {
public:
  // x, y in kpc; one value per source.
  NeighbourField(std::vector<double> x, std::vector<double> y,
                 std::vector<std::array<double, 3>> values);
  ~NeighbourField();
  NeighbourField(NeighbourField&&) noexcept;
  NeighbourField& operator=(NeighbourField&&) noexcept;

  std::size_t size() const { return x_.size(); }
  // The k nearest sources in the plane (fewer when the field is smaller), nearest first.
  std::vector<std::size_t> nearest(double x, double y, std::size_t k) const;
  // All sources within r (kpc), nearest first.
  std::vector<std::size_t> within(double x, double y, double r) const;
  SampleMoments moments(const std::vector<std::size_t>& chosen, double x, double y) const;
  const std::array<double, 3>& value(std::size_t i) const { return v_[i]; }

private:
  struct Tree;
  std::vector<double> x_, y_;
  std::vector<std::array<double, 3>> v_;
  std::unique_ptr<Tree> tree_;
};

} // namespace undertow::compare

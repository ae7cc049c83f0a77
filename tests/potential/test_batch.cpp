// Batched evaluation: the same bits for a position whatever the batch size or its place in the
// batch, and agreement with the scalar (libm) path to a few ulp (libmvec accuracy).
#include <catch2/catch.hpp>
#include <cmath>
#include <random>
#include <vector>

#include "undertow/potential/model_file.hpp"

using namespace undertow;

namespace {
potential::Model demo() {
  return potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/kestrel.toml");
}
struct Points {
  std::vector<double> x, y, z;
};
Points random_points(std::size_t n, unsigned seed) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(-18, 18), w(-2, 2);
  Points p;
  for (std::size_t i = 0; i < n; ++i) {
    p.x.push_back(u(rng));
    p.y.push_back(u(rng));
    p.z.push_back(w(rng));
  }
  return p;
}
} // namespace

TEST_CASE("Batched accelerations are bit-identical for any batch size and offset "
          "(design.md §6)",
          "[batch]") {
  const auto m = demo();
  const std::size_t n = 1037; // not a multiple of anything
  const Points p = random_points(n, 1);
  const double t = 900;
  std::vector<double> ax(n), ay(n), az(n);
  m.accelerations(p.x, p.y, p.z, t, ax, ay, az);
  for (std::size_t batch : {1u, 3u, 8u, 13u, 256u, 300u}) {
    for (std::size_t start = 0; start < n; start += batch) {
      const std::size_t len = std::min(batch, n - start);
      std::vector<double> bx(len), by(len), bz(len);
      m.accelerations({p.x.data() + start, len}, {p.y.data() + start, len},
                      {p.z.data() + start, len}, t, bx, by, bz);
      for (std::size_t i = 0; i < len; ++i) {
        REQUIRE(bx[i] == ax[start + i]);
        REQUIRE(by[i] == ay[start + i]);
        REQUIRE(bz[i] == az[start + i]);
      }
    }
  }
  for (std::size_t i = 0; i < n; i += 97) {
    const auto a = m.acceleration({p.x[i], p.y[i], p.z[i]}, t);
    CHECK(a[0] == ax[i]);
    CHECK(a[1] == ay[i]);
    CHECK(a[2] == az[i]);
  }
}

TEST_CASE("Batched and scalar (libm) evaluation agree to libmvec accuracy", "[batch]") {
  const auto m = demo();
  const std::size_t n = 500;
  const Points p = random_points(n, 2);
  for (double t : {0.0, 300.0, 2000.0}) {
    std::vector<double> ax(n), ay(n), az(n), phi(n);
    m.accelerations(p.x, p.y, p.z, t, ax, ay, az);
    m.potentials(p.x, p.y, p.z, t, phi);
    for (std::size_t i = 0; i < n; ++i) {
      const auto a = m.acceleration_pointwise({p.x[i], p.y[i], p.z[i]}, t);
      const double scale = std::hypot(a[0], a[1], a[2]);
      CHECK(std::fabs(ax[i] - a[0]) < 1e-13 * scale);
      CHECK(std::fabs(ay[i] - a[1]) < 1e-13 * scale);
      CHECK(std::fabs(az[i] - a[2]) < 1e-13 * scale);
      const double ph = m.potential_pointwise({p.x[i], p.y[i], p.z[i]}, t);
      CHECK(std::fabs(phi[i] - ph) < 1e-13 * std::fabs(ph));
    }
  }
}

TEST_CASE("Batch arrays of different lengths are refused", "[batch]") {
  const auto m = demo();
  std::vector<double> a(4), b(5);
  CHECK_THROWS(m.accelerations(a, a, a, 0, a, a, b));
}

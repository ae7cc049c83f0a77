// Batched evaluation of a model over structure-of-arrays positions.
//
// Each component or pattern is dispatched once per tile; its kernel then runs over blocks of
// kBlock positions in an OpenMP simd loop. The loops are compiled three times (target_clones:
// baseline x86-64, x86-64-v3 with AVX2, x86-64-v4 with AVX-512) and the widest one the CPU
// supports is picked at load time, so one binary runs on any x86-64 node and still uses wide
// vectors. Transcendental calls go to libmvec (see detail/kernel.hpp). Tails are padded to a
// whole block so that no position ever takes a scalar remainder loop with different rounding.
#include <algorithm>
#include <cstring>
#include <type_traits>

#include "undertow/detail/kernel.hpp"
#include "undertow/potential/model.hpp"

namespace undertow::potential {
namespace {

struct Tile {
  const double* __restrict x;
  const double* __restrict y;
  const double* __restrict z;
  double* __restrict ax;
  double* __restrict ay;
  double* __restrict az;
  std::size_t n; // a multiple of kBlock
};

// The pointers are copied into restrict locals (and the parameters copied by value) so that
// the stores cannot alias them and the loops vectorise.
#define UNDERTOW_TILE_LOCALS                                                                       \
  const double* __restrict x = t.x;                                                                \
  const double* __restrict y = t.y;                                                                \
  const double* __restrict z = t.z;                                                                \
  double* __restrict ax = t.ax;                                                                    \
  double* __restrict ay = t.ay;                                                                    \
  double* __restrict az = t.az;                                                                    \
  const std::size_t n = t.n

// The first component assigns (0 + a = a exactly), which saves clearing the outputs.
template <bool Assign, class C> UNDERTOW_CLONES void component_accel(const C c, const Tile t) {
  UNDERTOW_TILE_LOCALS;
  for (std::size_t i = 0; i < n; i += kBlock) {
#pragma omp simd
    for (std::size_t j = i; j < i + kBlock; ++j) {
      if constexpr (Assign) {
        double a = 0, b = 0, d = 0;
        c.add_accel(x[j], y[j], z[j], a, b, d);
        ax[j] = a, ay[j] = b, az[j] = d;
      } else {
        c.add_accel(x[j], y[j], z[j], ax[j], ay[j], az[j]);
      }
    }
  }
}

template <class P>
UNDERTOW_CLONES void pattern_accel(const P p, const typename P::At w, const Tile t) {
  UNDERTOW_TILE_LOCALS;
  for (std::size_t i = 0; i < n; i += kBlock) {
#pragma omp simd
    for (std::size_t j = i; j < i + kBlock; ++j)
      p.add_accel(w, x[j], y[j], z[j], ax[j], ay[j], az[j]);
  }
}

// The logarithmic spiral with its arm number fixed at compile time (no atan2 per position).
template <int M>
UNDERTOW_CLONES void spiral_accel(const LogSpiral p, const LogSpiral::At w, const Tile t) {
  UNDERTOW_TILE_LOCALS;
  for (std::size_t i = 0; i < n; i += kBlock) {
#pragma omp simd
    for (std::size_t j = i; j < i + kBlock; ++j)
      p.template add_accel_m<M>(w, x[j], y[j], z[j], ax[j], ay[j], az[j]);
  }
}

template <class P> void dispatch_pattern_accel(const P& p, const typename P::At& w, const Tile& t) {
  if constexpr (std::is_same_v<P, LogSpiral>) {
    switch (p.m) {
    case 1:
      return spiral_accel<1>(p, w, t);
    case 2:
      return spiral_accel<2>(p, w, t);
    case 3:
      return spiral_accel<3>(p, w, t);
    case 4:
      return spiral_accel<4>(p, w, t);
    case 5:
      return spiral_accel<5>(p, w, t);
    case 6:
      return spiral_accel<6>(p, w, t);
    case 8:
      return spiral_accel<8>(p, w, t);
    default:
      break;
    }
  }
  pattern_accel(p, w, t);
}

template <class C> UNDERTOW_CLONES void component_phi(const C c, const Tile t) {
  UNDERTOW_TILE_LOCALS;
  (void)ay, (void)az;
  for (std::size_t i = 0; i < n; i += kBlock) {
#pragma omp simd
    for (std::size_t j = i; j < i + kBlock; ++j)
      ax[j] += c.potential(x[j], y[j], z[j]);
  }
}

template <class P>
UNDERTOW_CLONES void pattern_phi(const P p, const typename P::At w, const Tile t) {
  UNDERTOW_TILE_LOCALS;
  (void)ay, (void)az;
  for (std::size_t i = 0; i < n; i += kBlock) {
#pragma omp simd
    for (std::size_t j = i; j < i + kBlock; ++j)
      ax[j] += p.potential(w, x[j], y[j], z[j]);
  }
}

void accel_tile(const Model& m, const Tile& t, double t_myr) {
  if (m.components.empty()) {
    std::fill_n(t.ax, t.n, 0.0);
    std::fill_n(t.ay, t.n, 0.0);
    std::fill_n(t.az, t.n, 0.0);
  }
  bool first = true;
  for (const auto& c : m.components) {
    std::visit(
        [&](const auto& s) {
          if (first)
            component_accel<true>(s, t);
          else
            component_accel<false>(s, t);
        },
        c.shape);
    first = false;
  }
  for (const auto& p : m.patterns) {
    const double g = p.growth.factor(t_myr);
    if (g == 0) continue;
    const double a = p.angle_at(t_myr);
    std::visit([&](const auto& s) { dispatch_pattern_accel(s, s.at(g, a), t); }, p.shape);
  }
}

void phi_tile(const Model& m, const Tile& t, double t_myr) {
  std::fill_n(t.ax, t.n, 0.0);
  for (const auto& c : m.components)
    std::visit([&](const auto& s) { component_phi(s, t); }, c.shape);
  for (const auto& p : m.patterns) {
    const double g = p.growth.factor(t_myr);
    if (g == 0) continue;
    const double a = p.angle_at(t_myr);
    std::visit([&](const auto& s) { pattern_phi(s, s.at(g, a), t); }, p.shape);
  }
}

// Runs f over tiles of the input; a tail shorter than a whole block is copied into padded
// buffers (repeating its last position) and copied back.
template <class F>
void over_tiles(std::span<const double> x, std::span<const double> y, std::span<const double> z,
                std::span<double> o1, std::span<double> o2, std::span<double> o3, F&& f) {
  const std::size_t n = x.size();
  const bool three = !o2.empty();
  std::size_t start = 0;
  const std::size_t whole = n - n % kBlock;
  for (; start < whole; start += kTile) {
    const std::size_t len = std::min(kTile, whole - start);
    Tile t{x.data() + start,
           y.data() + start,
           z.data() + start,
           o1.data() + start,
           three ? o2.data() + start : nullptr,
           three ? o3.data() + start : nullptr,
           len};
    f(t);
  }
  if (whole == n) return;
  alignas(64) double bx[kBlock], by[kBlock], bz[kBlock], b1[kBlock], b2[kBlock], b3[kBlock];
  const std::size_t rest = n - whole;
  for (std::size_t j = 0; j < kBlock; ++j) {
    const std::size_t k = whole + std::min(j, rest - 1);
    bx[j] = x[k];
    by[j] = y[k];
    bz[j] = z[k];
  }
  f(Tile{bx, by, bz, b1, three ? b2 : nullptr, three ? b3 : nullptr, kBlock});
  std::copy_n(b1, rest, o1.data() + whole);
  if (three) {
    std::copy_n(b2, rest, o2.data() + whole);
    std::copy_n(b3, rest, o3.data() + whole);
  }
}

void check_sizes(std::size_t n, std::initializer_list<std::size_t> sizes) {
  for (auto s : sizes)
    if (s != n) throw std::invalid_argument("Model: batch arrays differ in length");
}

} // namespace

void Model::accelerations(std::span<const double> x, std::span<const double> y,
                          std::span<const double> z, double t_myr, std::span<double> ax,
                          std::span<double> ay, std::span<double> az) const {
  check_sizes(x.size(), {y.size(), z.size(), ax.size(), ay.size(), az.size()});
  if (x.empty()) return;
  over_tiles(x, y, z, ax, ay, az, [&](const Tile& t) { accel_tile(*this, t, t_myr); });
}

void Model::potentials(std::span<const double> x, std::span<const double> y,
                       std::span<const double> z, double t_myr, std::span<double> phi) const {
  check_sizes(x.size(), {y.size(), z.size(), phi.size()});
  if (x.empty()) return;
  over_tiles(x, y, z, phi, {}, {}, [&](const Tile& t) { phi_tile(*this, t, t_myr); });
}

Vec3 Model::acceleration(const Vec3& r, double t_myr) const {
  double a[3];
  accelerations({&r[0], 1}, {&r[1], 1}, {&r[2], 1}, t_myr, {&a[0], 1}, {&a[1], 1}, {&a[2], 1});
  return {a[0], a[1], a[2]};
}

double Model::potential(const Vec3& r, double t_myr) const {
  double p;
  potentials({&r[0], 1}, {&r[1], 1}, {&r[2], 1}, t_myr, {&p, 1});
  return p;
}

} // namespace undertow::potential

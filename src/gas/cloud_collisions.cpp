#include "undertow/gas/cloud_collisions.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <stdexcept>
#include <tuple>
#include <utility>
#include <vector>

#include <omp.h>

#include "undertow/detail/kernel.hpp"
#include "undertow/units.hpp"

namespace undertow::gas {

void CloudCollisions::validate() const {
  if (!(radius_kpc > 0) || !std::isfinite(radius_kpc))
    throw detail::ParameterError("radius_kpc", "must be positive, got " + detail::num(radius_kpc));
  if (!(normal_restitution >= 0 && normal_restitution <= 1))
    throw detail::ParameterError("normal_restitution",
                                 "must be from 0 to 1, got " + detail::num(normal_restitution));
  if (!(tangential_restitution >= 0 && tangential_restitution <= 1))
    throw detail::ParameterError("tangential_restitution",
                                 "must be from 0 to 1, got " + detail::num(tangential_restitution));
  if (!(extent_kpc > 0))
    throw detail::ParameterError("extent_kpc", "must be positive, got " + detail::num(extent_kpc));
}

namespace {

struct Hit {
  double t;
  std::uint64_t ida, idb;
  std::size_t i, j;
  bool operator<(const Hit& o) const { return std::tie(t, ida, idb) < std::tie(o.t, o.ida, o.idb); }
};

// The first time in [0, dt] at which clouds i and j, moving straight, are 2a apart and
// approaching (already overlapping and approaching: 0); false if none.
bool contact(const orbit::PhaseSpace& p, std::size_t i, std::size_t j, double d2, double dt,
             double& t) {
  const double rx = p.x[j] - p.x[i], ry = p.y[j] - p.y[i], rz = p.z[j] - p.z[i];
  const double ux = p.vx[j] - p.vx[i], uy = p.vy[j] - p.vy[i], uz = p.vz[j] - p.vz[i];
  const double ru = rx * ux + ry * uy + rz * uz;
  if (!(ru < 0)) return false; // not approaching
  const double uu = ux * ux + uy * uy + uz * uz, rr = rx * rx + ry * ry + rz * rz;
  // |r + u t|² = 4a²: the first root t = (-ru - sqrt(ru² - uu (rr - 4a²))) / uu
  const double disc = ru * ru - uu * (rr - d2);
  if (!(disc >= 0)) return false;
  t = rr <= d2 ? 0.0 : (-ru - std::sqrt(disc)) / uu;
  return t <= dt;
}

// Working arrays kept from pass to pass (one set per calling thread): a run calls the search
// every step, and fresh arrays of tens of megabytes would cost page faults and zeroing each time.
struct Scratch {
  std::vector<std::size_t> fast;
  std::vector<std::uint32_t> start, order, col;
  std::vector<double> px, py, pz, s, speed, sample, cx, cy, cz, cs;
  std::vector<std::uint32_t> ring;
  std::vector<char> done;
};

constexpr std::size_t kBlock = 512;
struct Cloud0 {
  const double *x, *y, *z, *vx, *vy, *vz;
};
// col[i] of a cloud that takes no part, and of a fast one
constexpr std::uint32_t kNone = ~std::uint32_t(0), kFast = kNone - 1;
struct Cloud1 {
  double *px, *py, *pz, *w, *speed;
};

// Clouds [b, e): mid-interval position, speed, and speed about the flow (fx, fy) in w.
// Vectorised.
UNDERTOW_CLONES void prepare(const Cloud0 in, const Cloud1 to, const double* __restrict fx,
                             const double* __restrict fy, std::size_t b, std::size_t e, double dt) {
#pragma omp simd
  for (long k = 0; k < long(e - b); ++k) {
    const std::size_t i = b + std::size_t(k);
    const double x = in.x[i], y = in.y[i], z = in.z[i], vx = in.vx[i], vy = in.vy[i], vz = in.vz[i];
    const double wx = vx - fx[k], wy = vy - fy[k];
    const double w = std::sqrt(wx * wx + wy * wy + vz * vz);
    to.w[i] = w;
    to.speed[i] = std::sqrt(vx * vx + vy * vy + vz * vz);
    to.px[i] = x + vx * dt / 2, to.py[i] = y + vy * dt / 2, to.pz[i] = z + vz * dt / 2;
  }
}

} // namespace

CollisionPass collide_pairs(orbit::PhaseSpace& p, const CloudCollisions& c, double dt_myr,
                            const CircularFlow& flow, std::size_t count) {
  c.validate();
  const std::size_t n = std::min(count, p.size());
  CollisionPass out;
  if (n < 2 || !(dt_myr > 0)) return out;
  if (n >= kFast) throw std::length_error("the collision search takes fewer than 2^32 - 2 clouds");
  const double dt = units::myr_to_internal(dt_myr); // kpc per (km/s): distance = v dt
  const double a = c.radius_kpc, d2 = 4 * a * a;

  // The reference flow (see the header), capped where a cusped centre makes it too steep.
  const CircularFlow ref = flow.capped(0.4 / dt);
  thread_local Scratch w;
  // Each cloud's mid-interval position, its speed and its speed about the flow (in s for now);
  // a cloud outside the extent or with a state that is not finite takes no part (s = -1).
  auto &px = w.px, &py = w.py, &pz = w.pz, &s = w.s, &speed = w.speed;
  auto& ring = w.ring; // each cloud's radial bin of the flow's table, for its local bound
  px.resize(n), py.resize(n), pz.resize(n), s.resize(n), speed.resize(n), ring.resize(n);
  std::size_t m = 0;
  double v_max = 0;
  const Cloud0 in{p.x.data(), p.y.data(), p.z.data(), p.vx.data(), p.vy.data(), p.vz.data()};
  const Cloud1 to{px.data(), py.data(), pz.data(), s.data(), speed.data()};
#pragma omp parallel for schedule(static) reduction(+ : m) reduction(max : v_max)
  for (std::size_t b = 0; b < n; b += kBlock) {
    const std::size_t e = std::min(n, b + kBlock);
    double fx[kBlock], fy[kBlock];
    ref.at(in.x + b, in.y + b, e - b, fx, fy, ring.data() + b);
    prepare(in, to, fx, fy, b, e, dt);
    for (std::size_t i = b; i < e; ++i)
      if (std::fabs(p.x[i]) <= c.extent_kpc && std::fabs(p.y[i]) <= c.extent_kpc &&
          std::isfinite(p.x[i] + p.y[i] + p.z[i] + p.vx[i] + p.vy[i] + p.vz[i]))
        ++m, v_max = std::max(v_max, speed[i]);
      else
        s[i] = -1;
  }
  if (m < 2) return out;
  // Two clouds that touch within dt start at most D = 2a + 2 v_max dt apart, so the segment
  // between their starting points lies within D of each: the flow's Lipschitz bound over that
  // reach of a cloud's radius (K_i) holds for every pair it can be part of, and the header's
  // bound with K_i for cloud i's share is at least the bound with the pair's own constant.
  // Where the flow is too steep to help anywhere, no flow: s from the full speed.
  const std::vector<double> lip = ref.lipschitz_within(2 * a + 2 * v_max * dt);
  double k_max = 0;
  for (double k : lip)
    k_max = std::max(k_max, k);
  bool flow_helps = true;
  if (!(k_max * dt / 2 <= 0.25)) {
#pragma omp parallel for schedule(static) reduction(&& : flow_helps)
    for (std::size_t i = 0; i < n; ++i)
      if (s[i] >= 0) flow_helps = flow_helps && lip[ring[i]] * dt / 2 <= 0.25;
  }
#pragma omp parallel for schedule(static)
  for (std::size_t i = 0; i < n; ++i) {
    if (!(s[i] >= 0)) continue;
    const double K = flow_helps ? lip[ring[i]] : 0.0, wv = flow_helps ? s[i] : speed[i];
    const double cm = (dt / 2) / (1 - K * dt / 2), shrink = 1 - K * cm;
    s[i] = (a + cm * wv) / shrink * (1 + 1e-9); // widened by round-off: the exact test decides
  }

  // Cells of side h = twice the largest search radius of all but the fastest clouds (about
  // n_fast_max of them, judged on a regular subsample of at most ~16 384 clouds), and no more
  // (x, y) columns than about 4 per cloud. The cells only set the cost: the search is exact.
  const std::size_t n_fast_max = std::max<std::size_t>(64, m / 1000);
  auto& sample = w.sample;
  sample.clear();
  for (std::size_t stride = std::max<std::size_t>(1, n / 16384); sample.empty(); stride = 1)
    for (std::size_t i = 0; i < n; i += stride)
      if (s[i] >= 0) sample.push_back(s[i]);
  const std::size_t k_fast =
      sample.size() == m ? n_fast_max
                         : std::size_t(double(n_fast_max) * double(sample.size()) / double(m));
  const std::size_t q = sample.size() > k_fast ? sample.size() - k_fast - 1 : 0;
  std::nth_element(sample.begin(), sample.begin() + long(q), sample.end());
  double h = 2 * sample[q];
  double x0, x1, y0, y1;
  for (int tries = 0;; ++tries) { // the slow clouds' box, and at most ~4 columns per cloud in it
    double lx = INFINITY, ly = INFINITY, ux = -INFINITY, uy = -INFINITY;
#pragma omp parallel for schedule(static) reduction(min : lx, ly) reduction(max : ux, uy)
    for (std::size_t i = 0; i < n; ++i)
      if (s[i] >= 0 && 2 * s[i] <= h) {
        lx = std::min(lx, px[i]), ux = std::max(ux, px[i]);
        ly = std::min(ly, py[i]), uy = std::max(uy, py[i]);
      }
    x0 = lx, x1 = ux, y0 = ly, y1 = uy;
    const double h_min = std::sqrt((x1 - x0) * (y1 - y0) / (4 * double(m) + 1024));
    if (h >= h_min || tries == 8) break;
    h = h_min;
  }
  // Column numbers and counts are 32-bit (half the memory traffic of the sort and the sweep):
  // widen the columns until they fit; the search is exact whatever the columns.
  while (double(long((x1 - x0) / h) + 1) * double(long((y1 - y0) / h) + 1) >= double(kFast))
    h *= 2;
  const long nx = long((x1 - x0) / h) + 1, ny = long((y1 - y0) / h) + 1;
  const long ncol = nx * ny;
  // Counting sort of the slow clouds into columns (in index order within a column); the fast
  // ones listed apart (in index order), those taking no part left out.
  auto &col = w.col, &start = w.start, &order = w.order;
  auto& fast = w.fast;
  col.resize(n);
#pragma omp parallel for schedule(static)
  for (std::size_t i = 0; i < n; ++i)
    col[i] = !(s[i] >= 0)   ? kNone
             : 2 * s[i] > h ? kFast
                            : std::uint32_t(long((px[i] - x0) / h) * ny + long((py[i] - y0) / h));
  // In parallel, deterministically: each thread owns a range of columns, counts and places the
  // clouds of its range in index order (so every thread reads all of col), and start[c + 1]
  // serves as column c's fill pointer, which leaves it at the column's end: start[c] is then
  // where column c begins.
  fast.clear();
  start.resize(std::size_t(ncol) + 1);
  start[0] = 0;
  std::vector<std::size_t> before; // slow clouds in the ranges of the threads before
#pragma omp parallel
  {
    const std::size_t nt = std::size_t(omp_get_num_threads()),
                      t = std::size_t(omp_get_thread_num());
    const std::uint32_t lo = std::uint32_t(std::size_t(ncol) * t / nt),
                        hi = std::uint32_t(std::size_t(ncol) * (t + 1) / nt);
#pragma omp single
    before.assign(nt + 1, 0);
    std::uint32_t* __restrict fp = start.data() + 1;
    std::fill(fp + lo, fp + hi, 0u);
    for (std::size_t i = 0; i < n; ++i) {
      const std::uint32_t c2 = col[i];
      if (c2 >= lo && c2 < hi) ++fp[c2];
      if (t == 0 && c2 == kFast) fast.push_back(i);
    }
    std::uint32_t sum = 0;
    for (std::uint32_t c2 = lo; c2 < hi; ++c2)
      sum += std::exchange(fp[c2], sum);
    before[t + 1] = sum;
#pragma omp barrier
#pragma omp single
    {
      for (std::size_t k = 1; k <= nt; ++k)
        before[k] += before[k - 1];
      order.resize(before[nt]);
    }
    const std::uint32_t off = std::uint32_t(before[t]);
    for (std::uint32_t c2 = lo; c2 < hi; ++c2)
      fp[c2] += off;
    for (std::size_t i = 0; i < n; ++i) {
      const std::uint32_t c2 = col[i];
      if (c2 >= lo && c2 < hi) order[fp[c2]++] = std::uint32_t(i);
    }
  }
  const std::size_t ns = start.back();
  // The slow clouds' mid-points and radii in column order, so the sweep reads memory in order.
  auto &cx = w.cx, &cy = w.cy, &cz = w.cz, &cs = w.cs;
  cx.resize(ns), cy.resize(ns), cz.resize(ns), cs.resize(ns);
#pragma omp parallel for schedule(static)
  for (std::size_t e = 0; e < ns; ++e) {
    const std::size_t k = order[e];
    cx[e] = px[k], cy[e] = py[k], cz[e] = pz[k], cs[e] = s[k];
  }

  std::vector<std::vector<Hit>> found;
  std::vector<std::size_t> tested;
#pragma omp parallel
  {
#pragma omp single
    {
      found.resize(std::size_t(omp_get_num_threads()));
      tested.assign(found.size(), 0);
    }
    std::vector<Hit>& mine = found[std::size_t(omp_get_thread_num())];
    std::size_t my_tests = 0;
    // the exact test of clouds i, j
    const auto exact = [&](std::size_t i, std::size_t j) {
      ++my_tests;
      double t;
      if (contact(p, i, j, d2, dt, t))
        mine.push_back({t, std::min(p.id[i], p.id[j]), std::max(p.id[i], p.id[j]), i, j});
    };
    // Slow with slow, each pair met once: cloud e against the clouds after it in its column
    // and the next column (iy + 1), which follow it in memory, and against the three columns
    // (ix + 1, iy - 1 .. iy + 1), which are adjacent in memory too. Columns hold a few clouds,
    // so the ranges are scanned whole.
    const double* __restrict X = cx.data();
    const double* __restrict Y = cy.data();
    const double* __restrict Z = cz.data();
    const double* __restrict S = cs.data();
    const std::uint32_t* __restrict B = start.data();
    const auto scan = [&](std::size_t e, std::size_t f0, std::size_t f1) {
      const double xe = X[e], ye = Y[e], ze = Z[e], se = S[e];
      for (std::size_t f = f0; f < f1; ++f) {
        const double dx = X[f] - xe, dy = Y[f] - ye, dz = Z[f] - ze, reach = se + S[f];
        if (dx * dx + dy * dy + dz * dz <= reach * reach) exact(order[e], order[f]);
      }
    };
#pragma omp for schedule(dynamic, 1)
    for (long ix = 0; ix < nx; ++ix) { // by rows of columns: no division per column
      const bool right = ix + 1 < nx;
      for (long iy = 0; iy < ny; ++iy) {
        const std::size_t c2 = std::size_t(ix * ny + iy), end = B[c2 + 1];
        if (B[c2] == end) continue;
        const std::size_t next = iy + 1 < ny ? B[c2 + 2] : end;
        const std::size_t r0 = right ? B[std::size_t((ix + 1) * ny + std::max(iy - 1, 0L))] : 0,
                          r1 = right ? B[std::size_t((ix + 1) * ny + std::min(iy + 1, ny - 1)) + 1]
                                     : 0;
        for (std::size_t e = B[c2]; e < end; ++e) {
          scan(e, e + 1, next);
          scan(e, r0, r1);
        }
      }
    }
    // Each fast cloud with every slow cloud within its reach, and with the later fast ones.
#pragma omp for schedule(dynamic, 1)
    for (long f = 0; f < long(fast.size()); ++f) {
      const std::size_t u = fast[std::size_t(f)];
      const double reach = s[u] + h / 2;
      const auto near = [&](std::size_t e) {
        const double dx = cx[e] - px[u], dy = cy[e] - py[u], dz = cz[e] - pz[u];
        const double r2 = s[u] + cs[e];
        if (dx * dx + dy * dy + dz * dz <= r2 * r2) exact(u, order[e]);
      };
      const long ax = std::max(0L, long(std::floor((px[u] - reach - x0) / h))),
                 bx = std::min(nx - 1, long(std::floor((px[u] + reach - x0) / h))),
                 ay = std::max(0L, long(std::floor((py[u] - reach - y0) / h))),
                 by = std::min(ny - 1, long(std::floor((py[u] + reach - y0) / h)));
      if (ax <= bx && ay <= by) {
        if (double(bx - ax + 1) * double(by - ay + 1) > double(ns)) {
          for (std::size_t e = 0; e < ns; ++e)
            near(e);
        } else {
          for (long jx = ax; jx <= bx; ++jx)
            for (long jy = ay; jy <= by; ++jy) {
              const std::size_t c3 = std::size_t(jx * ny + jy);
              for (std::size_t e = start[c3]; e < start[c3 + 1]; ++e)
                if (cz[e] >= pz[u] - reach && cz[e] <= pz[u] + reach) near(e);
            }
        }
      }
      for (std::size_t g = std::size_t(f) + 1; g < fast.size(); ++g) {
        const std::size_t v = fast[g];
        const double dx = px[v] - px[u], dy = py[v] - py[u], dz = pz[v] - pz[u];
        const double r2 = s[u] + s[v];
        if (dx * dx + dy * dy + dz * dz <= r2 * r2) exact(u, v);
      }
    }
    tested[std::size_t(omp_get_thread_num())] = my_tests;
  }
  std::vector<Hit> hits;
  for (auto& v : found) {
    hits.insert(hits.end(), v.begin(), v.end());
    v = {};
  }
  for (std::size_t t : tested)
    out.candidate_pairs += t;
  std::sort(hits.begin(), hits.end());
  out.events.reserve(hits.size());

  auto& done = w.done;
  done.assign(n, 0);
  for (const Hit& hit : hits) {
    const std::size_t i = hit.i, j = hit.j;
    const double t = hit.t;
    if (done[i] || done[j]) continue;
    done[i] = done[j] = 1;
    // the line of centres at contact
    const double xi = p.x[i] + p.vx[i] * t, yi = p.y[i] + p.vy[i] * t, zi = p.z[i] + p.vz[i] * t;
    const double xj = p.x[j] + p.vx[j] * t, yj = p.y[j] + p.vy[j] * t, zj = p.z[j] + p.vz[j] * t;
    double nx2 = xj - xi, ny2 = yj - yi, nz2 = zj - zi;
    const double nn = std::sqrt(nx2 * nx2 + ny2 * ny2 + nz2 * nz2);
    if (!(nn > 0)) continue;
    nx2 /= nn, ny2 /= nn, nz2 /= nn;
    const double ux = p.vx[j] - p.vx[i], uy = p.vy[j] - p.vy[i], uz = p.vz[j] - p.vz[i];
    const double un = ux * nx2 + uy * ny2 + uz * nz2;
    const double tx = ux - un * nx2, ty = uy - un * ny2, tz = uz - un * nz2;
    // new relative velocity: -e_n u_n n + e_t u_t
    const double en = c.normal_restitution, et = c.tangential_restitution;
    const double wx = -en * un * nx2 + et * tx, wy = -en * un * ny2 + et * ty,
                 wz = -en * un * nz2 + et * tz;
    const double cx = 0.5 * (p.vx[i] + p.vx[j]), cy = 0.5 * (p.vy[i] + p.vy[j]),
                 cz = 0.5 * (p.vz[i] + p.vz[j]);
    const double before = 0.25 * (ux * ux + uy * uy + uz * uz),
                 after = 0.25 * (wx * wx + wy * wy + wz * wz);
    p.vx[i] = cx - 0.5 * wx, p.vy[i] = cy - 0.5 * wy, p.vz[i] = cz - 0.5 * wz;
    p.vx[j] = cx + 0.5 * wx, p.vy[j] = cy + 0.5 * wy, p.vz[j] = cz + 0.5 * wz;
    ++out.collisions;
    out.energy_lost += before - after; // per unit mass: two clouds, each (1/2)(u/2)²
    CollisionEvent ev;
    ev.id_a = hit.ida, ev.id_b = hit.idb;
    ev.t_myr = units::internal_to_myr(t);
    ev.x = 0.5 * (xi + xj), ev.y = 0.5 * (yi + yj), ev.z = 0.5 * (zi + zj);
    ev.vx = cx, ev.vy = cy, ev.vz = cz;
    ev.approach_kms = -un;
    out.events.push_back(ev);
  }
  return out;
}

} // namespace undertow::gas

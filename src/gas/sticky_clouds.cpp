#include "undertow/gas/sticky_clouds.hpp"

#include <cmath>
#include <cstdint>

#include "undertow/detail/kernel.hpp"
#include "undertow/dynamics/frequencies.hpp"

namespace undertow::gas {

void StickyClouds::validate() const {
  detail::positive(cell_kpc, "cell_kpc");
  detail::positive(interval_myr, "interval_myr");
  detail::positive(extent_kpc, "extent_kpc");
  if (!(restitution >= 0 && restitution <= 1))
    throw detail::ParameterError("restitution",
                                 "must be from 0 to 1, got " + detail::num(restitution));
  if (extent_kpc / cell_kpc > 4000)
    throw detail::ParameterError("cell_kpc", "gives more than 8000 x 8000 cells over extent_kpc");
}

CircularFlow::CircularFlow(const potential::Model& m, double r_max_kpc, double dr_kpc)
    : dr_(dr_kpc) {
  const std::size_t n = std::size_t(std::ceil(r_max_kpc / dr_kpc)) + 2;
  vc_.resize(n);
  vc_[0] = 0;
  for (std::size_t k = 1; k < n; ++k) {
    const double v = dynamics::circular_speed(m, double(k) * dr_kpc);
    vc_[k] = std::isfinite(v) ? v : 0.0; // no circular orbit there: no flow to keep
  }
}

void CircularFlow::at(double x, double y, double& vx, double& vy) const {
  vx = vy = 0;
  if (vc_.empty()) return;
  const double R = std::hypot(x, y);
  if (!(R > 0)) return;
  const double u = R / dr_;
  const std::size_t k = std::size_t(u);
  if (k + 1 >= vc_.size()) return;
  const double f = u - double(k);
  const double vc = vc_[k] * (1 - f) + vc_[k + 1] * f;
  // Clockwise rotation seen from +z: the flow at (x, y) is (v_c / R) (y, -x).
  vx = vc / R * y;
  vy = -vc / R * x;
}

PassSummary collide(orbit::PhaseSpace& p, const CircularFlow& flow, const StickyClouds& s) {
  const std::size_t n = p.size();
  const long nxy = long(std::ceil(2 * s.extent_kpc / s.cell_kpc));
  const long nz = 8;
  struct Sum {
    double wx = 0, wy = 0, wz = 0;
    std::uint32_t count = 0;
  };
  // Buffers reused by every pass of this (calling) thread; only the touched cells are cleared.
  // The OpenMP workers reach them through plain pointers: thread_local names are per thread.
  thread_local std::vector<Sum> grid;
  thread_local std::vector<std::size_t> touched;
  thread_local std::vector<std::int64_t> cell_of;
  thread_local std::vector<double> flow_x, flow_y;
  const std::size_t cells = std::size_t(nxy * nxy * nz);
  if (grid.size() != cells) grid.assign(cells, Sum{});
  touched.clear();
  cell_of.resize(n);
  flow_x.resize(n);
  flow_y.resize(n);
  std::int64_t* cell = cell_of.data();
  double *fx = flow_x.data(), *fy = flow_y.data();

  // Each cloud's cell and circular flow: independent, so in parallel.
#pragma omp parallel for schedule(static)
  for (std::size_t i = 0; i < n; ++i) {
    cell[i] = -1;
    const double ux = (p.x[i] + s.extent_kpc) / s.cell_kpc;
    const double uy = (p.y[i] + s.extent_kpc) / s.cell_kpc;
    const double uz = p.z[i] / s.cell_kpc + double(nz / 2);
    if (!(ux >= 0 && ux < double(nxy) && uy >= 0 && uy < double(nxy) && uz >= 0 && uz < double(nz)))
      continue;
    cell[i] = (std::int64_t(uz) * nxy + std::int64_t(uy)) * nxy + std::int64_t(ux);
    flow.at(p.x[i], p.y[i], fx[i], fy[i]);
  }
  // The cell sums, in id order (serial, so the sums do not depend on the thread count).
  for (std::size_t i = 0; i < n; ++i) {
    if (cell[i] < 0) continue;
    Sum& g = grid[std::size_t(cell[i])];
    if (g.count == 0) touched.push_back(std::size_t(cell[i]));
    g.wx += p.vx[i] - fx[i];
    g.wy += p.vy[i] - fy[i];
    g.wz += p.vz[i];
    ++g.count;
  }
  PassSummary out;
  for (const std::size_t c : touched)
    if (grid[c].count >= 2) {
      ++out.cells;
      out.clouds += grid[c].count;
    }
  const double e = s.restitution;
  double lost = 0;
  const Sum* sums = grid.data(); // the grid is this thread's: the workers must not name it
#pragma omp parallel for schedule(static) reduction(+ : lost)
  for (std::size_t i = 0; i < n; ++i) {
    if (cell[i] < 0) continue;
    const Sum& g = sums[cell[i]];
    if (g.count < 2) continue;
    const double inv = 1.0 / double(g.count);
    const double mx = g.wx * inv, my = g.wy * inv, mz = g.wz * inv;
    const double dx = p.vx[i] - fx[i] - mx, dy = p.vy[i] - fy[i] - my, dz = p.vz[i] - mz;
    p.vx[i] = fx[i] + mx + e * dx;
    p.vy[i] = fy[i] + my + e * dy;
    p.vz[i] = mz + e * dz;
    lost += 0.5 * (1 - e * e) * (dx * dx + dy * dy + dz * dz);
  }
  out.energy_lost = lost;
  for (const std::size_t c : touched)
    grid[c] = Sum{};
  return out;
}

} // namespace undertow::gas

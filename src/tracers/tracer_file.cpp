#include "undertow/tracers/tracer_file.hpp"

#include <cmath>
#include <set>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/io/hdf5.hpp"
#include "undertow/io/input_table.hpp"

namespace undertow::tracers {
namespace {

bool looks_like_hdf5(const std::string& path) {
  return path.size() > 3 && (path.ends_with(".h5") || path.ends_with(".hdf5"));
}

orbit::PhaseSpace read_csv(const std::string& path, double rmax) {
  const auto t = io::InputTable::read_file(path);
  const char* names[] = {"x_kpc", "y_kpc", "z_kpc", "vx_kms", "vy_kms", "vz_kms"};
  const std::size_t cid = t.column("id");
  std::size_t c[6];
  for (int k = 0; k < 6; ++k)
    c[k] = t.column(names[k]);
  orbit::PhaseSpace p;
  p.resize(t.rows());
  std::vector<double>* dst[] = {&p.x, &p.y, &p.z, &p.vx, &p.vy, &p.vz};
  std::set<std::uint64_t> seen;
  for (std::size_t r = 0; r < t.rows(); ++r) {
    p.id[r] = t.whole(r, cid);
    if (!seen.insert(p.id[r]).second) throw InputError(t.place(r, cid), "tracer id used twice");
    for (int k = 0; k < 6; ++k)
      (*dst[k])[r] = t.number(r, c[k]);
    const double rad = std::hypot(p.x[r], p.y[r], p.z[r]);
    if (rad > rmax)
      throw InputError(t.place(r, c[0]), "position " + detail::num(rad) +
                                             " kpc from the centre is "
                                             "outside the model's valid range (max_radius_kpc = " +
                                             detail::num(rmax) + ")");
  }
  return p;
}

orbit::PhaseSpace read_h5(const std::string& path, double rmax) {
  const auto f = io::h5::File::open_read(path);
  std::string group = "/";
  if (io::h5::exists(f, "snapshots")) {
    const auto names = io::h5::children(f, "snapshots");
    if (names.empty()) throw InputError(SourcePlace{path, 0, 0, "snapshots"}, "no snapshots");
    group = "/snapshots/" + names.back();
  }
  const auto g = io::h5::open_group(f, group);
  std::size_t n = 0, nv = 0;
  const auto pos = io::h5::read_doubles(f, g.id(), "position", 3, &n);
  const auto vel = io::h5::read_doubles(f, g.id(), "velocity", 3, &nv);
  const auto id = io::h5::read_u64(f, g.id(), "id");
  if (nv != n || id.size() != n)
    throw InputError(SourcePlace{path, 0, 0, group}, "id, position and velocity differ in length");
  orbit::PhaseSpace p;
  p.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    p.id[i] = id[i];
    p.x[i] = pos[3 * i], p.y[i] = pos[3 * i + 1], p.z[i] = pos[3 * i + 2];
    p.vx[i] = vel[3 * i], p.vy[i] = vel[3 * i + 1], p.vz[i] = vel[3 * i + 2];
    for (double v : {p.x[i], p.y[i], p.z[i], p.vx[i], p.vy[i], p.vz[i]})
      if (!std::isfinite(v))
        throw InputError(SourcePlace{path, 0, 0, group + " row " + std::to_string(i)},
                         "not a finite number");
    if (std::hypot(p.x[i], p.y[i], p.z[i]) > rmax)
      throw InputError(
          SourcePlace{path, 0, 0, group + " row " + std::to_string(i)},
          "position outside the model's valid range (max_radius_kpc = " + detail::num(rmax) + ")");
  }
  return p;
}

} // namespace

orbit::PhaseSpace read_tracer_file(const std::string& path, double max_radius_kpc) {
  return looks_like_hdf5(path) ? read_h5(path, max_radius_kpc) : read_csv(path, max_radius_kpc);
}

} // namespace undertow::tracers

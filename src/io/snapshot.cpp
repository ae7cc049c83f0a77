#include "undertow/io/snapshot.hpp"

#include <chrono>
#include <cmath>
#include <cstdio>
#include <ctime>
#include <filesystem>
#include <unistd.h>

#include "undertow/error.hpp"
#include "undertow/io/creation_time.hpp"
#include "undertow/io/hdf5.hpp"
#include "undertow/io/table.hpp"
#include "undertow/potential/describe.hpp"

namespace undertow::io {
namespace {

namespace fs = std::filesystem;
constexpr std::int64_t kFormatVersion = 1;

void write_tracers(const h5::File& f, hid_t g, const Snapshot& s) {
  const auto& t = s.tracers;
  const std::size_t n = t.size();
  std::vector<double> pos(3 * n), vel(3 * n);
  for (std::size_t i = 0; i < n; ++i) {
    pos[3 * i] = t.x[i], pos[3 * i + 1] = t.y[i], pos[3 * i + 2] = t.z[i];
    vel[3 * i] = t.vx[i], vel[3 * i + 1] = t.vy[i], vel[3 * i + 2] = t.vz[i];
  }
  h5::set_attr(f, g, "time_myr", s.time_myr);
  h5::set_attr(f, g, "frame", s.frame);
  if (s.frame == "rotating")
    h5::set_attr(f, g, "frame_pattern_speed_kms_kpc", s.frame_pattern_speed);
  h5::write_u64(f, g, "id", t.id, "tracer id; the same tracer has the same id in every snapshot");
  h5::write_doubles(f, g, "position", pos, 3, "kpc",
                    "Galactocentric x, y, z (docs/conventions.md)");
  h5::write_doubles(f, g, "velocity", vel, 3, "km/s", "Galactocentric vx, vy, vz");
  h5::write_doubles(f, g, "birth_time", s.birth_time_myr, 1, "Myr", "time the tracer was made");
  h5::write_u32(f, g, "flags", s.flags,
                "bit 0: beyond radius_max_kpc; bit 1: invariant error above 1e-6; bit 2: a star "
                "formed in the run");
  if (!s.birth_position.empty()) {
    h5::write_doubles(f, g, "birth_position", s.birth_position, 3, "kpc",
                      "where the tracer was made: a star's birth collision, a cloud's start");
    h5::write_u64(f, g, "parents", s.parents,
                  "ids of the two clouds whose collision formed the star (clouds: 0, 0)", 2);
    h5::set_attr(f, g, "next_star_id", s.next_star_id);
  }
}

Snapshot read_tracers(const h5::File& f, hid_t g) {
  Snapshot s;
  s.time_myr = h5::get_attr_double(f, g, "time_myr");
  s.frame = h5::get_attr_string(f, g, "frame");
  if (s.frame == "rotating")
    s.frame_pattern_speed = h5::get_attr_double(f, g, "frame_pattern_speed_kms_kpc");
  std::size_t n = 0;
  const auto pos = h5::read_doubles(f, g, "position", 3, &n);
  const auto vel = h5::read_doubles(f, g, "velocity", 3);
  auto& t = s.tracers;
  t.resize(n);
  t.id = h5::read_u64(f, g, "id");
  for (std::size_t i = 0; i < n; ++i) {
    t.x[i] = pos[3 * i], t.y[i] = pos[3 * i + 1], t.z[i] = pos[3 * i + 2];
    t.vx[i] = vel[3 * i], t.vy[i] = vel[3 * i + 1], t.vz[i] = vel[3 * i + 2];
  }
  s.birth_time_myr = h5::read_doubles(f, g, "birth_time", 1);
  s.flags = h5::read_u32(f, g, "flags");
  if (t.id.size() != n || s.birth_time_myr.size() != n || s.flags.size() != n)
    throw InputError(SourcePlace{f.path(), 0, 0, {}}, "snapshot datasets differ in length");
  if (H5Lexists(g, "birth_position", H5P_DEFAULT) > 0) {
    s.birth_position = h5::read_doubles(f, g, "birth_position", 3);
    s.parents = h5::read_u64(f, g, "parents", 2);
    s.next_star_id = std::uint64_t(h5::get_attr_int(f, g, "next_star_id"));
    if (s.birth_position.size() != 3 * n || s.parents.size() != 2 * n)
      throw InputError(SourcePlace{f.path(), 0, 0, {}}, "snapshot datasets differ in length");
  }
  return s;
}

void copy_group_into(const h5::File& dst, hid_t parent, const std::string& name,
                     const Snapshot& s) {
  h5::Handle g(H5Gcreate2(parent, name.c_str(), H5P_DEFAULT, H5P_DEFAULT, H5P_DEFAULT), H5Gclose);
  if (!g) throw InputError(SourcePlace{dst.path(), 0, 0, name}, "cannot create group");
  write_tracers(dst, g.id(), s);
}

} // namespace

Provenance make_provenance(const std::string& text, const std::string& file,
                           const std::string& model_text, std::uint64_t seed) {
  return {UNDERTOW_VERSION,
          UNDERTOW_GIT_REVISION,
          creation_time_utc("%Y-%m-%dT%H:%M:%SZ"),
          text,
          file,
          model_text,
          seed};
}

void write_snapshot_part(const std::string& path, const Snapshot& s) {
  h5::File::write_atomically(path, [&](const h5::File& f) {
    h5::set_attr(f, f.id(), "undertow_part", std::int64_t(1));
    write_tracers(f, f.id(), s);
  });
}

Snapshot read_snapshot_part(const std::string& path) {
  const auto f = h5::File::open_read(path);
  return read_tracers(f, f.id());
}

void assemble(const std::string& out, const Provenance& p, const potential::Model& m,
              const std::string& method, const std::vector<std::string>& parts,
              const Diagnostics& d, const std::function<void(std::size_t, Snapshot&)>& transform) {
  h5::File::write_atomically(out, [&](const h5::File& f) {
    const hid_t root = f.id();
    h5::set_attr(f, root, "undertow_format", std::string("snapshots"));
    h5::set_attr(f, root, "format_version", kFormatVersion);
    h5::set_attr(f, root, "tool_version", p.tool_version);
    h5::set_attr(f, root, "git_revision", p.git_revision);
    h5::set_attr(f, root, "created_utc", p.created_utc);
    h5::set_attr(f, root, "seed", p.seed);
    h5::set_attr(f, root, "scenario", p.scenario_text);
    h5::set_attr(f, root, "scenario_file", p.scenario_file);
    h5::set_attr(f, root, "integration_method", method);
    {
      auto g = h5::create_group(f, "model");
      h5::set_attr(f, g.id(), "name", m.name);
      h5::set_attr(f, g.id(), "description", m.description);
      if (!p.model_text.empty()) h5::set_attr(f, g.id(), "model_file", p.model_text);
      for (std::size_t i = 0; i < m.components.size(); ++i) {
        auto c = h5::create_group(f, "model/component_" + std::to_string(i));
        h5::set_attr(f, c.id(), "label", m.components[i].label);
        h5::set_attr(f, c.id(), "kind", std::string(m.components[i].kind()));
        for (const auto& [k, v] : potential::parameters(m.components[i]))
          h5::set_attr(f, c.id(), k, v);
      }
      for (std::size_t i = 0; i < m.patterns.size(); ++i) {
        auto c = h5::create_group(f, "model/pattern_" + std::to_string(i));
        h5::set_attr(f, c.id(), "label", m.patterns[i].label);
        h5::set_attr(f, c.id(), "kind", std::string(m.patterns[i].kind()));
        for (const auto& [k, v] : potential::parameters(m.patterns[i]))
          h5::set_attr(f, c.id(), k, v);
      }
    }
    {
      auto g = h5::create_group(f, "snapshots");
      for (std::size_t i = 0; i < parts.size(); ++i) {
        char name[32];
        std::snprintf(name, sizeof name, "%04zu", i);
        Snapshot snap = read_snapshot_part(parts[i]);
        if (transform) transform(i, snap);
        copy_group_into(f, g.id(), name, snap);
      }
    }
    {
      auto g = h5::create_group(f, "diagnostics");
      h5::set_attr(f, g.id(), "invariant", d.invariant);
      h5::set_attr(f, g.id(), "note", d.note);
      h5::set_attr(f, g.id(), "median_relative_error", d.median);
      h5::set_attr(f, g.id(), "max_relative_error", d.max);
      h5::write_doubles(
          f, g.id(), "relative_error", d.relative_error, 1, "",
          "|I(end) - I(start)| / |I(start)| of the invariant, per tracer, in snapshot order");
      h5::write_u64(f, g.id(), "worst_ids", d.worst_ids,
                    "ids of the tracers with the largest errors");
      h5::write_doubles(f, g.id(), "worst_errors", d.worst_errors, 1, "", "their relative errors");
    }
    h5::set_attr(f, root, "complete", std::int64_t(1));
  });
}

SnapshotReader::SnapshotReader(const std::string& path) : path_(path) {
  const auto f = h5::File::open_read(path);
  if (!h5::has_attr(f.id(), "undertow_format") ||
      h5::get_attr_string(f, f.id(), "undertow_format") != "snapshots")
    throw InputError(SourcePlace{path, 0, 0, {}}, "not an undertow snapshot file");
  if (!h5::has_attr(f.id(), "complete"))
    throw InputError(SourcePlace{path, 0, 0, {}}, "incomplete snapshot file");
  names_ = h5::children(f, "snapshots");
}

std::vector<double> SnapshotReader::times_myr() const {
  const auto f = h5::File::open_read(path_);
  std::vector<double> t;
  for (const auto& n : names_) {
    const auto g = h5::open_group(f, "snapshots/" + n);
    t.push_back(h5::get_attr_double(f, g.id(), "time_myr"));
  }
  return t;
}

std::optional<std::size_t> SnapshotReader::index_at(std::optional<double> t_myr) const {
  const auto times = times_myr();
  if (times.empty()) return std::nullopt;
  if (!t_myr) return times.size() - 1;
  for (std::size_t i = 0; i < times.size(); ++i)
    if (std::fabs(times[i] - *t_myr) < 1e-9 * (1 + std::fabs(times[i]))) return i;
  return std::nullopt;
}

std::string SnapshotReader::missing_time(double t_myr) const {
  std::string list;
  for (double t : times_myr())
    list += (list.empty() ? "" : ", ") + format_number(t, 6);
  return "no snapshot at " + format_number(t_myr, 6) + " Myr in " + path_ + " (times: " + list +
         ")";
}

Snapshot SnapshotReader::read(std::size_t i) const {
  const auto f = h5::File::open_read(path_);
  const auto g = h5::open_group(f, "snapshots/" + names_.at(i));
  return read_tracers(f, g.id());
}

Provenance SnapshotReader::provenance() const {
  const auto f = h5::File::open_read(path_);
  Provenance p;
  p.tool_version = h5::get_attr_string(f, f.id(), "tool_version");
  p.git_revision = h5::get_attr_string(f, f.id(), "git_revision");
  p.created_utc = h5::get_attr_string(f, f.id(), "created_utc");
  p.scenario_text = h5::get_attr_string(f, f.id(), "scenario");
  p.scenario_file = h5::get_attr_string(f, f.id(), "scenario_file");
  p.seed = std::uint64_t(h5::get_attr_int(f, f.id(), "seed"));
  const auto g = h5::open_group(f, "model");
  if (h5::has_attr(g.id(), "model_file"))
    p.model_text = h5::get_attr_string(f, g.id(), "model_file");
  return p;
}

} // namespace undertow::io

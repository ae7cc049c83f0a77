#pragma once
// Snapshot files: the HDF5 layout of docs/snapshot-format.md. A run writes each snapshot as a
// small part file first (atomically: temporary name, then rename), so an interrupted run leaves
// only whole parts; assemble() then gathers the parts into the final file, again written under a
// temporary name and renamed, so no file that looks complete ever exists before the run is.
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "undertow/orbit/phase_space.hpp"
#include "undertow/potential/model.hpp"

namespace undertow::io {

struct Provenance {
  std::string tool_version, git_revision, created_utc;
  std::string scenario_text, scenario_file, model_text;
  std::uint64_t seed = 0;
};
Provenance make_provenance(const std::string& scenario_text, const std::string& scenario_file,
                           const std::string& model_text, std::uint64_t seed);

struct Snapshot {
  double time_myr = 0;
  std::string frame = "inertial"; // or "rotating"
  double frame_pattern_speed = 0; // km/s/kpc when rotating
  orbit::PhaseSpace tracers;
  std::vector<double> birth_time_myr;
  std::vector<std::uint32_t> flags;
  // Runs with star formation ([gas.stars]) only; empty otherwise.
  std::vector<double> birth_position; // 3 per tracer, kpc (clouds: where they started)
  std::vector<std::uint64_t> parents; // 2 per tracer: the colliding clouds' ids (clouds: 0, 0)
  std::uint64_t next_star_id = 0;     // the id the next star will get
};

// Flag bits per tracer.
inline constexpr std::uint32_t kFlagOutsideRange = 1u << 0; // beyond radius_max_kpc
inline constexpr std::uint32_t kFlagLargeError = 1u << 1;   // invariant error above 1e-6
inline constexpr std::uint32_t kFlagStar = 1u << 2;         // a star formed in the run's gas

void write_snapshot_part(const std::string& path, const Snapshot& s);
Snapshot read_snapshot_part(const std::string& path);

struct Diagnostics {
  std::string invariant;              // "energy", "jacobi" or "none"
  std::string note;                   // why "none"
  std::vector<double> relative_error; // per tracer, final vs initial
  double median = 0, max = 0;
  std::vector<std::uint64_t> worst_ids;
  std::vector<double> worst_errors;
};

// transform(index, snapshot) may change each snapshot before it is written (frame, flags).
void assemble(const std::string& out_path, const Provenance& prov, const potential::Model& m,
              const std::string& method, const std::vector<std::string>& parts,
              const Diagnostics& diag,
              const std::function<void(std::size_t, Snapshot&)>& transform = {});

// Reading a finished file.
class SnapshotReader {
public:
  explicit SnapshotReader(const std::string& path);
  std::size_t count() const { return names_.size(); }
  std::vector<double> times_myr() const;
  // The snapshot at t_myr (equal to 1e-9 relative), or the last one when t_myr is not given;
  // nothing when no snapshot has that time.
  std::optional<std::size_t> index_at(std::optional<double> t_myr) const;
  // "no snapshot at T Myr in FILE (times: ...)", for the error when index_at finds none.
  std::string missing_time(double t_myr) const;
  Snapshot read(std::size_t index) const;
  Provenance provenance() const;
  const std::string& path() const { return path_; }

private:
  std::string path_;
  std::vector<std::string> names_;
};

} // namespace undertow::io

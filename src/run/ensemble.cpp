#include "undertow/run/ensemble.hpp"

#include <chrono>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <iostream>

#include "undertow/error.hpp"
#include "undertow/gas/cloud_gas.hpp"
#include "undertow/gas/gas_orbits.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/orbit/conserved.hpp"
#include "undertow/orbit/frame.hpp"
#include "undertow/tracers/disk_population.hpp"
#include "undertow/tracers/tracer_file.hpp"

namespace undertow::run {
namespace {

namespace fs = std::filesystem;

std::string part_name(const std::string& dir, std::size_t k) {
  char b[32];
  std::snprintf(b, sizeof b, "part_%05zu.h5", k);
  return (fs::path(dir) / b).string();
}

// What identifies a run: the scenario text and the text of its model file.
std::string identity(const scenario::Scenario& s) {
  return s.text + "\n#-- model file --\n" + s.model_text;
}

orbit::PhaseSpace initial_tracers(const scenario::Scenario& s) {
  if (s.tracers.kind == scenario::TracerSource::Kind::file)
    return tracers::read_tracer_file(s.tracers.file, s.max_radius_kpc);
  const auto& d = s.tracers.disk;
  orbit::PhaseSpace p;
  p.resize(d.count);
  const std::uint64_t chunk = 4096;
  const long nc = long((d.count + chunk - 1) / chunk);
#pragma omp parallel for schedule(dynamic, 1)
  for (long c = 0; c < nc; ++c) {
    const std::uint64_t first = std::uint64_t(c) * chunk, n = std::min(chunk, d.count - first);
    p.store_range(tracers::sample(s.model, d, s.seed, first, n), first);
  }
  return p;
}

io::Snapshot snapshot_of(const gas::GasState& state, double t, double rmax, bool star_records) {
  const gas::GasState g = state.in_starting_order();
  io::Snapshot snap;
  const auto& p = g.p;
  snap.time_myr = t;
  snap.tracers = p;
  snap.birth_time_myr = g.birth_time_myr;
  snap.flags.assign(p.size(), 0);
  for (std::size_t i = 0; i < p.size(); ++i) {
    if (std::hypot(p.x[i], p.y[i], p.z[i]) > rmax) snap.flags[i] |= io::kFlagOutsideRange;
    if (i >= g.clouds) snap.flags[i] |= io::kFlagStar;
  }
  if (star_records) {
    snap.birth_position = g.birth_position;
    snap.parents = g.parents;
    snap.next_star_id = g.next_star_id;
  }
  return snap;
}

// The state a part file holds: clouds (or collisionless tracers) first, then stars.
gas::GasState state_of(io::Snapshot snap) {
  gas::GasState g;
  const std::size_t n = snap.tracers.size();
  g.clouds = 0;
  while (g.clouds < n && !(snap.flags[g.clouds] & io::kFlagStar))
    ++g.clouds;
  g.p = std::move(snap.tracers);
  g.birth_time_myr = std::move(snap.birth_time_myr);
  g.birth_position = std::move(snap.birth_position);
  g.parents = std::move(snap.parents);
  g.next_star_id = snap.next_star_id;
  if (g.birth_position.empty()) { // a run without star formation: records as at the start
    g.birth_position.resize(3 * n);
    g.parents.assign(2 * n, 0);
  }
  g.slot.resize(g.clouds);
  for (std::size_t i = 0; i < g.clouds; ++i)
    g.slot[i] = i;
  return g;
}

class Progress {
public:
  Progress(bool on, std::size_t tracers, std::size_t segments)
      : on_(on), n_(tracers), segs_(segments), t0_(clock::now()) {}
  // steps: fixed steps per segment (0 for adaptive methods)
  void update(std::size_t seg, std::size_t done, double ta, double tb, std::size_t steps) {
    if (!on_) return;
    const double el = seconds();
    const double frac = (double(seg) + double(done) / double(n_)) / double(segs_);
    const double left = frac > 0 ? el * (1 - frac) / frac : 0;
    const double orbits = double(seg) * double(n_) + double(done);
    char rate[64] = "";
    if (steps > 0 && el > 0)
      std::snprintf(rate, sizeof rate, ", %.3g million orbit-steps/s",
                    orbits * double(steps) / el / 1e6);
    std::fprintf(stderr, "\r  t %.6g -> %.6g Myr (%zu/%zu): %zu/%zu tracers%s, %.0f s left   ", ta,
                 tb, seg + 1, segs_, done, n_, rate, left);
    std::fflush(stderr);
  }
  void finish() {
    if (on_) std::fprintf(stderr, "\n");
  }
  double seconds() const { return std::chrono::duration<double>(clock::now() - t0_).count(); }

private:
  using clock = std::chrono::steady_clock;
  bool on_;
  std::size_t n_, segs_;
  clock::time_point t0_;
};

std::size_t fixed_steps(const scenario::Scenario& s, double ta, double tb) {
  return orbit::steps_for(ta, tb, s.integration.step_myr);
}

// Advances one segment between output times; with [gas], step by step, each step begun by the
// gas's collisions, stirring and star formation over it.
bool advance_segment(const scenario::Scenario& s, const gas::CircularFlow& flow, gas::GasState& g,
                     double ta, double tb, const orbit::ProgressFn& report,
                     const std::atomic<bool>* stop, EnsembleResult& res) {
  if (!s.gas) return orbit::advance(s.model, g.p, ta, tb, s.integration, report, stop);
  const std::size_t n = fixed_steps(s, ta, tb);
  // Accelerations are carried within a segment and computed afresh at its start, where an
  // interrupted run resumes: the resumed run repeats the same arithmetic.
  g.acc.forget(g.p.size());
  for (std::size_t j = 0; j < n; ++j) {
    gas::StepReport step;
    const bool done = gas::advance_gas_step(s.model, g, *s.gas, flow, s.integration, ta, tb, j, n,
                                            s.seed, step, stop);
    res.collisions += step.collisions;
    res.stars_formed += step.stars_formed;
    if (!done) return false;
    report((j + 1) * g.p.size() / n);
  }
  // gas_step retires old stars in bulk; the snapshot holds those of the last step's start
  if (s.gas->stars && n > 0)
    g.retire_stars(ta + (tb - ta) * double(n - 1) / double(n), s.gas->stars->max_age_myr);
  return true;
}

} // namespace

EnsembleResult run_ensemble(const scenario::Scenario& s, const EnsembleOptions& o) {
  if (o.output.empty()) throw InputError("no output file given");
  io::check_output_file(o.output);           // before the work, not after it
  io::remove_stale_temporaries_of(o.output); // a killed run's unfinished final file
  const std::string dir = o.output + ".parts";
  const std::string id_file = (fs::path(dir) / "scenario.txt").string();
  std::vector<double> times{s.start_myr};
  times.insert(times.end(), s.output.times_myr.begin(), s.output.times_myr.end());

  if (o.restart && fs::exists(dir)) fs::remove_all(dir);
  std::size_t have = 0; // whole parts present
  EnsembleResult res;
  gas::GasState g;
  const bool star_records = s.gas && s.gas->stars;
  if (fs::exists(dir)) {
    if (!fs::exists(id_file) || io::read_file_bytes(id_file) != identity(s))
      throw InputError(SourcePlace{dir, 0, 0, {}},
                       "holds an unfinished run of a different scenario (or model file); remove it "
                       "or run again with --from-scratch");
    for (const auto& e : fs::directory_iterator(dir)) // temporaries of a run that was killed
      if (e.path().filename().string().rfind(".part_", 0) == 0) fs::remove(e.path());
    while (have < times.size() && fs::exists(part_name(dir, have))) {
      try {
        g = state_of(io::read_snapshot_part(part_name(dir, have))); // a damaged part is redone
      } catch (const InputError&) {
        fs::remove(part_name(dir, have));
        break;
      }
      ++have;
    }
  }
  if (have == 0) {
    g = gas::GasState::of_clouds(initial_tracers(s), s.start_myr); // input checked first
    const bool fresh = !fs::exists(dir);
    try {
      std::error_code ec;
      fs::create_directories(dir, ec);
      if (ec) throw InputError(SourcePlace{dir, 0, 0, {}}, "cannot create folder: " + ec.message());
      io::write_text_file(id_file, identity(s));
      io::write_snapshot_part(part_name(dir, 0),
                              snapshot_of(g, times[0], s.max_radius_kpc, star_records));
    } catch (...) {
      std::error_code ec;
      if (fresh) fs::remove_all(dir, ec); // leave nothing behind
      throw;
    }
    have = 1;
  } else {
    // g holds the last whole part, read while checking the parts
    if (o.log && have < times.size())
      *o.log << "resuming from t = " << times[have - 1] << " Myr (" << have << " of "
             << times.size() << " snapshots on disk)\n";
  }
  res.tracers = g.p.size();
  const gas::CircularFlow flow =
      s.gas ? gas::CircularFlow(s.model, std::min(1.5 * s.gas->collisions.extent_kpc, 200.0))
            : gas::CircularFlow();
  Progress prog(o.progress, g.p.size(), times.size() - 1);
  for (std::size_t k = have; k < times.size(); ++k) {
    const double ta = times[k - 1], tb = times[k];
    const std::size_t steps =
        orbit::is_symplectic(s.integration.method) ? fixed_steps(s, ta, tb) : 0;
    const auto report = [&](std::size_t done) { prog.update(k - 1, done, ta, tb, steps); };
    if (!advance_segment(s, flow, g, ta, tb, report, o.stop, res)) {
      prog.finish();
      res.reached_myr = ta;
      res.seconds = prog.seconds();
      return res; // interrupted: the parts on disk are whole; rerun to resume
    }
    res.orbit_steps += double(g.p.size()) * double(steps);
    io::write_snapshot_part(part_name(dir, k), snapshot_of(g, tb, s.max_radius_kpc, star_records));
    if (o.on_snapshot) o.on_snapshot(tb);
  }
  prog.finish();

  // Diagnostics: the invariant at the end against the start.
  const auto inv = orbit::conserved_quantity(s.model, s.start_myr, s.end_myr);
  io::Diagnostics d;
  if (s.gas) {
    d.invariant = "none";
    d.note = "the tracers are gas clouds that collide inelastically and are stirred ([gas]): "
             "energy is not kept";
  } else if (inv.kind == orbit::Invariant::Kind::none) {
    d.invariant = "none";
    d.note = inv.why_none;
  } else {
    d.invariant = inv.kind == orbit::Invariant::Kind::energy ? "energy" : "jacobi";
    const auto first = io::read_snapshot_part(part_name(dir, 0)).tracers;
    const auto rel = orbit::relative_errors(orbit::evaluate(inv, s.model, first, s.start_myr),
                                            orbit::evaluate(inv, s.model, g.p, s.end_myr));
    const auto sum = orbit::summarise(rel, 5);
    d.relative_error = rel;
    d.median = sum.median;
    d.max = sum.max;
    for (std::size_t i = 0; i < sum.worst.size(); ++i) {
      d.worst_ids.push_back(g.p.id[sum.worst[i]]);
      d.worst_errors.push_back(sum.worst_error[i]);
    }
  }
  std::vector<std::string> parts;
  for (std::size_t k = 0; k < times.size(); ++k)
    parts.push_back(part_name(dir, k));
  const orbit::RotatingFrame frame{s.output.frame_pattern_speed};
  const bool rotating = s.output.frame == scenario::Output::Frame::rotating;
  const auto transform = [&](std::size_t k, io::Snapshot& snap) {
    if (rotating) {
      frame.to_rotating(snap.tracers, snap.time_myr);
      snap.frame = "rotating";
      snap.frame_pattern_speed = frame.pattern_speed;
    }
    if (k + 1 == parts.size() && !d.relative_error.empty())
      for (std::size_t i = 0; i < snap.flags.size(); ++i)
        if (d.relative_error[i] > 1e-6) snap.flags[i] |= io::kFlagLargeError;
  };
  io::assemble(o.output, io::make_provenance(s.text, s.path, s.model_text, s.seed), s.model,
               orbit::method_name(s.integration.method), parts, d, transform);
  fs::remove_all(dir);
  res.complete = true;
  res.stars = g.stars();
  res.reached_myr = s.end_myr;
  res.seconds = prog.seconds();
  res.diagnostics = std::move(d);
  return res;
}

} // namespace undertow::run

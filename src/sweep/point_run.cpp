#include "undertow/sweep/point_run.hpp"

#include <chrono>
#include <filesystem>

#include <cerrno>
#include <cstring>

#include <fcntl.h>
#include <sys/file.h>
#include <unistd.h>

#include "undertow/io/atomic_file.hpp"
#include "undertow/io/digest.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/io/toml_table.hpp"
#include "undertow/io/toml_writer.hpp"
#include "undertow/run/whole_run.hpp"

namespace undertow::sweep {
namespace {

namespace fs = std::filesystem;
constexpr const char* finished_name = "finished.toml";
const char* const axes[] = {"U", "V", "W"};

fs::path partial_of(const Plan& p, const Point& q) {
  return point_folder(p, q) + ".partial";
}
fs::path failed_of(const Plan& p, const Point& q) {
  return point_folder(p, q) + ".failed";
}

std::map<std::string, io::FileDigest> digests(const fs::path& dir) {
  std::map<std::string, io::FileDigest> out;
  for (const auto& e : fs::recursive_directory_iterator(dir)) {
    if (!e.is_regular_file()) continue;
    const std::string rel = e.path().lexically_relative(dir).generic_string();
    if (rel == finished_name) continue;
    out[rel] = io::digest_file(e.path().string());
  }
  return out;
}

std::string digest_text(const io::FileDigest& d) {
  return std::to_string(d.size) + " " + io::hex64(d.fnv1a);
}

std::string finished_text(const Point& q, const PointResult& r,
                          const std::map<std::string, io::FileDigest>& files,
                          const std::map<std::string, io::FileDigest>& inputs) {
  toml::table t;
  t.insert("id", q.id);
  t.insert("scenario_fnv1a", io::hex64(io::fnv1a64(q.scenario)));
  toml::table res;
  res.insert("log_likelihood", r.log_likelihood);
  res.insert("log_likelihood_scatter", r.log_likelihood_scatter);
  res.insert("realisations", std::int64_t(r.realisations));
  res.insert("chi2", r.chi2);
  res.insert("measured_sources", std::int64_t(r.measured_sources));
  res.insert("outliers", std::int64_t(r.outliers));
  for (int a = 0; a < 3; ++a) {
    const std::string x = axes[a];
    res.insert("mean_" + x + "_measured_kms", r.mean_measured[a]);
    res.insert("mean_" + x + "_measured_err_kms", r.mean_measured_err[a]);
    res.insert("mean_" + x + "_simulated_kms", r.mean_simulated[a]);
    res.insert("mean_" + x + "_simulated_err_kms", r.mean_simulated_err[a]);
    res.insert("mean_" + x + "_pull", r.pull[a]);
  }
  t.insert("result", res);
  toml::table f;
  for (const auto& [name, d] : files)
    f.insert(name, digest_text(d));
  t.insert("files", f);
  toml::table in;
  for (const auto& [name, d] : inputs)
    in.insert(name, digest_text(d));
  t.insert("inputs", in);
  return "# undertow sweep: this point finished. Its files, and the input files its scenario\n"
         "# names (paths relative to this folder), are checked against these sizes and FNV-1a\n"
         "# digests before it is skipped or gathered; a mismatch means it is run again.\n" +
         io::toml_text(t);
}

PointResult read_result(const toml::table& t, const std::string& path) {
  io::TableReader r(t, path, "result");
  PointResult x;
  x.log_likelihood = r.number("log_likelihood");
  x.log_likelihood_scatter = r.number_or("log_likelihood_scatter", 0.0);
  x.realisations = std::size_t(r.number_or("realisations", 1));
  x.chi2 = r.number("chi2");
  x.measured_sources = std::size_t(r.number("measured_sources"));
  x.outliers = std::size_t(r.number("outliers"));
  for (int a = 0; a < 3; ++a) {
    const std::string s = axes[a];
    x.mean_measured[a] = r.number("mean_" + s + "_measured_kms");
    x.mean_measured_err[a] = r.number("mean_" + s + "_measured_err_kms");
    x.mean_simulated[a] = r.number("mean_" + s + "_simulated_kms");
    x.mean_simulated_err[a] = r.number("mean_" + s + "_simulated_err_kms");
    x.pull[a] = r.number("mean_" + s + "_pull");
  }
  return x;
}

PointResult result_of(const run::WholeRunResult& w) {
  PointResult r;
  r.log_likelihood = w.log_likelihood;
  r.log_likelihood_scatter = w.log_likelihood_scatter;
  r.realisations = w.realisations;
  r.chi2 = w.chi2;
  r.measured_sources = w.measured_sources;
  r.outliers = w.outliers;
  for (int a = 0; a < 3; ++a) {
    const auto& c = w.comparison.all().uvw[std::size_t(a)];
    r.mean_measured[a] = c.measured.mean;
    r.mean_measured_err[a] = c.measured.mean_err;
    r.mean_simulated[a] = c.simulated.mean;
    r.mean_simulated_err[a] = c.simulated.mean_err;
    r.pull[a] = c.pull;
  }
  return r;
}

// Holds an exclusive flock on <plan>/locks/<id>.lock; the kernel frees it when the process ends
// however it ends, so a killed task leaves no stale lock.
class PointLock {
public:
  PointLock(const Plan& p, const Point& q) {
    const fs::path dir = fs::path(p.folder) / "locks";
    std::error_code ec;
    fs::create_directories(dir, ec);
    const std::string path = (dir / (q.id + ".lock")).string();
    fd_ = ::open(path.c_str(), O_CREAT | O_RDWR | O_CLOEXEC, 0644);
    if (fd_ < 0) throw InputError(SourcePlace{path, 0, 0, {}}, "cannot open the point's lock file");
    held_ = ::flock(fd_, LOCK_EX | LOCK_NB) == 0;
    // Only "held by another process" means busy; any other error (a file system mounted
    // without flock) must not pass for it, or every task would skip every point.
    if (!held_ && errno != EWOULDBLOCK)
      throw InputError(SourcePlace{path, 0, 0, {}},
                       std::string("cannot lock the point (") + std::strerror(errno) +
                           "); the plan folder must be on a file system with working flock "
                           "across nodes (docs/sweeps.md)");
  }
  ~PointLock() {
    if (fd_ >= 0) ::close(fd_);
  }
  PointLock(const PointLock&) = delete;
  PointLock& operator=(const PointLock&) = delete;
  bool held() const { return held_; }

private:
  int fd_ = -1;
  bool held_ = false;
};

double since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

} // namespace

const char* state_name(PointStatus::State s) {
  switch (s) {
  case PointStatus::State::missing:
    return "missing";
  case PointStatus::State::partial:
    return "partial";
  case PointStatus::State::failed:
    return "failed";
  case PointStatus::State::complete:
    return "complete";
  case PointStatus::State::corrupt:
    return "corrupt";
  case PointStatus::State::error:
    return "error";
  }
  return "?";
}

namespace {

PointStatus checked_status(const Plan& p, const Point& q) {
  PointStatus st;
  const fs::path dir = point_folder(p, q);
  if (fs::exists(dir)) {
    st.state = PointStatus::State::corrupt;
    const fs::path f = dir / finished_name;
    if (!fs::is_regular_file(f)) {
      st.detail = "its folder has no " + std::string(finished_name) + " (written half-way)";
      return st;
    }
    toml::table t;
    try {
      t = io::parse_toml_file(f.string());
    } catch (const InputError& e) {
      st.detail = std::string("its ") + finished_name + " cannot be read: " + e.what();
      return st;
    }
    const auto* id = t["id"].as_string();
    const auto* sd = t["scenario_fnv1a"].as_string();
    const auto* files = t["files"].as_table();
    const auto* inputs = t["inputs"].as_table();
    const auto* res = t["result"].as_table();
    if (!id || !sd || !files || !inputs || !res) {
      st.detail = "its " + std::string(finished_name) + " is incomplete";
      return st;
    }
    if (id->get() != q.id || sd->get() != io::hex64(io::fnv1a64(q.scenario))) {
      st.detail = "it was made from another scenario";
      return st;
    }
    // A file that is gone or differs is corruption (the point is redone); a file that exists
    // but cannot be read is an error of its own (InputError), never a reason to redo.
    for (const auto& [name, v] : *files) {
      const fs::path file = dir / std::string(name.str());
      if (!fs::is_regular_file(file)) {
        st.detail = std::string(name.str()) + " is missing";
        return st;
      }
      if (!v.is_string() || v.as_string()->get() != digest_text(io::digest_file(file.string()))) {
        st.detail = std::string(name.str()) + " has changed since the point finished";
        return st;
      }
    }
    for (const auto& [name, v] : *inputs) {
      const fs::path file = (dir / std::string(name.str())).lexically_normal();
      if (!fs::is_regular_file(file))
        throw InputError(SourcePlace{file.string(), 0, 0, {}}, "input of point " +
                                                                   std::to_string(q.number) + " (" +
                                                                   q.id + ") is missing");
      if (!v.is_string() || v.as_string()->get() != digest_text(io::digest_file(file.string()))) {
        st.detail = "its input " + file.string() + " has changed since the point finished";
        return st;
      }
    }
    try {
      st.result = read_result(*res, f.string());
    } catch (const InputError& e) {
      st.detail = std::string("its ") + finished_name + " cannot be read: " + e.what();
      return st;
    }
    st.state = PointStatus::State::complete;
    return st;
  }
  if (fs::exists(failed_of(p, q))) {
    st.state = PointStatus::State::failed;
    st.detail = io::read_file_bytes(failed_of(p, q).string());
    while (!st.detail.empty() && st.detail.back() == '\n')
      st.detail.pop_back();
    return st;
  }
  st.state =
      fs::exists(partial_of(p, q)) ? PointStatus::State::partial : PointStatus::State::missing;
  return st;
}

} // namespace

PointStatus point_status(const Plan& p, const Point& q) {
  try {
    return checked_status(p, q);
  } catch (const std::exception& e) {
    PointStatus st;
    st.state = PointStatus::State::error;
    st.detail = std::string("cannot check it: ") + e.what();
    return st;
  }
}

namespace {

// Records a point's error in points/<id>.failed; a failure to do even that is only logged.
void record_failure(const Plan& p, const Point& q, const std::string& what, std::ostream* log) {
  try {
    fs::create_directories(failed_of(p, q).parent_path()); // the first point may fail early
    io::write_text_file(failed_of(p, q).string(), what + "\n");
  } catch (const std::exception& e) {
    if (log) *log << "point " << q.number << ": cannot record its failure: " << e.what() << "\n";
  }
}

} // namespace

bool record_failure_if_free(const Plan& p, const Point& q, const std::string& what) {
  PointLock lock(p, q);
  if (!lock.held() || point_status(p, q).state == PointStatus::State::complete) return false;
  record_failure(p, q, what, nullptr);
  return true;
}

PointOutcome run_point(const Plan& p, const Point& q, const PointRunOptions& o) {
  const auto t0 = std::chrono::steady_clock::now();
  PointOutcome out;
  const std::string label = "point " + std::to_string(q.number) + " (" + q.id + ")";
  const auto say = [&](const std::string& s) {
    if (o.log) *o.log << label << ": " << s << "\n" << std::flush;
  };
  const auto failed = [&](std::string what) {
    // as a whole run does: a folder with no finished stage goes, finished stages stay for the
    // retry and the message says so
    const fs::path partial = partial_of(p, q);
    std::error_code ec;
    if (!run::finished_stage_files(partial.string()).empty())
      what += "; its finished stages are kept in points/" + partial.filename().string() +
              " for the retry";
    else
      fs::remove_all(partial, ec);
    out.kind = PointOutcome::Kind::failed;
    out.message = what;
    record_failure(p, q, what, o.log);
    say("failed: " + what);
    out.seconds = since(t0);
    return out;
  };
  PointLock lock(p, q);
  if (!lock.held()) {
    out.kind = PointOutcome::Kind::busy;
    say("another task is running it; left to that task");
    return out;
  }
  const fs::path dir = point_folder(p, q), partial = partial_of(p, q);
  const PointStatus st = point_status(p, q);
  if (st.state == PointStatus::State::complete) {
    fs::remove(failed_of(p, q)); // a stale record of an earlier attempt
    out.kind = PointOutcome::Kind::skipped;
    out.seconds = since(t0);
    return out;
  }
  if (st.state == PointStatus::State::error) return failed(st.detail);
  if (st.state == PointStatus::State::corrupt) {
    // Set aside rather than deleted, under the first free name: a person may want to see what
    // went wrong.
    fs::path aside;
    for (int k = 1; aside.empty() || fs::exists(aside); ++k)
      aside = point_folder(p, q) + ".corrupt-" + std::to_string(k);
    fs::rename(dir, aside);
    say(st.detail + "; set aside as " + aside.filename().string() + ", running it again");
  }
  fs::remove(failed_of(p, q)); // a retry: it shows as partial while it runs
  io::remove_stale_temporaries(partial.string());
  say(describe(p, q));
  run::WholeRunResult w;
  double science = 0;
  // The inputs as the run reads them: a catalog replaced during the run must not pass.
  std::map<std::string, io::FileDigest> inputs;
  const auto input_names = input_files(q);
  const auto digest_inputs = [&] {
    std::map<std::string, io::FileDigest> m;
    for (const auto& f : input_names)
      m[f] = io::digest_file((fs::path(dir) / f).lexically_normal().string());
    return m;
  };
  try {
    inputs = digest_inputs();
    // The science: what `undertow run` does with the point's scenario (reading it included).
    const auto t1 = std::chrono::steady_clock::now();
    const auto sc = point_scenario(p, q);
    run::WholeRunOptions ro;
    ro.folder = partial.string();
    ro.progress = o.progress;
    ro.stop = o.stop;
    ro.log = o.log;
    w = run::run_all(sc, ro);
    science = since(t1);
  } catch (const std::exception& e) {
    return failed(e.what());
  }
  if (!w.complete) {
    out.kind = PointOutcome::Kind::interrupted;
    say("interrupted; kept in " + partial.string() + " to resume");
    return out;
  }
  PointResult r;
  try {
    if (!p.keep_orbits) { // the largest file by far; keep_orbits = true in the sweep keeps it
      fs::remove(partial / "orbits.h5");
      fs::remove(partial / ".keys" / "orbits");
      fs::remove_all(partial / "realisations"); // the other realisations' orbits
      for (const auto& e : fs::directory_iterator(partial / ".keys"))
        if (e.path().filename().string().rfind("orbits-r", 0) == 0) fs::remove(e.path());
    }
    io::remove_stale_temporaries(partial.string());
    if (digest_inputs() != inputs)
      return failed("an input file changed while the point ran; run it again");
    r = result_of(w);
    io::write_text_file((partial / finished_name).string(),
                        finished_text(q, r, digests(partial), inputs));
    fs::rename(partial, dir);
  } catch (const std::exception& e) {
    return failed(std::string("the run finished but its folder could not be completed: ") +
                  e.what());
  }
  out.seconds = since(t0);
  out.science_seconds = science;
  char b[256];
  std::snprintf(b, sizeof b, "finished in %.1f s: ln L = %.2f, chi^2 = %.1f, mean V_s %.2f km/s",
                out.seconds, r.log_likelihood, r.chi2, r.mean_simulated[1]);
  say(b);
  return out;
}

ShardReport run_points(const Plan& p, const std::vector<std::size_t>& numbers,
                       const PointRunOptions& o) {
  ShardReport rep;
  for (std::size_t n : numbers) {
    if (o.stop && o.stop->load()) {
      rep.interrupted = true;
      break;
    }
    PointOutcome r;
    try {
      r = run_point(p, p.points.at(n), o);
    } catch (const std::exception& e) { // the bookkeeping around the run failed: go on
      r.kind = PointOutcome::Kind::failed;
      if (o.log) *o.log << "point " << n << ": failed: " << e.what() << "\n";
      record_failure(p, p.points.at(n), e.what(), o.log);
    }
    switch (r.kind) {
    case PointOutcome::Kind::ran:
      ++rep.ran;
      rep.science_seconds += r.science_seconds;
      rep.bookkeeping_seconds += r.seconds - r.science_seconds;
      break;
    case PointOutcome::Kind::skipped:
      ++rep.skipped;
      rep.bookkeeping_seconds += r.seconds;
      break;
    case PointOutcome::Kind::failed:
      ++rep.failed;
      break;
    case PointOutcome::Kind::busy:
      ++rep.busy;
      break;
    case PointOutcome::Kind::interrupted:
      rep.interrupted = true;
      return rep;
    }
  }
  return rep;
}

} // namespace undertow::sweep

#include "undertow/sweep/pool.hpp"

#include <cerrno>
#include <chrono>
#include <csignal>
#include <deque>
#include <filesystem>
#include <map>
#include <thread>

#include <fcntl.h>
#include <sys/prctl.h>
#include <sys/wait.h>
#include <unistd.h>

#include "undertow/error.hpp"

namespace undertow::sweep {
namespace {

namespace fs = std::filesystem;

pid_t spawn(const Plan& p, const Point& q, const PoolOptions& o) {
  const fs::path logs = fs::path(p.folder) / "logs";
  std::error_code ec;
  fs::create_directories(logs, ec);
  const std::string log = (logs / (q.id + ".log")).string();
  const std::string number = std::to_string(q.number), threads = std::to_string(o.threads);
  std::vector<std::string> args = {o.executable, "sweep", "run",       p.folder,
                                   "--point",    number,  "--threads", threads};
  std::vector<char*> argv;
  for (auto& a : args)
    argv.push_back(a.data());
  argv.push_back(nullptr);
  const pid_t parent = ::getpid();
  const pid_t pid = ::fork();
  if (pid < 0) throw InputError("cannot start a worker process (fork failed)");
  if (pid == 0) {
    ::prctl(PR_SET_PDEATHSIG, SIGKILL);
    if (::getppid() != parent) ::_exit(point_exit::interrupted);
    const int fd = ::open(log.c_str(), O_WRONLY | O_CREAT | O_APPEND, 0644);
    if (fd >= 0) {
      ::dup2(fd, 1);
      ::dup2(fd, 2);
      ::close(fd);
    }
    ::execv(argv[0], argv.data());
    ::_exit(127);
  }
  return pid;
}

} // namespace

ShardReport run_pool(const Plan& p, const std::vector<std::size_t>& numbers, const PoolOptions& o) {
  ShardReport rep;
  const auto say = [&](const std::string& s) {
    if (o.log) *o.log << s << "\n" << std::flush;
  };
  std::deque<std::size_t> pending;
  for (std::size_t n : numbers) {
    if (point_status(p, p.points.at(n)).state == PointStatus::State::complete)
      ++rep.skipped;
    else
      pending.push_back(n);
  }
  if (rep.skipped) say(std::to_string(rep.skipped) + " points already finished; skipped");
  const std::size_t total = pending.size();
  std::size_t done = 0;
  std::map<pid_t, std::pair<std::size_t, std::chrono::steady_clock::time_point>> running;
  bool stopping = false;
  while (!pending.empty() || !running.empty()) {
    if (!stopping && o.stop && o.stop->load()) {
      stopping = true;
      rep.interrupted = true;
      say("stopping: waiting for the running points to save their state");
      for (const auto& [pid, _] : running)
        ::kill(pid, SIGTERM);
    }
    while (!stopping && !pending.empty() && running.size() < std::max<std::size_t>(o.workers, 1)) {
      const std::size_t n = pending.front();
      pending.pop_front();
      running[spawn(p, p.points.at(n), o)] = {n, std::chrono::steady_clock::now()};
    }
    if (stopping) pending.clear();
    int status = 0;
    const pid_t pid = ::waitpid(-1, &status, WNOHANG);
    if (pid == 0 || (pid < 0 && errno == EINTR)) {
      std::this_thread::sleep_for(std::chrono::milliseconds(20));
      continue;
    }
    if (pid < 0) break; // no children left
    const auto it = running.find(pid);
    if (it == running.end()) continue;
    const auto [n, t0] = it->second;
    running.erase(it);
    const Point& q = p.points.at(n);
    const double secs =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    const std::string label = "[" + std::to_string(++done) + "/" + std::to_string(total) +
                              "] point " + std::to_string(n) + " (" + q.id + ")";
    char t[32];
    std::snprintf(t, sizeof t, "%.1f s", secs);
    if (WIFEXITED(status) && WEXITSTATUS(status) == point_exit::finished) {
      ++rep.ran;
      rep.science_seconds += secs;
      say(label + ": finished in " + t);
    } else if ((WIFEXITED(status) && WEXITSTATUS(status) == point_exit::interrupted) ||
               (stopping && WIFSIGNALED(status))) {
      rep.interrupted = true;
      say(label + ": interrupted; it resumes on the next run");
    } else if (WIFEXITED(status) && WEXITSTATUS(status) == point_exit::busy) {
      ++rep.busy;
      say(label + ": another task is running it");
    } else {
      ++rep.failed;
      std::string why;
      if (WIFSIGNALED(status)) {
        why = "the worker was killed by signal " + std::to_string(WTERMSIG(status)) +
              (WTERMSIG(status) == SIGKILL ? " (out of memory?)" : "");
        record_failure_if_free(p, q, why);
      } else {
        const auto st = point_status(p, q);
        why = st.state == PointStatus::State::failed
                  ? st.detail
                  : "the worker exited with status " + std::to_string(WEXITSTATUS(status));
      }
      say(label + ": failed: " + why + " (log: " + p.folder + "/logs/" + q.id + ".log)");
    }
  }
  return rep;
}

} // namespace undertow::sweep

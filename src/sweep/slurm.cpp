#include "undertow/sweep/slurm.hpp"

#include <array>
#include <cstdio>
#include <filesystem>
#include <iostream>
#include <sys/wait.h>

#include "undertow/error.hpp"
#include "undertow/io/text_file.hpp"

namespace undertow::sweep {
namespace {

namespace fs = std::filesystem;

std::string shell_quote(const std::string& s) {
  std::string o = "'";
  for (char c : s)
    o += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return o + "'";
}

bool plain(const std::string& s) {
  for (char c : s)
    if (c == '\n' || c == '\r') return false;
  return !s.empty();
}

} // namespace

SlurmScript write_slurm_script(const Plan& p, const SlurmOptions& o) {
  const auto bad = [](const std::string& opt, const std::string& what) {
    throw InputError(SourcePlace{"", 0, 0, opt}, what);
  };
  if (!plain(o.time)) bad("--time", "give the time per task, e.g. 02:00:00 (your site's limits)");
  if (!plain(o.memory)) bad("--mem", "give the memory per task, e.g. 4G");
  if (o.cpus_per_task < 1) bad("--cpus-per-task", "must be at least 1");
  if (p.points.empty()) bad("plan", "the plan has no points");
  SlurmScript s;
  s.tasks = o.tasks == 0 ? p.points.size() : std::min(o.tasks, p.points.size());
  if (o.tasks > p.points.size())
    s.warnings.push_back("asked for " + std::to_string(o.tasks) + " tasks but the plan has " +
                         std::to_string(p.points.size()) + " points; the array has " +
                         std::to_string(s.tasks) + " tasks");
  if (s.tasks > 1000)
    s.warnings.push_back(std::to_string(s.tasks) +
                         " array tasks: many clusters cap arrays at 1001 (MaxArraySize); use "
                         "--tasks to run several points per task");
  if (s.tasks > 100 && o.max_running == 0)
    s.warnings.push_back("no --max-running: all " + std::to_string(s.tasks) +
                         " tasks may start at once on a shared cluster; consider a cap");
  for (const auto& [opt, v] :
       {std::pair<const char*, const std::string*>{"--partition", &o.partition},
        {"--account", &o.account},
        {"--job-name", &o.job_name}})
    if (v->find_first_of(" \t\r\n'\"") != std::string::npos) bad(opt, "must be one word");
  const fs::path folder = fs::absolute(p.folder).lexically_normal();
  // #SBATCH lines are not parsed by a shell: a path with blanks or quotes cannot be written
  // there safely.
  if (folder.string().find_first_of(" \t\r\n'\"%") != std::string::npos)
    bad("plan", "the plan folder's path " + folder.string() +
                    " holds a blank, a quote or '%', which #SBATCH --output cannot take; move the "
                    "plan");
  const fs::path logs = folder / "logs";
  std::error_code ec;
  const bool new_logs = !fs::exists(logs, ec);
  fs::create_directories(logs, ec);
  if (ec) throw InputError(SourcePlace{logs.string(), 0, 0, {}}, "cannot create: " + ec.message());
  const std::size_t per_task = (p.points.size() + s.tasks - 1) / s.tasks;
  std::string t = "#!/bin/bash\n";
  t += "# undertow sweep \"" + p.name + "\": " + std::to_string(p.points.size()) + " points in " +
       std::to_string(s.tasks) + " array tasks (up to " + std::to_string(per_task) +
       (per_task == 1 ? " point" : " points") + " each), written by `undertow sweep slurm`.\n";
  t += "# Watch: squeue --me; undertow sweep status " + folder.string() +
       "\n# Resume after a failure or a time limit: submit this script again (finished points "
       "are skipped).\n";
  t += "#SBATCH --job-name=" + (o.job_name.empty() ? "undertow-" + p.name : o.job_name) + "\n";
  t += "#SBATCH --array=0-" + std::to_string(s.tasks - 1) +
       (o.max_running ? "%" + std::to_string(o.max_running) : "") + "\n";
  t += "#SBATCH --ntasks=1\n";
  t += "#SBATCH --cpus-per-task=" + std::to_string(o.cpus_per_task) + "\n";
  t += "#SBATCH --time=" + o.time + "\n";
  t += "#SBATCH --mem=" + o.memory + "\n";
  t += "#SBATCH --output=" + (logs / "slurm-%A_%a.out").string() + "\n";
  t += "#SBATCH --error=" + (logs / "slurm-%A_%a.err").string() + "\n";
  if (!o.partition.empty()) t += "#SBATCH --partition=" + o.partition + "\n";
  if (!o.account.empty()) t += "#SBATCH --account=" + o.account + "\n";
  for (const auto& d : o.directives) {
    if (!plain(d) || d.rfind("--", 0) != 0)
      bad("--sbatch", "\"" + d + "\" is not one sbatch option such as --qos=short");
    t += "#SBATCH " + d + "\n";
  }
  t += "set -euo pipefail\n";
  t += "export OMP_NUM_THREADS=\"${SLURM_CPUS_PER_TASK:-" + std::to_string(o.cpus_per_task) +
       "}\"\n";
  t += "exec " + shell_quote(o.executable) + " sweep run " + shell_quote(folder.string()) + "\n";
  s.path = (folder / "slurm-array.sh").string();
  s.text = t;
  try { // a script that cannot be written leaves no empty logs folder of ours behind
    io::write_text_file(s.path, t);
  } catch (...) {
    if (new_logs) fs::remove(logs, ec);
    throw;
  }
  fs::permissions(s.path, fs::perms::owner_exec | fs::perms::group_exec, fs::perm_options::add, ec);
  if (ec) // sbatch runs it through bash anyway; say so rather than fail
    std::cerr << "warning: " << s.path << ": cannot make it executable: " << ec.message() << "\n";
  return s;
}

std::string submit_script(const std::string& script, bool wait) {
  // Only stdout is read: sbatch's warnings (on stderr) reach the person submitting as they are.
  const std::string cmd =
      "sbatch --parsable " + std::string(wait ? "--wait " : "") + shell_quote(script);
  FILE* f = ::popen(cmd.c_str(), "r");
  if (!f) throw InputError("cannot run sbatch");
  std::string out;
  std::array<char, 256> buf{};
  while (std::fgets(buf.data(), int(buf.size()), f))
    out += buf.data();
  const int status = ::pclose(f);
  while (!out.empty() && (out.back() == '\n' || out.back() == '\r'))
    out.pop_back();
  const int code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  if (code == 127) throw InputError("sbatch is not on PATH: is this a Slurm login node?");
  // --parsable prints "jobid" or "jobid;cluster"; with --wait a failed task makes the exit
  // status non-zero after the id was printed.
  std::string id;
  std::size_t at = 0;
  while (at <= out.size()) {
    const std::size_t end = std::min(out.find('\n', at), out.size());
    const std::string line = out.substr(at, end - at);
    const std::string first = line.substr(0, line.find(';'));
    if (!first.empty() && first.find_first_not_of("0123456789") == std::string::npos) {
      id = first;
      break;
    }
    at = end + 1;
  }
  if (id.empty())
    throw InputError("sbatch did not submit the script (its message is above; status " +
                     std::to_string(code) + ")");
  if (code != 0)
    throw InputError("job " + id + ": some array tasks failed (sbatch exit status " +
                     std::to_string(code) + "); see the logs folder and `undertow sweep status`");
  return id;
}

} // namespace undertow::sweep

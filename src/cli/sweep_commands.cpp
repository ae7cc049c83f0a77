#include "sweep_commands.hpp"

#include <chrono>
#include <filesystem>
#include <iostream>
#include <set>
#include <thread>

#include "long_run.hpp"
#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/io/table.hpp"
#include "undertow/sweep/cost.hpp"
#include "undertow/sweep/gather.hpp"
#include "undertow/sweep/plan.hpp"
#include "undertow/sweep/pool.hpp"
#include "undertow/sweep/shard.hpp"
#include "undertow/sweep/slurm.hpp"

namespace undertow::cli {
namespace {

namespace fs = std::filesystem;
using namespace undertow::sweep;

std::string self_executable() {
  std::error_code ec;
  const auto p = fs::read_symlink("/proc/self/exe", ec);
  if (ec) throw InputError("cannot find the undertow program (/proc/self/exe)");
  return p.string();
}

std::string human_bytes(double b) {
  const char* u[] = {"B", "kB", "MB", "GB", "TB"};
  int i = 0;
  while (b >= 1000 && i < 4)
    b /= 1000, ++i;
  char s[32];
  std::snprintf(s, sizeof s, "%.3g %s", b, u[i]);
  return s;
}

int do_plan(const SweepArgs& a) {
  const SweepSpec spec = load_sweep_file(a.file);
  const std::string folder =
      a.output.empty() ? fs::path(a.file).replace_extension("").string() : a.output;
  Plan plan = make_plan(spec, folder);
  std::optional<Plan> old;
  if (fs::exists(fs::path(folder) / "plan.toml")) {
    try {
      old = read_plan(folder, false); // the ids are all that is compared
    } catch (const InputError&) {
      old.reset(); // an unreadable old plan is simply replaced
    }
  }
  write_plan(plan);
  std::cout << "planned " << plan.points.size() << " points into " << folder << "/plan.toml ("
            << plan.design << " over " << plan.parameters.size() << " parameters"
            << (plan.reference.empty() ? "" : ", point 0 is the reference") << ")\n";
  for (const auto& w : plan.warnings)
    std::cerr << "warning: " << w << "\n";
  if (old) {
    std::set<std::string> before;
    for (const auto& r : old->points)
      before.insert(r.id);
    std::size_t kept = 0;
    for (const auto& q : plan.points)
      kept += before.count(q.id);
    std::cout << "replanned: " << kept << " points have the same id (and keep their results), "
              << plan.points.size() - kept << " are new, " << old->points.size() - kept
              << " of the old plan are no longer in it (their folders are left alone)\n";
  }
  const auto first = point_scenario(plan, plan.points.back());
  const auto c = guess_cost(first);
  char b[512];
  std::snprintf(b, sizeof b,
                "a point: %.3g orbit-steps%s, about %.2g core-seconds of integration at this "
                "project's benchmark rates (docs/performance.md); orbits.h5 up to %s, %s.\n"
                "Time one point on your machine before sizing a cluster job: undertow sweep run "
                "%s --point %zu\n",
                c.orbit_steps,
                c.gas_cloud_passes > 0
                    ? (" and " + detail::num(c.gas_cloud_passes) + " gas cloud-passes").c_str()
                    : "",
                c.core_seconds, human_bytes(c.orbit_file_bytes).c_str(),
                plan.keep_orbits ? "kept" : "removed when the point finishes", folder.c_str(),
                plan.points.back().number);
  std::cout << b;
  if (plan.points.size() > 1000)
    std::cout << "note: " << plan.points.size()
              << " points is a large sweep; on a shared cluster run it in parts or cap the "
                 "running tasks (undertow sweep slurm --max-running)\n";
  return 0;
}

int do_run(const SweepArgs& a) {
  // Points run from inside the plan folder, so that what they record (the scenario's path in
  // every report) is the same wherever the folder is: a local and a cluster run then agree
  // byte for byte.
  const fs::path given(a.folder);
  const fs::path dir = fs::is_directory(given) ? given : given.parent_path();
  const fs::path name = fs::is_directory(given) ? fs::path("plan.toml") : given.filename();
  Plan plan = read_plan(a.folder, false); // a bad folder is reported as given
  if (!dir.empty()) fs::current_path(dir);
  plan.folder = ".";
  plan.file = name.string();
  const int threads = a.threads > 0 ? a.threads : threads_from_environment();
  PointRunOptions o;
  prepare_long_run(o, threads);
  if (a.point) {
    if (*a.point >= plan.points.size())
      throw InputError(SourcePlace{"", 0, 0, "--point"},
                       "the plan has points 0 to " + std::to_string(plan.points.size() - 1));
    build_points(plan, {*a.point});
    const auto r = run_points(plan, {*a.point}, o); // records even a bookkeeping failure
    if (r.interrupted) return point_exit::interrupted;
    if (r.failed) return point_exit::failed;
    if (r.busy) return point_exit::busy;
    return point_exit::finished;
  }
  Shard shard;
  std::string from = "all points";
  if (a.shard || a.shards) {
    if (!a.shard || !a.shards)
      throw InputError(SourcePlace{"", 0, 0, "--shard"}, "give --shard and --shards together");
    if (*a.shards < 1 || *a.shard >= *a.shards)
      throw InputError(SourcePlace{"", 0, 0, "--shard"}, "must lie in 0 to --shards - 1");
    shard = {*a.shard, *a.shards};
    from = "options";
  } else if (const auto env = shard_from_environment()) {
    shard = *env;
    from = "the Slurm job array";
  }
  const auto numbers = shard_points(plan.points.size(), shard);
  build_points(plan, numbers); // only this shard's scenarios: work in proportion to the shard
  std::cerr << "shard " << shard.index << " of " << shard.count << " (from " << from
            << "): " << numbers.size() << " of " << plan.points.size() << " points\n";
  ShardReport rep;
  const auto t0 = std::chrono::steady_clock::now();
  if (a.workers > 1) {
    PoolOptions po;
    po.workers = a.workers;
    const int cores = int(std::max(1u, std::thread::hardware_concurrency()));
    po.threads = threads > 0 ? threads : std::max(1, cores / int(a.workers));
    po.executable = self_executable();
    po.stop = &stop_flag();
    po.log = &std::cerr;
    std::cerr << a.workers << " worker processes, " << po.threads << " threads each\n";
    rep = run_pool(plan, numbers, po);
  } else {
    rep = run_points(plan, numbers, o);
  }
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  char b[512];
  std::snprintf(b, sizeof b,
                "shard %zu of %zu: ran %zu, already finished %zu, failed %zu, left to another "
                "task %zu; %.1f s wall",
                shard.index, shard.count, rep.ran, rep.skipped, rep.failed, rep.busy, wall);
  std::cout << b;
  if (a.workers <= 1 && rep.ran > 0) {
    std::snprintf(b, sizeof b, "; bookkeeping %.3f s (%.2f %% of the science)",
                  rep.bookkeeping_seconds,
                  100 * rep.bookkeeping_seconds / std::max(rep.science_seconds, 1e-9));
    std::cout << b;
  }
  std::cout << std::endl;
  if (rep.interrupted) {
    std::cerr << "undertow: interrupted; run the same command again to resume\n";
    return 130;
  }
  if (rep.failed > 0) {
    std::cerr << "undertow: " << rep.failed
              << " points failed (their errors: undertow sweep status " << a.folder << ")\n";
    return 1;
  }
  return 0;
}

int do_status(const SweepArgs& a) {
  const Plan plan = read_plan(a.folder);
  std::size_t n[6] = {};
  for (const auto& q : plan.points) {
    const auto st = point_status(plan, q);
    ++n[int(st.state)];
    if (a.all || st.state != PointStatus::State::complete)
      std::cout << "point " << q.number << " (" << q.id << ", " << describe(plan, q)
                << "): " << state_name(st.state) << (st.detail.empty() ? "" : ": " + st.detail)
                << "\n";
  }
  std::cout << plan.name << ": " << plan.points.size() << " points: " << n[3] << " complete, "
            << n[2] << " failed, " << n[1] << " partial (interrupted or running), " << n[0]
            << " not started, " << n[4] << " corrupt (will be redone)"
            << (n[5] ? ", " + std::to_string(n[5]) + " that cannot be checked" : std::string())
            << "\n";
  return 0;
}

int do_slurm(const SweepArgs& a) {
  const Plan plan = read_plan(a.folder, false);
  SlurmOptions o;
  o.tasks = a.tasks;
  o.time = a.time;
  o.memory = a.memory;
  o.cpus_per_task = a.cpus;
  o.max_running = a.max_running;
  o.partition = a.partition;
  o.account = a.account;
  o.job_name = a.job_name;
  o.directives = a.directives;
  o.executable = self_executable();
  const auto s = write_slurm_script(plan, o);
  for (const auto& w : s.warnings)
    std::cerr << "warning: " << w << "\n";
  std::cout << "wrote " << s.path << ": " << s.tasks << " array tasks for " << plan.points.size()
            << " points\n";
  if (!a.submit) {
    std::cout << "submit it with: sbatch " << s.path << "\n";
    return 0;
  }
  const std::string id = submit_script(s.path, a.wait);
  std::cout << "submitted job " << id << (a.wait ? " (all tasks ended)" : "") << "\n";
  return 0;
}

int do_gather(const SweepArgs& a) {
  const Plan plan = read_plan(a.folder);
  GatherOptions o;
  o.sort = a.sort;
  o.order = a.order;
  o.partial = a.partial;
  o.folder = a.output;
  o.posterior_required = a.posterior;
  o.edge_mass = a.edge_mass;
  const auto r = gather(plan, o);
  for (const auto& m : r.missing)
    std::cout << "missing: " << m << "\n";
  for (const auto& f : r.failed)
    std::cout << "failed: " << f << "\n";
  const bool whole = r.missing.empty() && r.failed.empty();
  if (r.files.empty()) {
    std::cerr << "undertow: " << r.missing.size() << " points missing and " << r.failed.size()
              << " failed of " << plan.points.size()
              << "; nothing gathered (run the shards again, or --partial to gather what is "
                 "there)\n";
    return 1;
  }
  std::cout << "gathered " << r.complete << " of " << plan.points.size() << " points"
            << (whole ? "" : " (PARTIAL)") << ":";
  for (const auto& f : r.files)
    std::cout << " " << f;
  std::cout << "\n";
  if (!r.posterior_refused.empty()) std::cout << "no posterior: " << r.posterior_refused << "\n";
  for (const auto& f : r.files)
    if (f.ends_with("-results.h5")) draw_after(a.figures, f);
  return 0;
}

int do_show(const SweepArgs& a) {
  const Plan plan = read_plan(a.folder);
  const std::size_t n = a.point.value_or(0);
  if (n >= plan.points.size())
    throw InputError(SourcePlace{"", 0, 0, "--point"},
                     "the plan has points 0 to " + std::to_string(plan.points.size() - 1));
  std::cout << plan.points[n].scenario;
  return 0;
}

} // namespace

void add_sweep_commands(CLI::App& app, SweepArgs& a) {
  auto* sw = app.add_subcommand("sweep", "Parameter sweeps: plan a grid or Latin hypercube of "
                                         "scenarios, run it locally or as a Slurm job array, "
                                         "resume, gather (docs/sweeps.md)");
  sw->require_subcommand(1);
  a.plan = sw->add_subcommand("plan", "Expand a sweep file into numbered points (plan.toml)");
  a.plan->add_option("sweep", a.file, "Sweep file (TOML)")->required();
  a.plan->add_option("-o,--output", a.output,
                     "Plan folder (default: beside the sweep file, "
                     "named after it)");

  a.run = sw->add_subcommand("run", "Run a shard of a plan's points (all of them by default; "
                                    "the Slurm array task's shard inside a job array); finished "
                                    "points are skipped, so running again resumes");
  a.run->add_option("plan", a.folder, "Plan folder")->required();
  a.run->add_option("--shard", a.shard, "This shard's index, 0 to --shards - 1");
  a.run->add_option("--shards", a.shards, "Number of shards")->check(CLI::Range(1, 1000000));
  a.run->add_option("--point", a.point, "Run this one point (by number)");
  a.run
      ->add_option("--workers", a.workers,
                   "Local mode: worker processes, each running one "
                   "point at a time")
      ->check(CLI::Range(1, 4096));
  a.run
      ->add_option("--threads", a.threads,
                   "OpenMP threads per point (default: "
                   "SLURM_CPUS_PER_TASK, OMP_NUM_THREADS, or all "
                   "cores shared among the workers)")
      ->check(CLI::Range(1, 4096));

  a.slurm = sw->add_subcommand("slurm", "Write the sbatch script that runs a plan as one Slurm "
                                        "job array, and submit it with --submit");
  a.slurm->add_option("plan", a.folder, "Plan folder")->required();
  a.slurm
      ->add_option("--time", a.time,
                   "Time limit per array task (Slurm notation, e.g. "
                   "02:00:00)")
      ->required();
  a.slurm->add_option("--mem", a.memory, "Memory per array task (e.g. 4G)")->required();
  a.slurm->add_option("--cpus-per-task", a.cpus, "Cores per task (OpenMP threads per point)")
      ->check(CLI::Range(1, 4096))
      ->capture_default_str();
  a.slurm->add_option("--tasks", a.tasks, "Array tasks (default: one per point)");
  a.slurm->add_option("--max-running", a.max_running, "At most this many tasks at once");
  a.slurm->add_option("--partition", a.partition, "Partition (default: the cluster's)");
  a.slurm->add_option("--account", a.account, "Account to charge");
  a.slurm->add_option("--job-name", a.job_name, "Job name (default: undertow-<sweep name>)");
  a.slurm->add_option("--sbatch", a.directives,
                      "More sbatch options, each one as written "
                      "after #SBATCH (e.g. --qos=short)");
  a.slurm->add_flag("--submit", a.submit, "Submit the script with sbatch and print the job id");
  a.slurm->add_flag("--wait", a.wait, "With --submit: wait until every task has ended");

  a.status = sw->add_subcommand("status", "Count finished, failed, interrupted and missing "
                                          "points, and list those not finished");
  a.status->add_option("plan", a.folder, "Plan folder")->required();
  a.status->add_flag("--all", a.all, "List every point");

  a.gather = sw->add_subcommand("gather", "Merge the finished points into one table (CSV, "
                                          "Markdown, LaTeX) and one HDF5 file");
  a.gather->add_option("plan", a.folder, "Plan folder")->required();
  add_figure_options(*a.gather, a.figures);
  a.gather->add_option("--sort", a.sort,
                       "Statistic to sort by: a numeric swept parameter's key path, or one of " +
                           sweep::sortable_statistics() +
                           " (default: delta_log_likelihood with a reference model, else "
                           "log_likelihood)");
  a.gather->add_option("--order", a.order, "ascending or descending (default: best first)")
      ->check(CLI::IsMember({"ascending", "descending"}));
  a.gather->add_flag("--partial", a.partial, "Gather even when points are missing or failed");
  a.gather->add_flag("--posterior", a.posterior,
                     "Require the posterior over the swept parameters: stop with nothing "
                     "written when it cannot be made (one point, mass at a grid edge)");
  a.gather
      ->add_option("--edge-mass", a.edge_mass,
                   "Refuse a posterior whose outermost grid cells hold more than this share "
                   "of its mass (default 0.05)")
      ->check(CLI::Range(0.0, 1.0));
  a.gather->add_option("-o,--output", a.output,
                       "Folder for <name>-results.* (default: the plan folder)");

  a.show = sw->add_subcommand("show", "Print one point's complete scenario");
  a.show->add_option("plan", a.folder, "Plan folder")->required();
  a.show->add_option("--point", a.point, "Point number")->required();
}

std::optional<int> run_sweep_command(const SweepArgs& a) {
  if (a.plan && a.plan->parsed()) return do_plan(a);
  if (a.run && a.run->parsed()) return do_run(a);
  if (a.slurm && a.slurm->parsed()) return do_slurm(a);
  if (a.status && a.status->parsed()) return do_status(a);
  if (a.gather && a.gather->parsed()) return do_gather(a);
  if (a.show && a.show->parsed()) return do_show(a);
  return std::nullopt;
}

} // namespace undertow::cli

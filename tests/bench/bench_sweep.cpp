// Sweep bookkeeping against the science it organises: planning, the skip check of a finished
// point (every file's digest), finishing a point (digests, finished.toml, the rename) and
// gathering, per point; and one demo-sized point (demo/spiral.toml: 100 000 gas clouds for
// 600 Myr) with its bookkeeping as a fraction of its run time. Target: under 1 %.
#include <benchmark/benchmark.h>
#include <chrono>
#include <filesystem>
#include <fstream>

#include "support/scratch.hpp"
#include "undertow/sweep/gather.hpp"
#include "undertow/sweep/plan.hpp"
#include "undertow/sweep/point_run.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {

using test::scratch;

// A sweep over `base` (relative to the source tree) with a grid of n x n points.
sweep::Plan plan_grid(const fs::path& dir, const std::string& base, int n) {
  std::string speeds, ratios;
  for (int i = 0; i < n; ++i) {
    speeds += (i ? ", " : "") + std::to_string(17 + i);
    ratios += (i ? ", " : "") + std::to_string(0.03 + 0.005 * i);
  }
  const std::string f = (dir / "sweep.toml").string();
  std::ofstream(f) << "[sweep]\nname = \"bench\"\nbase = \"" << UNDERTOW_SOURCE_DIR << "/" << base
                   << "\"\n[[parameter]]\nkey = \"galaxy.pattern[arms].pattern_speed_kms_kpc\"\n"
                   << "values = [" << speeds << "]\n[[parameter]]\n"
                   << "key = \"galaxy.pattern[arms].force_ratio\"\nvalues = [" << ratios << "]\n";
  auto p = sweep::make_plan(sweep::load_sweep_file(f), (dir / "plan").string());
  sweep::write_plan(p);
  return p;
}

void BM_sweep_plan_per_point(benchmark::State& st) {
  const fs::path dir = scratch("plan");
  for (auto _ : st)
    benchmark::DoNotOptimize(plan_grid(dir, "tests/sweep/small-spiral.toml", 10));
  st.SetItemsProcessed(st.iterations() * 100); // items/s: points planned per second
}

// A finished plan of the small test scenario (its mock catalog has ~1100 sources, like a
// demo-sized point's, so the files to check are of realistic size; orbits.h5 is removed).
const sweep::Plan& finished_plan() {
  static const sweep::Plan p = [] {
    const fs::path dir = scratch("finished");
    auto plan = plan_grid(dir, "tests/sweep/small-spiral.toml", 2);
    sweep::PointRunOptions o;
    for (const auto& q : plan.points)
      (void)sweep::run_point(plan, q, o);
    return plan;
  }();
  return p;
}

void BM_sweep_skip_check_per_point(benchmark::State& st) {
  const auto& p = finished_plan();
  for (auto _ : st)
    for (const auto& q : p.points)
      benchmark::DoNotOptimize(sweep::point_status(p, q));
  st.SetItemsProcessed(st.iterations() * std::int64_t(p.points.size()));
}

void BM_sweep_gather_per_point(benchmark::State& st) {
  const auto& p = finished_plan();
  sweep::GatherOptions g;
  g.folder = (fs::path(p.folder) / "gathered").string();
  for (auto _ : st)
    benchmark::DoNotOptimize(sweep::gather(p, g));
  st.SetItemsProcessed(st.iterations() * std::int64_t(p.points.size()));
}

// One demo-sized point, run once: its science (the whole run) against everything else the
// sweep does for it (plan, lock, skip check, digests, finished.toml, rename, gather).
void BM_sweep_demo_point(benchmark::State& st) {
  const fs::path dir = scratch("demo");
  for (auto _ : st) {
    const auto t0 = std::chrono::steady_clock::now();
    const auto plan = plan_grid(dir, "demo/spiral.toml", 1);
    const double plan_s =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    sweep::PointRunOptions o;
    const auto r = sweep::run_point(plan, plan.points[0], o);
    const auto t1 = std::chrono::steady_clock::now();
    sweep::GatherOptions g;
    (void)sweep::gather(plan, g);
    const double gather_s =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - t1).count();
    const double book = plan_s + (r.seconds - r.science_seconds) + gather_s;
    st.counters["science_s"] = r.science_seconds;
    st.counters["bookkeeping_ms"] = book * 1e3;
    st.counters["bookkeeping_percent"] = 100 * book / r.science_seconds;
    st.SetIterationTime(r.seconds + plan_s + gather_s);
  }
}

} // namespace

BENCHMARK(BM_sweep_plan_per_point)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_sweep_skip_check_per_point)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_sweep_gather_per_point)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_sweep_demo_point)->Iterations(1)->UseManualTime()->Unit(benchmark::kSecond);

BENCHMARK_MAIN();

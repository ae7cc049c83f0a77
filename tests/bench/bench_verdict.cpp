// The verdict's cost: 200 measured sources judged against 10^5 simulated young sources (k-d tree
// neighbour search at every line-of-sight node, Student-t predictions, σ_int marginalised on 12
// nodes), with the Sun's velocity fixed and marginalised (Laplace), on all threads and on one.
// Target: <= 1 s on 2 cores with the Sun marginalised.
#include <benchmark/benchmark.h>
#include <omp.h>

#include "support/velocity_field.hpp"

using namespace undertow;

namespace {

void BM_verdict(benchmark::State& st) {
  const test::VelocityField m{230, -6, 10, 8, 5};
  static const auto sim = test::realise(m, 100000, 1);
  static const auto cat = test::measure(test::realise(m, 20000, 2), 200, 3);
  auto s = test::field_settings();
  s.marginalise_sun = st.range(0) != 0;
  s.sun_velocity_cov = Eigen::Matrix3d::Identity() * 4;
  const int before = omp_get_max_threads();
  omp_set_num_threads(int(st.range(1)));
  double l = 0;
  for (auto _ : st) {
    l = compare::judge(cat, sim, s).log_likelihood;
    benchmark::DoNotOptimize(l);
  }
  omp_set_num_threads(before);
  st.counters["sources"] = double(cat.sources.size());
  st.counters["simulated"] = double(sim.x.size());
  st.counters["ln_L"] = l;
}

} // namespace

BENCHMARK(BM_verdict)
    ->ArgNames({"sun_marginalised", "threads"})
    ->Args({0, 2})
    ->Args({1, 2})
    ->Args({1, 1})
    ->Unit(benchmark::kMillisecond)
    ->UseRealTime();

BENCHMARK_MAIN();

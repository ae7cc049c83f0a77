// The kinematic fit's cost: one likelihood evaluation (distances marginalised with 64 and 128
// quadrature nodes per source) for 100, 200, 1 000 and 10 000 sources, reported as ns per source
// and per source-node, on all threads and on one; and a whole fit of 200 sources (9 free
// parameters, posterior to convergence). Uniform or disk distance prior (the disk prior's
// normalisation depends on R0 and costs a second, shorter quadrature per source). Targets: one
// evaluation of 200 sources with 128 nodes
// <= 90 µs on 2 cores, a whole fit of 200 sources <= 10 s.
#include <benchmark/benchmark.h>
#include <map>
#include <omp.h>

#include "support/kinematic_truth.hpp"
#include "undertow/fit/likelihood.hpp"

using namespace undertow;

namespace {

const residuals::Catalog& catalog(std::size_t n) {
  static std::map<std::size_t, residuals::Catalog> cache;
  auto it = cache.find(n);
  if (it == cache.end())
    it = cache.emplace(n, fit::simulate_catalog(test::standard_truth(n, 3))).first;
  return it->second;
}

void BM_likelihood(benchmark::State& st) {
  const std::size_t n = std::size_t(st.range(0));
  const int nodes = int(st.range(1)), threads = int(st.range(2));
  auto t = test::standard_truth(n, 3);
  t.model.nodes = nodes;
  if (st.range(3) == 0) t.model.prior.kind = fit::DistancePrior::Kind::uniform;
  const fit::Likelihood L(catalog(n), t.model, {});
  const int before = omp_get_max_threads();
  omp_set_num_threads(threads);
  for (auto _ : st)
    benchmark::DoNotOptimize(L(t.params));
  omp_set_num_threads(before);
  st.counters["sources"] = double(n);
  st.counters["ns_per_source"] = benchmark::Counter(
      double(n), benchmark::Counter::kIsIterationInvariantRate | benchmark::Counter::kInvert);
  st.counters["ns_per_node"] =
      benchmark::Counter(double(n) * nodes, benchmark::Counter::kIsIterationInvariantRate |
                                                benchmark::Counter::kInvert);
}

void BM_whole_fit_200(benchmark::State& st) {
  const auto t = test::standard_truth(200, 3);
  const auto s = test::standard_spec(t, 12.24);
  const fit::Likelihood L(catalog(200), s.model, {});
  for (auto _ : st) {
    const auto r = fit::run_fit(s, L);
    st.counters["steps"] = double(r.steps);
    st.counters["tau_max"] = r.diag.tau_max;
    st.counters["converged"] = r.converged;
    st.counters["free"] = double(r.free.size());
  }
}

} // namespace

BENCHMARK(BM_likelihood)
    ->ArgsProduct({{100, 200, 1000, 10000}, {64, 128}, {1, 2}, {0, 1}})
    ->ArgNames({"sources", "nodes", "threads", "disk_prior"})
    ->UseRealTime()
    ->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_whole_fit_200)->Unit(benchmark::kSecond)->Iterations(1)->UseRealTime();
BENCHMARK_MAIN();

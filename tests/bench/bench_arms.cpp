// The arm fit's cost: one likelihood evaluation of a 30-source segment (distances marginalised
// on the sight-line grids), and the target, fitting ten segments of 30 sources each to
// convergence with distance marginalisation: <= 10 s on 2 cores. The segments are simulated from
// the tests' arm truth (tests/arms/arm_truth.hpp) with maser-like parallax errors of 0.012 mas or
// 20 % fractional errors, alternately. Run: build/tests/bench/bench_arms
#include <benchmark/benchmark.h>
#include <omp.h>

#include "arms/arm_truth.hpp"

using namespace undertow;

namespace {

struct Segment {
  residuals::Catalog catalog;
  fit::Geometry geometry;
  arms::SightLines lines;
  double psi = 0;
};

const std::vector<Segment>& segments() {
  static const std::vector<Segment> all = [] {
    std::vector<Segment> v;
    for (int k = 0; k < 10; ++k) {
      auto t = test::arm_truth(8 + 2 * k, 0.2, 30, 900 + std::uint64_t(k));
      if (k % 2) {
        t.errors.kind = observe::ErrorModel::Kind::fractional;
        t.errors.parallax_fraction = 0.2;
      }
      Segment s{fit::simulate_catalog(t), test::arm_geometry(t), test::arm_sight_lines(t), 0};
      s.psi = arms::reference_azimuth(s.catalog.sources, s.geometry);
      v.push_back(std::move(s));
    }
    return v;
  }();
  return all;
}

void BM_segment_likelihood(benchmark::State& st) {
  const auto& s = segments()[std::size_t(st.range(0))];
  const arms::SegmentLikelihood L(s.catalog.sources, s.geometry, s.psi, s.lines);
  double p = 14;
  for (auto _ : st) {
    benchmark::DoNotOptimize(L(p, std::log(9.4), 0.2));
    p = p == 14 ? 14.01 : 14; // no caching between calls
  }
  st.counters["nodes"] = double(L.nodes());
  st.counters["ns_per_node"] =
      benchmark::Counter(double(L.nodes()) * double(st.iterations()),
                         benchmark::Counter::kIsRate | benchmark::Counter::kInvert);
}

void BM_ten_segments(benchmark::State& st) {
  const auto& all = segments();
  for (auto _ : st) {
    std::vector<arms::SegmentResult> out(all.size());
#pragma omp parallel for schedule(dynamic, 1)
    for (std::size_t k = 0; k < all.size(); ++k) {
      const auto& s = all[k];
      const arms::SegmentLikelihood L(s.catalog.sources, s.geometry, s.psi, s.lines);
      arms::SegmentSampling sm;
      sm.seed = 40 + k;
      out[k] = arms::fit_segment({&L}, {}, sm, arms::SegmentMethod::marginalised, "s");
    }
    double steps = 0;
    for (const auto& r : out)
      steps += double(r.steps);
    st.counters["mean_steps"] = steps / double(out.size());
  }
  st.counters["threads"] = omp_get_max_threads();
}

} // namespace

BENCHMARK(BM_segment_likelihood)->Arg(0)->Arg(1)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_ten_segments)->Iterations(1)->Unit(benchmark::kSecond)->UseRealTime();
BENCHMARK_MAIN();

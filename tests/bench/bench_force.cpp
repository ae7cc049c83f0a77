// Nanoseconds per force evaluation of the demo galaxy (bulge + disk + halo, with and without
// its spiral), over batches of 4096 structure-of-arrays positions, against the plain
// one-position-at-a-time loop. One core. Run: build/tests/bench/bench_force
#include <benchmark/benchmark.h>

#include <random>
#include <vector>

#include "undertow/potential/model_file.hpp"

namespace {

using undertow::potential::Model;

Model demo(bool spiral) {
  Model m = undertow::potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) +
                                                 "/potentials/kestrel.toml");
  if (!spiral) m.patterns.clear();
  return m;
}

struct Batch {
  std::vector<double> x, y, z, ax, ay, az;
  explicit Batch(std::size_t n) : ax(n), ay(n), az(n) {
    std::mt19937_64 rng(42);
    std::uniform_real_distribution<double> R(1, 16), phi(0, 6.283185307179586), h(-0.5, 0.5);
    for (std::size_t i = 0; i < n; ++i) {
      const double r = R(rng), a = phi(rng);
      x.push_back(r * std::cos(a));
      y.push_back(r * std::sin(a));
      z.push_back(h(rng));
    }
  }
};

constexpr std::size_t kN = 4096;
constexpr double kT = 1000; // Myr: the spiral has fully grown

void per_eval(benchmark::State& state) {
  state.SetItemsProcessed(int64_t(state.iterations()) * int64_t(kN));
  // seconds per evaluation, printed with an SI prefix ("3.4n" is 3.4 ns)
  state.counters["per_eval"] = benchmark::Counter(
      double(kN), benchmark::Counter::kIsIterationInvariantRate | benchmark::Counter::kInvert);
}

void batched(benchmark::State& state, bool spiral) {
  const Model m = demo(spiral);
  Batch b(kN);
  for (auto _ : state) {
    m.accelerations(b.x, b.y, b.z, kT, b.ax, b.ay, b.az);
    benchmark::DoNotOptimize(b.ax.data());
    benchmark::ClobberMemory();
  }
  per_eval(state);
}

void pointwise(benchmark::State& state, bool spiral) {
  const Model m = demo(spiral);
  Batch b(kN);
  for (auto _ : state) {
    for (std::size_t i = 0; i < kN; ++i) {
      const auto a = m.acceleration_pointwise({b.x[i], b.y[i], b.z[i]}, kT);
      b.ax[i] = a[0];
      b.ay[i] = a[1];
      b.az[i] = a[2];
    }
    benchmark::DoNotOptimize(b.ax.data());
    benchmark::ClobberMemory();
  }
  per_eval(state);
}

void BM_axisymmetric_batch4096(benchmark::State& s) {
  batched(s, false);
}
void BM_spiral_batch4096(benchmark::State& s) {
  batched(s, true);
}
void BM_axisymmetric_pointwise(benchmark::State& s) {
  pointwise(s, false);
}
void BM_spiral_pointwise(benchmark::State& s) {
  pointwise(s, true);
}

} // namespace

BENCHMARK(BM_axisymmetric_batch4096);
BENCHMARK(BM_spiral_batch4096);
BENCHMARK(BM_axisymmetric_pointwise);
BENCHMARK(BM_spiral_pointwise);
BENCHMARK_MAIN();

// The cloud gas's cost: the collision search per cloud-step, and a whole gas step (collisions,
// stirring, star formation, one leapfrog step) for 10^5 and 10^6 clouds in the demo's truth
// galaxy (strong four-armed spiral), with the cloud radius scaled so that each cloud collides as
// often as in the demo (100 000 clouds of 0.015 kpc). The target, 10^6 clouds for 1 Gyr
// at 0.5 Myr steps, is BM_gas_full_1gyr/1000000 (about 2000 steps; run it on its own:
// --benchmark_filter=full; /100000 is the same run ten times smaller). Figures: clouds x steps per
// second, and ns per cloud-step. Run: build/tests/bench/bench_gas
#include <benchmark/benchmark.h>
#include <cmath>
#include <omp.h>

#include "undertow/gas/cloud_gas.hpp"
#include "undertow/gas/gas_orbits.hpp"
#include "undertow/orbit/integrator.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/tracers/disk_population.hpp"

namespace {

using namespace undertow;

struct Setup {
  potential::Model model;
  gas::GasSettings gas;
  gas::CircularFlow flow;
  gas::GasState state;
  orbit::IntegrationSettings orbit;
};

void step(Setup& s, std::size_t k);

// The demo's gas, with n clouds; warmed up for 20 Myr so that stars exist and clouds are mixed.
Setup setup(std::size_t n) {
  Setup s;
  s.model =
      potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/demo/truth/galaxy.toml");
  tracers::DiskPopulation d;
  d.count = n;
  d.scale_length_kpc = 5, d.r_min_kpc = 4, d.r_max_kpc = 13;
  d.scale_height_kpc = 0.03, d.sigma_r_kms = 5, d.sigma_z_kms = 3;
  s.gas.collisions.radius_kpc = 0.015 * std::sqrt(1e5 / double(n));
  s.gas.collisions.extent_kpc = 20;
  s.gas.stirring_kms = 0.5;
  gas::StarFormation sf;
  sf.efficiency = 0.5;
  s.gas.stars = sf;
  s.flow = gas::CircularFlow(s.model, 30);
  s.state = gas::GasState::of_clouds(tracers::sample(s.model, d, 5, 0, n), 0);
  s.orbit.method = orbit::Method::leapfrog;
  s.orbit.step_myr = 0.5;
  for (std::size_t k = 0; k < 40; ++k)
    step(s, k);
  return s;
}

// Step k of 2 000 000 from t = 0 at 0.5 Myr, the way a run steps (gas_orbits.hpp).
void step(Setup& s, std::size_t k) {
  gas::StepReport r;
  gas::advance_gas_step(s.model, s.state, s.gas, s.flow, s.orbit, 0, 1e6, k, 2000000, 5, r);
}

void BM_collision_search(benchmark::State& st) {
  auto s = setup(std::size_t(st.range(0)));
  std::size_t tested = 0;
  for (auto _ : st) {
    st.PauseTiming();
    auto p = s.state.p; // the same clouds each time
    st.ResumeTiming();
    const auto pass = gas::collide_pairs(p, s.gas.collisions, 0.5, s.flow, s.state.clouds);
    tested += pass.candidate_pairs;
    benchmark::DoNotOptimize(pass.collisions);
  }
  const double cloud_steps = double(st.iterations()) * double(s.state.clouds);
  st.counters["cloud_steps/s"] = benchmark::Counter(cloud_steps, benchmark::Counter::kIsRate);
  st.counters["pairs_tested/cloud"] = double(tested) / cloud_steps;
}

void BM_gas_step(benchmark::State& st) {
  auto s = setup(std::size_t(st.range(0)));
  std::size_t k = 40;
  for (auto _ : st)
    step(s, k++);
  const double cloud_steps = double(st.iterations()) * double(s.state.clouds);
  st.counters["cloud_steps/s"] = benchmark::Counter(cloud_steps, benchmark::Counter::kIsRate);
  st.counters["stars"] = double(s.state.stars());
}

// Arguments: clouds, and the stars' steps per gas step (StarFormation::step_ratio).
void BM_gas_full_1gyr(benchmark::State& st) {
  for (auto _ : st) {
    auto s = setup(std::size_t(st.range(0)));
    s.gas.stars->step_ratio = int(st.range(1));
    for (std::size_t k = 40; k < 2000; ++k)
      step(s, k);
    st.counters["stars_at_end"] = double(s.state.stars());
  }
}

} // namespace

BENCHMARK(BM_collision_search)
    ->Arg(100000)
    ->Arg(1000000)
    ->Unit(benchmark::kMillisecond)
    ->UseRealTime();
BENCHMARK(BM_gas_step)->Arg(100000)->Arg(1000000)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_gas_full_1gyr)
    ->Args({100000, 1})
    ->Args({100000, 2})
    ->Args({1000000, 1})
    ->Args({1000000, 2})
    ->Iterations(1)
    ->Unit(benchmark::kSecond)
    ->UseRealTime();
BENCHMARK_MAIN();

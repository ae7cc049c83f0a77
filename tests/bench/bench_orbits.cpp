// Orbit integration speed: orbit-steps per second per core for a 4096-tracer leapfrog batch in
// the demo galaxy with and without its spiral; OpenMP speed-up on 2 threads; memory per million
// tracers; accuracy per cost of the best ensemble method against GSL's rk8pd.
// Run: build/tests/bench/bench_orbits  (the 10^10-step run: --benchmark_filter=full)
#include <benchmark/benchmark.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include <omp.h>

#include <cmath>
#include <fstream>
#include <string>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/orbit/conserved.hpp"
#include "undertow/orbit/integrator.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/tracers/disk_population.hpp"

namespace {

using namespace undertow;

potential::Model demo(bool spiral) {
  auto m =
      potential::load_model_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/kestrel.toml");
  if (!spiral) m.patterns.clear();
  return m;
}

orbit::PhaseSpace disk(const potential::Model& m, std::size_t n) {
  tracers::DiskPopulation d;
  d.count = n;
  d.r_min_kpc = 4;
  d.r_max_kpc = 14;
  d.sigma_r_kms = 10;
  d.sigma_z_kms = 5;
  return tracers::sample(m, d, 1, 0, n);
}

void steps_per_core(benchmark::State& st, bool spiral) {
  omp_set_num_threads(1);
  const auto m = demo(spiral);
  auto p = disk(m, 4096);
  orbit::IntegrationSettings s;
  s.method = orbit::Method::leapfrog;
  s.step_myr = 0.1;
  double t = 1000; // after the growth
  const int steps = 100;
  for (auto _ : st) {
    orbit::advance(m, p, t, t + steps * 0.1, s);
    t += steps * 0.1;
  }
  st.counters["orbit_steps_per_s"] =
      benchmark::Counter(4096.0 * steps, benchmark::Counter::kIsIterationInvariantRate);
}
void BM_leapfrog_axisymmetric_4096(benchmark::State& st) {
  steps_per_core(st, false);
}
void BM_leapfrog_spiral_4096(benchmark::State& st) {
  steps_per_core(st, true);
}

// The same ensemble on 1 and 2 threads: the ratio of the two rates is the speed-up.
void BM_leapfrog_spiral_threads(benchmark::State& st) {
  const int threads = int(st.range(0));
  omp_set_num_threads(threads);
  const auto m = demo(true);
  auto p = disk(m, 65536);
  orbit::IntegrationSettings s;
  s.method = orbit::Method::leapfrog;
  s.step_myr = 0.1;
  double t = 1000;
  for (auto _ : st) {
    orbit::advance(m, p, t, t + 2.0, s);
    t += 2.0;
  }
  st.counters["orbit_steps_per_s"] =
      benchmark::Counter(65536.0 * 20, benchmark::Counter::kIsIterationInvariantRate);
  omp_set_num_threads(2);
}

long peak_rss_kib() {
  std::ifstream in("/proc/self/status");
  std::string k;
  long v = 0;
  while (in >> k) {
    if (k == "VmHWM:") {
      in >> v;
      return v;
    }
    in.ignore(1 << 20, '\n');
  }
  return 0;
}

// Peak resident memory added by one million tracers and their integration (no snapshot buffers).
void BM_memory_per_million(benchmark::State& st) {
  const auto m = demo(true);
  for (auto _ : st) {
    const long before = peak_rss_kib();
    auto p = disk(m, 1000000);
    orbit::IntegrationSettings s;
    s.step_myr = 0.1;
    orbit::advance(m, p, 1000, 1000.5, s);
    st.counters["peak_MB_per_million"] = double(peak_rss_kib() - before) / 1024.0;
    benchmark::DoNotOptimize(p.x.data());
  }
}

// 10^10 orbit-steps: a million tracers for 1 Gyr at 0.1 Myr with the spiral, both cores.
void BM_full_million_tracers_1gyr(benchmark::State& st) {
  omp_set_num_threads(2);
  const auto m = demo(true);
  for (auto _ : st) {
    st.PauseTiming();
    auto p = disk(m, 1000000);
    orbit::IntegrationSettings s;
    s.step_myr = 0.1;
    st.ResumeTiming();
    orbit::advance(m, p, 0, 1000, s);
    benchmark::DoNotOptimize(p.x.data());
  }
  st.counters["orbit_steps_per_s"] =
      benchmark::Counter(1e10, benchmark::Counter::kIsIterationInvariantRate);
}

// Accuracy per cost. A disk orbit, 1 Gyr, static model: GSL rk8pd at eps = 1e-10 against the
// batched 4th-order McLachlan stepper at the largest step that keeps |dE/E| <= 1e-10.
struct GslModel {
  const potential::Model* m;
};
int gsl_rhs(double, const double y[], double f[], void* params) {
  const auto* g = static_cast<const GslModel*>(params);
  const auto a = g->m->acceleration_pointwise({y[0], y[1], y[2]}, 0.0);
  for (int k = 0; k < 3; ++k)
    f[k] = y[3 + k], f[3 + k] = a[k];
  return GSL_SUCCESS;
}
orbit::PhaseSpace disk_orbit(const potential::Model& m, std::size_t n) {
  orbit::PhaseSpace p;
  p.resize(n);
  const double vc = dynamics::circular_speed(m, 8.1);
  for (std::size_t i = 0; i < n; ++i) {
    const double a = 0.001 * double(i);
    p.id[i] = i;
    p.x[i] = -8.1 * std::cos(a), p.y[i] = 8.1 * std::sin(a), p.z[i] = 0.05;
    p.vx[i] = 25 * std::cos(a) + (vc - 15) * std::sin(a), p.vy[i] = (vc - 15) * std::cos(a),
    p.vz[i] = 10;
  }
  return p;
}
void BM_gsl_rk8pd_1gyr(benchmark::State& st) {
  const auto m = demo(false);
  GslModel gm{&m};
  gsl_odeiv2_system sys{gsl_rhs, nullptr, 6, &gm};
  const auto p0 = disk_orbit(m, 1);
  const double T = 1000 / units::time_unit_myr;
  double err = 0;
  for (auto _ : st) {
    gsl_odeiv2_driver* d =
        gsl_odeiv2_driver_alloc_y_new(&sys, gsl_odeiv2_step_rk8pd, 1e-3, 1e-10, 1e-10);
    double y[6] = {p0.x[0], p0.y[0], p0.z[0], p0.vx[0], p0.vy[0], p0.vz[0]}, t = 0;
    gsl_odeiv2_driver_apply(d, &t, T, y);
    gsl_odeiv2_driver_free(d);
    orbit::PhaseSpace q = p0;
    q.x[0] = y[0], q.y[0] = y[1], q.z[0] = y[2], q.vx[0] = y[3], q.vy[0] = y[4], q.vz[0] = y[5];
    const orbit::Invariant inv{orbit::Invariant::Kind::energy, 0, {}};
    err = std::fabs(orbit::evaluate(inv, m, q, 0)[0] / orbit::evaluate(inv, m, p0, 0)[0] - 1);
  }
  st.counters["orbits_per_s"] =
      benchmark::Counter(1, benchmark::Counter::kIsIterationInvariantRate);
  st.counters["energy_error"] = err;
}
void BM_symplectic4_batch_1gyr(benchmark::State& st) {
  omp_set_num_threads(1);
  const auto m = demo(false);
  const std::size_t n = 4096;
  const auto p0 = disk_orbit(m, n);
  orbit::IntegrationSettings s;
  s.method = orbit::Method::symplectic4;
  s.step_myr = double(st.range(0)) / 10.0;
  double err = 0;
  for (auto _ : st) {
    auto p = p0;
    orbit::advance(m, p, 0, 1000, s);
    const orbit::Invariant inv{orbit::Invariant::Kind::energy, 0, {}};
    const auto r =
        orbit::relative_errors(orbit::evaluate(inv, m, p0, 0), orbit::evaluate(inv, m, p, 1000));
    err = *std::max_element(r.begin(), r.end());
  }
  st.counters["orbits_per_s"] =
      benchmark::Counter(double(n), benchmark::Counter::kIsIterationInvariantRate);
  st.counters["max_energy_error"] = err;
  st.counters["step_myr"] = s.step_myr;
  omp_set_num_threads(2);
}

} // namespace

BENCHMARK(BM_leapfrog_axisymmetric_4096)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_leapfrog_spiral_4096)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_leapfrog_spiral_threads)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_memory_per_million)->Iterations(1)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_gsl_rk8pd_1gyr)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_symplectic4_batch_1gyr)->Arg(5)->Arg(10)->Arg(20)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_full_million_tracers_1gyr)->Iterations(1)->Unit(benchmark::kSecond)->UseRealTime();
BENCHMARK_MAIN();

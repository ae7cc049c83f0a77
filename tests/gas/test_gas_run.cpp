// The cloud gas inside a run: a smooth disk settles at a molecular-cloud dispersion from a cold
// and from a hot start, stars carry their birth records, an interrupted gas run resumes to the
// same bits, a vanishing cloud radius gives the collisionless run's bits, and bad [gas] keys
// stop with one line naming the key.
#include <atomic>
#include <catch2/catch.hpp>
#include <cmath>
#include <filesystem>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/io/snapshot.hpp"
#include "undertow/run/ensemble.hpp"
#include "undertow/scenario/scenario.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {
std::string smooth_disk(std::size_t count, double sigma_r, double sigma_z, double end_myr,
                        const std::string& gas) {
  return R"([run]
name = "smooth-gas"
seed = 31
[galaxy]
model_file = ")" +
         std::string(UNDERTOW_SOURCE_DIR) +
         R"(/potentials/kestrel-axisymmetric.toml"
[tracers]
source = "disk"
count = )" +
         std::to_string(count) +
         R"(
scale_length_kpc = 5.0
r_min_kpc = 4.0
r_max_kpc = 13.0
scale_height_kpc = 0.03
sigma_r_kms = )" +
         std::to_string(sigma_r) + "\nsigma_z_kms = " + std::to_string(sigma_z) + "\n" + gas + R"(
[integration]
method = "leapfrog"
end_myr = )" +
         std::to_string(end_myr) +
         R"(
step_myr = 0.5
[output]
every_myr = 100
)";
}

fs::path work(const std::string& name) {
  const fs::path d = fs::temp_directory_path() / ("undertow-gas-" + name);
  fs::remove_all(d);
  fs::create_directories(d);
  return d;
}

struct Dispersions {
  double r = 0, phi = 0, z = 0;
  double one_d() const { return std::sqrt((r * r + phi * phi + z * z) / 3); }
};
// Of the clouds at 6-10 kpc, about the mean rotation in 0.5 kpc rings.
Dispersions cloud_dispersions(const io::Snapshot& s) {
  const auto& p = s.tracers;
  double sr = 0, sz = 0, sp = 0;
  std::size_t n = 0;
  for (int ring = 0; ring < 8; ++ring) {
    const double lo = 6 + 0.5 * ring, hi = lo + 0.5;
    std::vector<double> vr, vp, vz;
    for (std::size_t i = 0; i < p.size(); ++i) {
      if (s.flags[i] & io::kFlagStar) continue;
      const double R = std::hypot(p.x[i], p.y[i]);
      if (R < lo || R >= hi) continue;
      vr.push_back((p.vx[i] * p.x[i] + p.vy[i] * p.y[i]) / R);
      vp.push_back((p.vx[i] * p.y[i] - p.vy[i] * p.x[i]) / R);
      vz.push_back(p.vz[i]);
    }
    double mp = 0;
    for (double v : vp)
      mp += v;
    mp /= double(vp.size());
    for (std::size_t k = 0; k < vr.size(); ++k)
      sr += vr[k] * vr[k], sp += (vp[k] - mp) * (vp[k] - mp), sz += vz[k] * vz[k];
    n += vr.size();
  }
  return {std::sqrt(sr / double(n)), std::sqrt(sp / double(n)), std::sqrt(sz / double(n))};
}

// The demo's clouds (100 000, radius 0.015 kpc) as 20 000 of radius 0.015 sqrt(5): the same
// collision rate n sigma v.
const std::string kGas = R"([gas]
cloud_radius_kpc = 0.0335
stirring_kms = 0.5
[gas.stars]
threshold_kms = 5
efficiency = 0.5
)";
} // namespace

TEST_CASE("Gas runs: a smooth disk settles at a molecular-cloud dispersion of 5-10 km/s (common "
          "practice) from a cold and from a hot start, with the epicyclic ratio "
          "sigma_phi / sigma_R = kappa / (2 Omega) (Binney & Tremaine 2008, eq. 3.100)",
          "[gas][gas-run]") {
  const auto d = work("settle");
  Dispersions end[2];
  const double start[2][2] = {{2, 1.5}, {15, 10}};
  for (int k = 0; k < 2; ++k) {
    const auto sc = scenario::parse_scenario(
        smooth_disk(20000, start[k][0], start[k][1], 400, kGas), (d / "s.toml").string());
    run::EnsembleOptions o;
    o.output = (d / ("s" + std::to_string(k) + ".h5")).string();
    REQUIRE(run::run_ensemble(sc, o).complete);
    const io::SnapshotReader rd(o.output);
    const auto first = cloud_dispersions(rd.read(0));
    end[k] = cloud_dispersions(rd.read(rd.count() - 1));
    INFO("start " << first.r << " " << first.phi << " " << first.z << ", end " << end[k].r << " "
                  << end[k].phi << " " << end[k].z);
    CHECK(end[k].one_d() > 5);
    CHECK(end[k].one_d() < 10);
    const double ratio =
        dynamics::kappa(sc.model, 8) / (2 * dynamics::omega(sc.model, 8)); // epicycle theory
    CHECK(end[k].phi / end[k].r == Approx(ratio).epsilon(0.1));
  }
  // from starts 7.5 times apart, within 25 % of each other after 400 Myr
  CHECK(end[1].one_d() / end[0].one_d() < 1.25);
  CHECK(end[1].one_d() / end[0].one_d() > 0.95);
}

TEST_CASE("Gas runs: stars carry birth time, birth position and parents, and an interrupted gas "
          "run resumes to the same bits",
          "[gas][gas-run]") {
  const auto d = work("resume");
  const auto sc =
      scenario::parse_scenario(smooth_disk(5000, 6, 4, 300, kGas), (d / "s.toml").string());
  run::EnsembleOptions whole;
  whole.output = (d / "whole.h5").string();
  const auto r = run::run_ensemble(sc, whole);
  REQUIRE(r.complete);
  CHECK(r.stars_formed > 100);
  const io::SnapshotReader rd(whole.output);
  const auto last = rd.read(rd.count() - 1);
  REQUIRE(last.birth_position.size() == 3 * last.tracers.size());
  std::size_t stars = 0;
  for (std::size_t i = 0; i < last.tracers.size(); ++i) {
    if (!(last.flags[i] & io::kFlagStar)) {
      CHECK(last.parents[2 * i] == 0);
      continue;
    }
    ++stars;
    const double age = last.time_myr - last.birth_time_myr[i];
    CHECK(age >= 0);
    CHECK(age <= 100.5); // retired after max_age_myr
    CHECK(last.parents[2 * i] < last.parents[2 * i + 1]);
    CHECK(last.parents[2 * i + 1] < 5000); // clouds' ids
    CHECK(last.tracers.id[i] >= 5000);
    const double bR = std::hypot(last.birth_position[3 * i], last.birth_position[3 * i + 1]);
    CHECK(bR > 3);
  }
  CHECK(stars == r.stars);

  std::atomic<bool> stop{false};
  run::EnsembleOptions cut;
  cut.output = (d / "cut.h5").string();
  cut.stop = &stop;
  cut.on_snapshot = [&](double t) {
    if (t >= 200) stop = true;
  };
  CHECK_FALSE(run::run_ensemble(sc, cut).complete);
  stop = false;
  cut.on_snapshot = {};
  REQUIRE(run::run_ensemble(sc, cut).complete);
  const io::SnapshotReader a(whole.output), b(cut.output);
  REQUIRE(a.count() == b.count());
  for (std::size_t i = 0; i < a.count(); ++i) {
    const auto sa = a.read(i), sb = b.read(i);
    CHECK(sa.tracers.id == sb.tracers.id);
    CHECK(sa.tracers.x == sb.tracers.x);
    CHECK(sa.tracers.vy == sb.tracers.vy);
    CHECK(sa.birth_time_myr == sb.birth_time_myr);
    CHECK(sa.parents == sb.parents);
  }
}

TEST_CASE("Gas runs: with a vanishing cloud radius, no stirring and no stars the clouds are "
          "the collisionless run's tracers, bit for bit (a time-independent model)",
          "[gas][gas-run]") {
  const auto d = work("radius0");
  const auto plain =
      scenario::parse_scenario(smooth_disk(3000, 6, 4, 100, ""), (d / "a.toml").string());
  const auto gas = scenario::parse_scenario(
      smooth_disk(3000, 6, 4, 100, "[gas]\ncloud_radius_kpc = 1e-12\nstirring_kms = 0\n"),
      (d / "b.toml").string());
  run::EnsembleOptions a, b;
  a.output = (d / "a.h5").string();
  b.output = (d / "b.h5").string();
  REQUIRE(run::run_ensemble(plain, a).complete);
  REQUIRE(run::run_ensemble(gas, b).complete);
  const auto sa = io::SnapshotReader(a.output).read(1), sb = io::SnapshotReader(b.output).read(1);
  CHECK(sa.tracers.x == sb.tracers.x);
  CHECK(sa.tracers.vz == sb.tracers.vz);
}

TEST_CASE("Gas runs: a negative cloud radius, a restitution outside 0-1, a negative "
          "stirring or an efficiency outside 0-1 is one error naming the key",
          "[gas][gas-run]") {
  const std::pair<std::string, std::string> bad[] = {
      {"[gas]\ncloud_radius_kpc = -0.01\n", "cloud_radius_kpc"},
      {"[gas]\nnormal_restitution = 1.5\n", "normal_restitution"},
      {"[gas]\ntangential_restitution = -0.1\n", "tangential_restitution"},
      {"[gas]\nstirring_kms = -1\n", "stirring_kms"},
      {"[gas]\n[gas.stars]\nefficiency = 0\n", "efficiency"},
      {"[gas]\n[gas.stars]\nage_max_myr = 0\n", "age_max_myr"},
      {"[gas]\ncell_kpc = 0.2\n", "cell_kpc"},
      {"[gas]\n[gas.stars]\nstep_ratio = 0\n", "step_ratio"},
      {"[gas]\n[gas.stars]\nstep_ratio = 1.5\n", "step_ratio"},
  };
  for (const auto& [text, key] : bad) {
    INFO(text);
    CHECK_THROWS_WITH(scenario::parse_scenario(smooth_disk(100, 5, 3, 10, text), "bad.toml"),
                      Catch::Contains(key));
  }
  // longer star steps are the leapfrog's; another fixed-step method says so
  auto other = smooth_disk(100, 5, 3, 10, "[gas]\n[gas.stars]\nstep_ratio = 2\n");
  other.replace(other.find("\"leapfrog\""), 10, "\"symplectic4\"");
  CHECK_THROWS_WITH(scenario::parse_scenario(other, "bad.toml"),
                    Catch::Contains("step_ratio") && Catch::Contains("leapfrog"));
  other.replace(other.find("step_ratio = 2"), 14, "step_ratio = 1");
  CHECK(scenario::parse_scenario(other, "ok.toml").gas->stars->step_ratio == 1);
  other.replace(other.find("step_ratio = 1"), 14, "");
  CHECK(scenario::parse_scenario(other, "ok.toml").gas->stars->step_ratio == 1);
}

// The number of arms from fitted segments (arms/arm_count.hpp), by injection and recovery:
// segments of two- and four-armed patterns (arms/spiral_geometry.hpp gives where each lies)
// measured with Gaussian errors of a typical segment fit, 40 sets each. Closed-form checks:
// a single spacing is matched by any m with the right m tan p, so the pitch decides.
#include <catch2/catch.hpp>

#include <cmath>
#include <iostream>

#include "undertow/arms/arm_count.hpp"
#include "undertow/arms/spiral_geometry.hpp"
#include "undertow/tracers/random.hpp"

using namespace undertow;

namespace {

struct Placed {
  int arm;    // arm index k (ln R at ψ = 0 is ln R_a − kΔ)
  double psi; // reference azimuth, rad
};

std::vector<arms::SegmentSummary> measure(int m, double pitch_deg, double r_a,
                                          const std::vector<Placed>& where, double sl, double sp,
                                          tracers::TracerStream& rng) {
  std::vector<arms::SegmentSummary> v;
  const double t = std::tan(pitch_deg * units::deg), delta = arms::arm_spacing(m, pitch_deg);
  int i = 0;
  for (const auto& w : where) {
    arms::SegmentSummary s;
    s.group = "s" + std::to_string(i++);
    s.psi_ref_rad = w.psi;
    s.ln_radius =
        arms::arm_ln_radius(w.psi, 0, std::log(r_a) - w.arm * delta, t) + sl * rng.normal();
    s.pitch_rad = pitch_deg * units::deg + sp * rng.normal();
    s.cov = {sl * sl, 0, sp * sp};
    v.push_back(s);
  }
  return v;
}

} // namespace

TEST_CASE("arms: the number of arms is recovered from segments of 2- and 4-armed patterns",
          "[arms]") {
  struct Case {
    int m;
    double pitch;
    std::vector<Placed> where;
  };
  // four segments each, on three or four different arms, at different azimuths
  const std::vector<Case> cases{
      {4, 13, {{-1, 0.15}, {0, 0.05}, {1, -0.1}, {2, 0.25}}},
      {2, 7, {{-1, 0.1}, {0, -0.05}, {0, 0.6}, {1, 0.2}}},
  };
  const double sl = 0.012, sp = 1.2 * units::deg; // ~1 % in R and 1.2 deg: a 30-source segment
  arms::ArmCountSettings s;
  s.phase_nodes = 128, s.pitch_nodes = 300;
  for (const auto& c : cases) {
    tracers::TracerStream rng(11, std::uint64_t(c.m), 0xa7);
    int right = 0, same_arm_found = 0, same_arm_pairs = 0;
    const int trials = 40;
    for (int k = 0; k < trials; ++k) {
      const auto seg = measure(c.m, c.pitch, 9.0, c.where, sl, sp, rng);
      const auto r = arms::count_arms(seg, s);
      right += r.best_m == c.m;
      // segments on the first segment's arm (modulo m) are recognised as such
      if (r.best_m == c.m)
        for (std::size_t j = 1; j < seg.size(); ++j)
          if (((c.where[j].arm - c.where[0].arm) % c.m + c.m) % c.m == 0)
            ++same_arm_pairs, same_arm_found += r.same_arm_as_first[j] > 0.5;
    }
    std::cout << c.m << " arms of " << c.pitch << " deg: m recovered in " << right << " of "
              << trials << "\n";
    CHECK(right >= int(0.85 * trials));
    CHECK(same_arm_found == same_arm_pairs);
  }
}

TEST_CASE("arms: one segment's worth of spacing fits every m with the right m tan p", "[arms]") {
  // two segments on neighbouring arms of a 4-armed pattern of 13 deg, measured exactly but with
  // pitches too uncertain to tell 2, 4 or 8 arms apart (σ_p = 15 deg): no m is preferred strongly
  std::vector<arms::SegmentSummary> seg(2);
  const double d = arms::arm_spacing(4, 13);
  for (int j = 0; j < 2; ++j) {
    seg[std::size_t(j)].group = "s";
    seg[std::size_t(j)].psi_ref_rad = 0;
    seg[std::size_t(j)].ln_radius = std::log(9.0) - j * d;
    seg[std::size_t(j)].pitch_rad = 13 * units::deg;
    seg[std::size_t(j)].cov = {1e-4, 0, std::pow(15 * units::deg, 2)};
  }
  arms::ArmCountSettings s;
  const auto r = arms::count_arms(seg, s);
  CHECK(r.ln_bayes_factor_next < std::log(3.0)); // the data cannot tell them apart
  // with the pitch measured well (1 deg), four arms win
  for (auto& x : seg)
    x.cov[2] = std::pow(1 * units::deg, 2);
  const auto r2 = arms::count_arms(seg, s);
  CHECK(r2.best_m == 4);
  CHECK(r2.pitch_deg.median == Approx(13).margin(0.5));
}

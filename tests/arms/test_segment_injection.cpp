// Injection and recovery of the arm-segment fit over many catalogs simulated by the mock
// observation from a known arm (tests/arms/arm_truth.hpp): pulls of the pitch, the radius and the
// width with mean 0 and dispersion 1, 68 % intervals that cover the truth 68 % of the time
// (the definition of a calibrated interval, with the binomial error of the coverage), intervals
// that shrink as 1/√N, and the naive 1/ϖ fit's bias at 20 % parallax errors beside the
// marginalised fit's absence of it. Hidden from the default Catch2 run; ctest runs it as
// arms.injection.
#include <catch2/catch.hpp>

#include <cmath>
#include <iostream>

#include "arms/arm_truth.hpp"
#include "support/sample_moments.hpp"
#include "undertow/arms/spiral_geometry.hpp"

using namespace undertow;

namespace {

struct Config {
  double pitch_deg, width_kpc;
  double parallax_err_mas;  // fixed error, or
  double parallax_fraction; // fractional (when > 0)
  std::size_t sources;
};

struct Recovery {
  std::vector<double> pitch_pull, radius_pull, width_pull, pitch_sigma;
  int pitch_covered = 0, radius_covered = 0, width_covered = 0, converged = 0;
  std::vector<double> naive_pitch_pull, naive_width_pull;
  int naive_pitch_covered = 0;
};

double pull(const arms::Interval& x, double truth) {
  const double s = truth > x.median ? x.hi - x.median : x.median - x.lo;
  return (x.median - truth) / s;
}
bool covers(const arms::Interval& x, double truth) {
  return truth >= x.lo && truth <= x.hi;
}

Recovery recover(const Config& c, int trials, std::uint64_t seed0, bool naive) {
  Recovery out;
  const auto n = static_cast<std::size_t>(trials);
  std::vector<arms::SegmentResult> res(n), nres(n);
  std::vector<double> truth_r(n);
#pragma omp parallel for schedule(dynamic, 1)
  for (int k = 0; k < trials; ++k) {
    auto t = test::arm_truth(c.pitch_deg, c.width_kpc, c.sources, seed0 + std::uint64_t(k));
    if (c.parallax_fraction > 0) {
      t.errors.kind = observe::ErrorModel::Kind::fractional;
      t.errors.parallax_fraction = c.parallax_fraction;
    } else {
      t.errors.parallax_mas = c.parallax_err_mas;
    }
    const auto cat = fit::simulate_catalog(t);
    const auto g = test::arm_geometry(t);
    auto lines = test::arm_sight_lines(t);
    const double psi = arms::reference_azimuth(cat.sources, g);
    // the survey's window in azimuth is known to the fit, as a segment's selection would be
    lines.window_lo = arms::azimuth_from(t.placement.psi_min_deg * units::deg, psi);
    lines.window_hi =
        lines.window_lo + (t.placement.psi_max_deg - t.placement.psi_min_deg) * units::deg;
    const arms::SegmentLikelihood L(cat.sources, g, psi, lines);
    arms::SegmentSampling sm;
    sm.seed = 300 + std::uint64_t(k);
    res[std::size_t(k)] = arms::fit_segment({&L}, {}, sm, arms::SegmentMethod::marginalised, "s");
    if (naive)
      nres[std::size_t(k)] = arms::fit_segment({&L}, {}, sm, arms::SegmentMethod::naive, "s");
    truth_r[std::size_t(k)] = std::exp(arms::arm_ln_radius(psi, 0, std::log(t.placement.radius_kpc),
                                                           std::tan(c.pitch_deg * units::deg)));
  }
  for (int k = 0; k < trials; ++k) {
    const auto& r = res[std::size_t(k)];
    out.converged += r.converged;
    out.pitch_pull.push_back(pull(r.pitch_deg, c.pitch_deg));
    out.radius_pull.push_back(pull(r.radius_kpc, truth_r[std::size_t(k)]));
    out.width_pull.push_back(pull(r.width_kpc, c.width_kpc));
    out.pitch_sigma.push_back(r.pitch_deg.sigma());
    out.pitch_covered += covers(r.pitch_deg, c.pitch_deg);
    out.radius_covered += covers(r.radius_kpc, truth_r[std::size_t(k)]);
    out.width_covered += covers(r.width_kpc, c.width_kpc);
    if (naive) {
      const auto& nr = nres[std::size_t(k)];
      out.naive_pitch_pull.push_back(pull(nr.pitch_deg, c.pitch_deg));
      out.naive_width_pull.push_back(pull(nr.width_kpc, c.width_kpc));
      out.naive_pitch_covered += covers(nr.pitch_deg, c.pitch_deg);
    }
  }
  return out;
}

void print(const std::string& what, const std::vector<double>& v, int covered) {
  const auto m = test::mean_sd(v);
  std::cout << "  " << what << ": pull mean " << m.mean << ", dispersion " << m.sd
            << ", 68 % coverage " << double(covered) / double(v.size()) << "\n";
}

} // namespace

TEST_CASE("arms: pitch pulls and coverage over many simulated segments", "[.arms-injection]") {
  // several pitches, widths and parallax-error levels, 96 catalogs each: the standard error of a
  // setting's mean pull is then 0.10 and of its dispersion 0.07, so the tolerances asked for
  // (mean 0 ± 0.3, dispersion 1 ± 0.3) are three standard errors or more. With 24 catalogs a
  // setting's dispersion once came out at 1.5 from three catalogs beyond 2.3 sigma; with 96 fresh
  // ones the same setting gives 0.94, and a 2000-source catalog of it peaks at the true pitch to
  // 0.1°, so the model is exact and the excess was the small sample's
  const std::vector<Config> configs{{8, 0.15, 0.012, 0, 30},
                                    {14, 0.35, 0, 0.2, 30},
                                    {22, 0.25, 0.025, 0, 30},
                                    {14, 0.2, 0.012, 0, 30}};
  const int trials = 96;
  std::vector<double> all_pitch;
  int all_covered = 0;
  for (std::size_t i = 0; i < configs.size(); ++i) {
    const auto& c = configs[i];
    const auto r = recover(c, trials, 5000 + 1000 * i, false);
    std::cout << "pitch " << c.pitch_deg << " deg, width " << c.width_kpc << " kpc, parallax error "
              << (c.parallax_fraction > 0 ? std::to_string(c.parallax_fraction * 100) + " %"
                                          : std::to_string(c.parallax_err_mas) + " mas")
              << ": " << r.converged << "/" << trials << " converged\n";
    print("pitch", r.pitch_pull, r.pitch_covered);
    print("radius", r.radius_pull, r.radius_covered);
    print("width", r.width_pull, r.width_covered);
    const auto m = test::mean_sd(r.pitch_pull);
    CHECK(std::fabs(m.mean) < 0.3);
    CHECK(std::fabs(m.sd - 1) < 0.3);
    CHECK(r.converged == trials);
    all_pitch.insert(all_pitch.end(), r.pitch_pull.begin(), r.pitch_pull.end());
    all_covered += r.pitch_covered;
  }
  // pooled over the 384 catalogs: the coverage within 3 binomial standard errors of 0.68
  const auto m = test::mean_sd(all_pitch);
  const double cov = double(all_covered) / double(all_pitch.size());
  std::cout << "pooled pitch pulls: mean " << m.mean << ", dispersion " << m.sd << ", coverage "
            << cov << "\n";
  CHECK(std::fabs(m.mean) < 0.3);
  CHECK(std::fabs(m.sd - 1) < 0.3);
  CHECK(std::fabs(cov - 0.68) < 3 * std::sqrt(0.68 * 0.32 / double(all_pitch.size())));
}

TEST_CASE("arms: the pitch's interval shrinks as 1/sqrt(N)", "[.arms-injection]") {
  const auto few = recover({14, 0.2, 0.012, 0, 15}, 20, 7000, false);
  const auto many = recover({14, 0.2, 0.012, 0, 60}, 20, 7100, false);
  const auto a = test::mean_sd(few.pitch_sigma), b = test::mean_sd(many.pitch_sigma);
  // the ratio of mean widths, 15 against 60 sources: 2 for 1/√N; its standard error from the
  // widths' scatter over 20 catalogs each
  const double ratio = a.mean / b.mean;
  const double se = ratio * std::sqrt(a.sd * a.sd / (20 * a.mean * a.mean) +
                                      b.sd * b.sd / (20 * b.mean * b.mean));
  std::cout << "pitch sigma: " << a.mean << " deg (15 sources), " << b.mean
            << " deg (60 sources); ratio " << ratio << " ± " << se << " (1/sqrt(N): 2)\n";
  CHECK(std::fabs(ratio - 2) < 3 * se + 0.1);
}

TEST_CASE("arms: at 20 % parallax errors the naive 1/parallax fit is biased, the "
          "marginalised fit is not",
          "[.arms-injection]") {
  const auto r = recover({14, 0.2, 0, 0.2, 30}, 24, 8000, true);
  std::cout << "20 % parallax errors, 24 catalogs:\n";
  print("marginalised pitch", r.pitch_pull, r.pitch_covered);
  print("marginalised width", r.width_pull, r.width_covered);
  print("naive pitch", r.naive_pitch_pull, r.naive_pitch_covered);
  print("naive width", r.naive_width_pull, 0);
  const auto mp = test::mean_sd(r.pitch_pull), mw = test::mean_sd(r.width_pull);
  const auto nw = test::mean_sd(r.naive_width_pull);
  CHECK(std::fabs(mp.mean) < 0.3);
  CHECK(std::fabs(mw.mean) < 0.5);
  // the naive fit mistakes the distance errors for arm width: far too wide, many sigma off; and
  // its pitch intervals miss the truth far more often than 32 % of the time (24 catalogs: the
  // binomial standard error of a 68 % coverage is 0.095)
  CHECK(nw.mean > 3);
  CHECK(double(r.naive_pitch_covered) / 24 < 0.68 - 2 * 0.095);
  CHECK(std::fabs(double(r.pitch_covered) / 24 - 0.68) < 3 * 0.095);
}

#pragma once
// A documented kinematic truth and fit set-up shared by the fit tests and the benchmark: young
// sources with maser-like errors between 2 and 12 kpc from the Sun (tests only).
#include "undertow/fit/kinematic_fit.hpp"
#include "undertow/fit/simulate.hpp"

namespace undertow::test {

inline fit::KinematicTruth standard_truth(std::size_t sources, std::uint64_t seed) {
  using fit::Param;
  fit::KinematicTruth t;
  auto& p = t.params;
  p[std::size_t(Param::r0)] = 8.15;
  p[std::size_t(Param::theta0)] = 236;
  p[std::size_t(Param::rotation_slope)] = -0.2;
  p[std::size_t(Param::u_sun)] = 10.6;
  p[std::size_t(Param::v_sun)] = 10.7;
  p[std::size_t(Param::w_sun)] = 7.6;
  p[std::size_t(Param::mean_u)] = 2.4;
  p[std::size_t(Param::mean_v)] = -9.6;
  p[std::size_t(Param::mean_w)] = 0;
  p[std::size_t(Param::dispersion)] = 7;
  p[std::size_t(Param::disk_scale_length)] = 5;
  p[std::size_t(Param::disk_scale_height)] = 0.05;
  t.model.rotation = fit::RotationForm::linear;
  // the fit's prior is the space density the sources are drawn from
  t.model.prior.kind = fit::DistancePrior::Kind::disk;
  t.model.prior.distance_min_kpc = t.distance_min_kpc;
  t.model.prior.distance_max_kpc = t.distance_max_kpc;
  t.disk_scale_length_kpc = 5;
  t.scale_height_kpc = 0.05;
  t.sources = sources;
  t.errors.kind = observe::ErrorModel::Kind::fixed;
  t.errors.parallax_mas = 0.012;
  t.errors.pm_masyr = 0.05;
  t.errors.vlsr_kms = 5;
  t.seed = seed;
  return t;
}

inline fit::ParamSetting setting(fit::Param p, bool free, double value,
                                 fit::Prior::Kind k = fit::Prior::Kind::flat, double a = 0,
                                 double b = 0) {
  fit::ParamSetting s;
  s.param = p;
  s.free = free;
  s.value = value;
  s.prior.kind = k;
  if (k == fit::Prior::Kind::uniform) s.prior.min = a, s.prior.max = b;
  if (k == fit::Prior::Kind::gaussian) s.prior.mean = a, s.prior.sigma = b;
  return s;
}

// Free: R0, Θ0, dΘ/dR, U☉, V☉ (Gaussian prior of width 2 km/s centred on v_sun_prior_mean),
// W☉, Ū_s, V̄_s, σ; W̄_s fixed at 0 (only W̄_s − W☉ is measured).
inline fit::FitSpec standard_spec(const fit::KinematicTruth& t, double v_sun_prior_mean) {
  using fit::Param;
  using K = fit::Prior::Kind;
  fit::FitSpec s;
  s.file = "test";
  s.model = t.model;
  s.params = {setting(Param::r0, true, 8.0, K::uniform, 5, 12),
              setting(Param::theta0, true, 230, K::uniform, 150, 320),
              setting(Param::rotation_slope, true, 0, K::uniform, -20, 20),
              setting(Param::u_sun, true, 10, K::uniform, -30, 50),
              setting(Param::v_sun, true, v_sun_prior_mean, K::gaussian, v_sun_prior_mean, 2),
              setting(Param::w_sun, true, 7, K::uniform, -20, 30),
              setting(Param::z_sun, false, 0),
              setting(Param::mean_u, true, 0, K::uniform, -40, 40),
              setting(Param::mean_v, true, 0, K::uniform, -40, 40),
              setting(Param::mean_w, false, 0),
              setting(Param::dispersion, true, 5, K::uniform, 0.5, 30),
              setting(Param::parallax_offset, false, 0),
              setting(Param::disk_scale_length, false, 5),
              setting(Param::disk_scale_height, false, 0.05)};
  for (auto& q : s.params)
    if (q.prior.kind == K::gaussian) q.prior.min = -1e3, q.prior.max = 1e3;
  return s;
}

} // namespace undertow::test

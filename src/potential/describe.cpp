#include "undertow/potential/describe.hpp"

#include <cmath>

namespace undertow::potential {
namespace {
constexpr double G = units::G;
Parameters of(const PointMass& c) {
  return {{"mass_msun", c.gm / G}};
}
Parameters of(const Plummer& c) {
  return {{"mass_msun", c.gm / G}, {"scale_kpc", c.b}};
}
Parameters of(const Hernquist& c) {
  return {{"mass_msun", c.gm / G}, {"scale_kpc", c.a}};
}
Parameters of(const Isochrone& c) {
  return {{"mass_msun", c.gm / G}, {"scale_kpc", c.b}};
}
Parameters of(const MiyamotoNagai& c) {
  return {{"mass_msun", c.gm / G}, {"radial_scale_kpc", c.a}, {"vertical_scale_kpc", c.b}};
}
Parameters of(const Nfw& c) {
  return {{"density_msun_kpc3", c.gms / (G * 4 * units::pi * c.rs * c.rs * c.rs)},
          {"scale_kpc", c.rs}};
}
Parameters of(const Logarithmic& c) {
  return {{"speed_kms", std::sqrt(c.v02)},
          {"core_kpc", std::sqrt(c.rc2)},
          {"flattening", 1 / std::sqrt(c.iq2)}};
}
Parameters of(const Burkert& c) {
  return {{"density_msun_kpc3", c.gpr3 / (G * units::pi * c.r0 * c.r0 * c.r0)}, {"core_kpc", c.r0}};
}
Parameters of(const TaperedCusp& c) {
  return {{"density_msun_kpc3", c.rho1},
          {"reference_radius_kpc", c.r1},
          {"slope", c.alpha},
          {"cutoff_kpc", c.rc}};
}
Parameters of(const AllenSantillanHalo& c) {
  return {{"mass_msun", c.gm / G}, {"scale_kpc", c.a}, {"exponent", c.g}, {"cutoff_kpc", c.cut}};
}
Parameters of(const LogSpiral& s) {
  return {{"arms", double(s.m)},
          {"pitch_deg", std::atan(1 / s.cotp) / units::deg},
          {"reference_radius_kpc", s.rref},
          {"amplitude_km2_s2", s.amp},
          {"envelope_scale_kpc", s.inv_rs > 0 ? 1 / s.inv_rs : INFINITY},
          {"inner_taper_kpc", std::sqrt(s.rin2)},
          {"scale_height_kpc", s.inv_h > 0 ? 1 / s.inv_h : INFINITY},
          {"outer_radius_kpc", s.rout},
          {"vertical_decay_per_kpc", s.kz}};
}
Parameters of(const CoxGomezSpiral& s) {
  return {
      {"arms", double(s.arms)},       {"pitch_deg", std::atan(s.tan_a) / units::deg},
      {"reference_radius_kpc", s.r0}, {"radial_scale_kpc", 1 / s.inv_rs},
      {"scale_height_kpc", s.H},      {"density_msun_kpc3", s.pref / (4 * units::pi * G * s.H)}};
}
Parameters of(const DehnenBar& s) {
  return {{"bar_radius_kpc", s.rb}, {"amplitude_km2_s2", s.amp}};
}
} // namespace

Parameters parameters(const Component& c) {
  return std::visit([](const auto& s) { return of(s); }, c.shape);
}

Parameters parameters(const Pattern& p) {
  Parameters out = std::visit([](const auto& s) { return of(s); }, p.shape);
  out.insert(out.begin(), {{"pattern_speed_kms_kpc", p.pattern_speed},
                           {"phase_deg", p.phase / units::deg},
                           {"grow_start_myr", p.growth.start_myr},
                           {"grow_duration_myr", p.growth.duration_myr}});
  return out;
}

} // namespace undertow::potential

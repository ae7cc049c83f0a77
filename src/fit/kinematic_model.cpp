#include "undertow/fit/kinematic_model.hpp"

#include <algorithm>
#include <cmath>

#include "undertow/error.hpp"

namespace undertow::fit {

RotationForm rotation_form_from_name(const std::string& n) {
  if (n == "flat") return RotationForm::flat;
  if (n == "linear") return RotationForm::linear;
  if (n == "power-law") return RotationForm::power_law;
  if (n == "model") return RotationForm::model;
  throw InputError("unknown rotation curve form '" + n + "' (flat, linear, power-law, model)");
}

std::string rotation_form_name(RotationForm f) {
  switch (f) {
  case RotationForm::flat:
    return "flat";
  case RotationForm::linear:
    return "linear";
  case RotationForm::power_law:
    return "power-law";
  case RotationForm::model:
    return "model";
  }
  return "?";
}

namespace {
double model_vc(const KinematicModel& m, double R) {
  const double x = R / m.model_step_kpc;
  const std::size_t n = m.model_vc_kms.size();
  const std::size_t i = std::min<std::size_t>(std::size_t(std::max(0.0, x)), n - 2);
  const double f = x - double(i);
  return m.model_vc_kms[i] + f * (m.model_vc_kms[i + 1] - m.model_vc_kms[i]);
}
} // namespace

double KinematicModel::theta0(const FullParams& p) const {
  if (rotation == RotationForm::model)
    return p[std::size_t(Param::model_scale)] * model_vc(*this, p[std::size_t(Param::r0)]);
  if (angular_speed_form)
    return p[std::size_t(Param::sun_angular_speed)] * p[std::size_t(Param::r0)] -
           p[std::size_t(Param::v_sun)];
  return p[std::size_t(Param::theta0)];
}

double KinematicModel::theta(double R, const FullParams& p) const {
  const double r0 = p[std::size_t(Param::r0)];
  switch (rotation) {
  case RotationForm::flat:
    return theta0(p);
  case RotationForm::linear:
    return theta0(p) + p[std::size_t(Param::rotation_slope)] * (R - r0);
  case RotationForm::power_law:
    return theta0(p) * std::pow(R / r0, p[std::size_t(Param::rotation_index)]);
  case RotationForm::model:
    return p[std::size_t(Param::model_scale)] * model_vc(*this, R);
  }
  return NAN;
}

sky::SolarFrame KinematicModel::sun(const FullParams& p) const {
  sky::SolarFrame s;
  s.r0_kpc = p[std::size_t(Param::r0)];
  s.z_sun_kpc = p[std::size_t(Param::z_sun)];
  s.theta0_kms = theta0(p);
  s.u_sun_kms = p[std::size_t(Param::u_sun)];
  s.v_sun_kms = p[std::size_t(Param::v_sun)];
  s.w_sun_kms = p[std::size_t(Param::w_sun)];
  return s;
}

std::vector<Param> KinematicModel::used_params() const {
  std::vector<Param> u{Param::r0};
  if (rotation == RotationForm::model)
    u.push_back(Param::model_scale);
  else
    u.push_back(angular_speed_form ? Param::sun_angular_speed : Param::theta0);
  if (rotation == RotationForm::linear) u.push_back(Param::rotation_slope);
  if (rotation == RotationForm::power_law) u.push_back(Param::rotation_index);
  for (Param p : {Param::u_sun, Param::v_sun, Param::w_sun, Param::z_sun, Param::mean_u,
                  Param::mean_v, Param::mean_w})
    u.push_back(p);
  if (anisotropic)
    u.insert(u.end(), {Param::dispersion_u, Param::dispersion_v, Param::dispersion_w});
  else
    u.push_back(Param::dispersion);
  u.push_back(Param::parallax_offset);
  if (outliers) u.push_back(Param::outlier_fraction);
  if (prior.kind == DistancePrior::Kind::disk)
    u.insert(u.end(), {Param::disk_scale_length, Param::disk_scale_height});
  return u;
}

} // namespace undertow::fit

#pragma once
// A kinematic model of a catalog of young sources (docs/fit.md): each source moves on a
// circular orbit of a rotation curve Θ(R) plus a mean peculiar motion (Ū_s toward the centre,
// V̄_s in the direction of rotation, W̄_s toward the north Galactic pole) and an intrinsic
// Gaussian velocity dispersion, isotropic or per component; the Sun sits at R0 and z☉ and moves
// with (U☉, Θ0 + V☉, W☉). Optionally a fraction of the sources are outliers drawn from a much
// broader velocity distribution (the mixture model of Hogg, Bovy & Lang 2010,
// arXiv:1008.4686, §5).
#include <string>
#include <vector>

#include "undertow/fit/distance_prior.hpp"
#include "undertow/fit/parameters.hpp"
#include "undertow/sky/lsr.hpp"
#include "undertow/sky/solar_frame.hpp"

namespace undertow::fit {

enum class RotationForm { flat, linear, power_law, model };
RotationForm rotation_form_from_name(const std::string& name); // throws InputError
std::string rotation_form_name(RotationForm f);

struct KinematicModel {
  RotationForm rotation = RotationForm::flat;
  // model form: the model file's circular speed on R = i * model_step_kpc, i = 0..n-1
  std::vector<double> model_vc_kms;
  double model_step_kpc = 0.01;
  bool angular_speed_form = false; // Θ0 derived from Ω☉ R0 - V☉
  bool anisotropic = false;        // σ_U, σ_V, σ_W instead of one σ
  bool outliers = false;
  double outlier_dispersion_kms = 50; // of the outlier component (isotropic)
  DistancePrior prior;
  sky::LsrForm lsr = sky::LsrForm::apex;
  int nodes = 64; // quadrature nodes along each line of sight

  double theta0(const FullParams& p) const;
  double theta(double R_kpc, const FullParams& p) const; // the rotation curve
  // The parameters this model reads (the others must not be set in a fit file).
  std::vector<Param> used_params() const;
  // The Sun of p: R0, z☉, Θ0 (from the rotation curve) and the solar motion.
  sky::SolarFrame sun(const FullParams& p) const;
};

} // namespace undertow::fit

#include "undertow/tracers/disk_population.hpp"

#include <cmath>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/tracers/random.hpp"

namespace undertow::tracers {
namespace {

// CDF of R for Sigma ~ exp(-R/Rd): the mass inside R is proportional to 1 - (1 + x) e^-x.
double cumulative(double R, double Rd) {
  const double x = R / Rd;
  return -std::expm1(-x) - x * std::exp(-x);
}

double sample_radius(double u, const DiskPopulation& d) {
  const double c0 = cumulative(d.r_min_kpc, d.scale_length_kpc);
  const double c1 = cumulative(d.r_max_kpc, d.scale_length_kpc);
  const double target = c0 + u * (c1 - c0);
  double lo = d.r_min_kpc, hi = d.r_max_kpc;
  for (int i = 0; i < 200 && hi - lo > 1e-13 * hi; ++i) { // bisection: monotonic, exact enough
    const double mid = 0.5 * (lo + hi);
    (cumulative(mid, d.scale_length_kpc) < target ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

double sigma_at(double s0, const DiskPopulation& d, double R) {
  return s0 * std::exp(-(R - d.dispersion_radius_kpc) / d.dispersion_scale_kpc);
}

} // namespace

void DiskPopulation::validate() const {
  using detail::ParameterError;
  if (count == 0) throw ParameterError("count", "must be at least 1");
  detail::positive(scale_length_kpc, "scale_length_kpc");
  detail::positive(r_min_kpc, "r_min_kpc");
  detail::positive(r_max_kpc, "r_max_kpc");
  if (!(r_max_kpc > r_min_kpc)) throw ParameterError("r_max_kpc", "must exceed r_min_kpc");
  detail::positive(scale_height_kpc, "scale_height_kpc");
  detail::non_negative(sigma_r_kms, "sigma_r_kms");
  detail::non_negative(sigma_z_kms, "sigma_z_kms");
  detail::positive(dispersion_radius_kpc, "dispersion_radius_kpc");
  if (!(dispersion_scale_kpc > 0)) throw ParameterError("dispersion_scale_kpc", "must be positive");
}

namespace {

// Mean rotation from the frequencies at R (computed once per tracer by the caller).
double mean_rotation_at(const DiskPopulation& d, double R, double vc, double k, double om) {
  if (!d.asymmetric_drift) return vc;
  const double sr = sigma_at(d.sigma_r_kms, d, R);
  const double ratio = k * k / (4 * om * om); // sigma_phi^2 / sigma_R^2
  // B&T 2008 eq. 4.228 with nu sigma_R^2 ~ exp(-R/R_d - 2R/R_sigma) and no tilt term:
  // v_c^2 - vbar^2 = sigma_R^2 [sigma_phi^2/sigma_R^2 - 1 + R/R_d + 2R/R_sigma]
  const double drift =
      sr * sr * (ratio - 1 + R / d.scale_length_kpc + 2 * R / d.dispersion_scale_kpc);
  const double v2 = vc * vc - drift;
  return v2 > 0 ? std::sqrt(v2) : 0.0;
}

} // namespace

double mean_rotation(const potential::Model& m, const DiskPopulation& d, double R) {
  const double vc = dynamics::circular_speed(m, R);
  if (!d.asymmetric_drift) return vc;
  return mean_rotation_at(d, R, vc, dynamics::kappa(m, R), dynamics::omega(m, R));
}

orbit::PhaseSpace sample(const potential::Model& m, const DiskPopulation& d, std::uint64_t seed,
                         std::uint64_t first_id, std::uint64_t n) {
  d.validate();
  orbit::PhaseSpace p;
  p.resize(n);
  for (std::uint64_t k = 0; k < n; ++k) {
    const std::uint64_t id = first_id + k;
    TracerStream rng(seed, id);
    const double R = sample_radius(rng.uniform(), d);
    const double psi = 2 * units::pi * rng.uniform(); // azimuth from the Sun's direction
    const double u = rng.uniform();
    const double z =
        d.vertical == DiskPopulation::Vertical::sech2
            ? d.scale_height_kpc * std::atanh(2 * u - 1)
            : d.scale_height_kpc * std::copysign(std::log(1 / (1 - std::fabs(2 * u - 1))), u - 0.5);
    const double sr = sigma_at(d.sigma_r_kms, d, R), sz = sigma_at(d.sigma_z_kms, d, R);
    const double kap = dynamics::kappa(m, R), om = dynamics::omega(m, R);
    const double sphi = sr * kap / (2 * om);
    const double vR = sr * rng.normal();
    const double vphi =
        mean_rotation_at(d, R, dynamics::circular_speed(m, R), kap, om) + sphi * rng.normal();
    const double vz = sz * rng.normal();
    // unit vectors: e_R = (-cos psi, sin psi), e_psi (sense of rotation) = (sin psi, cos psi)
    const double c = std::cos(psi), s = std::sin(psi);
    p.id[k] = id;
    p.x[k] = -R * c;
    p.y[k] = R * s;
    p.z[k] = z;
    p.vx[k] = -vR * c + vphi * s;
    p.vy[k] = vR * s + vphi * c;
    p.vz[k] = vz;
  }
  return p;
}

} // namespace undertow::tracers

#include "undertow/residuals/peculiar.hpp"

#include <cmath>
#include <optional>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/fit/measurement_draw.hpp"
#include "undertow/sky/distance.hpp"
#include "undertow/tracers/random.hpp"
#include "undertow/units.hpp"

namespace undertow::residuals {
namespace {

bool from_posterior(const ResidualSettings& s) {
  return s.distance != ResidualSettings::Distance::inverse;
}

// The distance prior of a posterior-based estimator.
fit::DistancePrior prior_of(const ResidualSettings& s) {
  if (s.distance == ResidualSettings::Distance::posterior_median) return s.prior;
  fit::DistancePrior p;
  p.kind = fit::DistancePrior::Kind::edsd;
  p.edsd_length_kpc = s.edsd_length_kpc;
  p.distance_min_kpc = 0;
  p.distance_max_kpc = 1000 * s.edsd_length_kpc;
  return p;
}

// The distance estimate for a parallax w (already corrected for the zero point); for a source
// whose catalog gives its distance, w is that distance, used as given.
double distance_of(const Source& src, double w, double sw, const ResidualSettings& s) {
  if (src.has_distance()) return w;
  switch (s.distance) {
  case ResidualSettings::Distance::edsd:
    return sky::edsd_mode_kpc(w, sw, s.edsd_length_kpc);
  case ResidualSettings::Distance::edsd_median:
    return sky::edsd_median_kpc(w, sw, s.edsd_length_kpc);
  case ResidualSettings::Distance::posterior_median: {
    const auto n = sky::galactic_direction(src.ra_deg, src.dec_deg);
    return fit::DistancePosterior(w, sw, 0, n.data(), s.prior, {s.sun.r0_kpc, s.sun.z_sun_kpc})
        .median();
  }
  case ResidualSettings::Distance::inverse:
    break;
  }
  return sky::inverse_parallax_kpc(w);
}

struct Inputs {
  // parallax mas (zero point removed), or the distance kpc where the catalog gives distances;
  // mu_alpha*, mu_delta mas/yr; v_LSR km/s
  double w, pa, pd, v;
};

std::array<double, 3> uvw_at(const Source& src, double d, double pa, double pd, double v,
                             const ResidualSettings& s, const sky::SolarFrame& sun,
                             const RotationCurve& rot, double* R = nullptr, double* psi = nullptr,
                             double* z = nullptr) {
  const sky::Observed o{src.ra_deg, src.dec_deg, pa, pd,
                        sky::lsr_to_helio(v, src.ra_deg, src.dec_deg, s.lsr)};
  return peculiar_motion(o, d, sun, rot, R, psi, z);
}

std::array<double, 3> uvw_of(const Source& src, const Inputs& in, double sw,
                             const ResidualSettings& s, const sky::SolarFrame& sun,
                             const RotationCurve& rot, double* R = nullptr, double* psi = nullptr,
                             double* z = nullptr, double* d_out = nullptr) {
  const double d = distance_of(src, in.w, sw, s);
  if (d_out) *d_out = d;
  return uvw_at(src, d, in.pa, in.pd, in.v, s, sun, rot, R, psi, z);
}

} // namespace

ResidualSettings::Distance distance_from_name(const std::string& n) {
  if (n == "inverse") return ResidualSettings::Distance::inverse;
  if (n == "edsd-median") return ResidualSettings::Distance::edsd_median;
  if (n == "edsd-mode") return ResidualSettings::Distance::edsd;
  if (n == "posterior-median") return ResidualSettings::Distance::posterior_median;
  throw InputError("unknown distance estimator '" + n +
                   "' (inverse, posterior-median, edsd-median, edsd-mode)");
}

double RotationCurve::at(double R) const {
  switch (kind) {
  case Kind::model:
    return model(R);
  case Kind::flat:
    return theta0_kms;
  case Kind::linear:
    return theta0_kms + slope_kms_kpc * (R - r0_kpc);
  }
  return NAN;
}

std::array<double, 3> peculiar_motion(const sky::Observed& o, double d, const sky::SolarFrame& sun,
                                      const RotationCurve& rotation, double* R_out, double* psi_out,
                                      double* z_out) {
  const auto g = sky::to_galactocentric(o, d, sun);
  const double R = std::hypot(g.r[0], g.r[1]);
  const double ex = -g.r[0] / R, ey = -g.r[1] / R; // toward the centre
  const double rx = g.r[1] / R, ry = -g.r[0] / R;  // direction of rotation
  if (R_out) *R_out = R;
  if (psi_out) *psi_out = std::atan2(g.r[1], -g.r[0]) / units::deg;
  if (z_out) *z_out = g.r[2];
  return {g.v[0] * ex + g.v[1] * ey, g.v[0] * rx + g.v[1] * ry - rotation.at(R), g.v[2]};
}

ResidualResult compute_residuals(const Catalog& c, const ResidualSettings& s) {
  s.sun.validate();
  if (s.distance == ResidualSettings::Distance::posterior_median) s.prior.validate();
  const fit::DistancePrior prior = prior_of(s);
  ResidualResult out;
  out.warnings = c.warnings; // the catalog's own, counted in the summary with the rest
  std::uint64_t index = 0;
  bool warned_inverse = false;
  for (const Source& src : c.sources) {
    ++index;
    // A distance given directly is used as given (it is an estimate already; no prior applies
    // twice), its draws normal and cut at zero; the parallax settings do not apply to it.
    const bool given = src.has_distance();
    const bool posterior = from_posterior(s) && !given;
    const double w = given ? src.distance_kpc
                           : src.parallax_mas - src.parallax_offset_mas - s.parallax_offset_mas;
    const double sw = given ? src.distance_err_kpc : src.parallax_err_mas;
    const double snr = src.signal_to_noise();
    if (s.parallax_snr_min > 0 && snr < s.parallax_snr_min) {
      out.excluded.push_back(src.name + (given ? ": distance/error = " : ": parallax/error = ") +
                             detail::num(snr) + " below " + detail::num(s.parallax_snr_min));
      continue;
    }
    if (!posterior && !given && !(w > 0)) {
      out.excluded.push_back(src.name + ": non-positive parallax has no 1/parallax distance");
      continue;
    }
    SourceResidual r;
    r.name = src.name;
    r.group = src.group;
    r.frac_parallax_err = sw / std::fabs(w);
    if (!posterior && !given && r.frac_parallax_err > 0.1) {
      out.warnings.push_back(src.name + ": fractional parallax error " +
                             detail::num(r.frac_parallax_err) +
                             ": 1/parallax is biased (too far on average) at this level");
      if (!warned_inverse) {
        warned_inverse = true;
        out.warnings.insert(out.warnings.begin(),
                            "1/parallax is biased for sources with fractional parallax errors "
                            "above 10 %: for young disk sources several kpc away use "
                            "posterior-median with a uniform-density or disk prior cut at the "
                            "survey's distance range (docs/fit.md); the edsd prior suits nearby "
                            "stars and pulls distant disk sources too close");
      }
    }
    std::optional<fit::DistancePosterior> post;
    const sky::Vec3 dir = sky::galactic_direction(src.ra_deg, src.dec_deg);
    try {
      if (posterior)
        post.emplace(w, sw, 0, dir.data(), prior, fit::Geometry{s.sun.r0_kpc, s.sun.z_sun_kpc});
    } catch (const InputError& e) {
      out.excluded.push_back(src.name + ": " + e.what());
      continue;
    }
    const Inputs nominal{w, src.pmra_masyr, src.pmdec_masyr, src.vlsr_kms};
    r.uvw = uvw_of(src, nominal, sw, s, s.sun, s.rotation, &r.R_kpc, &r.psi_deg, &r.z_kpc,
                   &r.distance_kpc);

    // Monte Carlo, each source with its own stream from (seed, source index): 1/parallax draws
    // perturb the parallax and proper motions (correlated as the catalog says); posterior-based
    // estimators draw the true distance from its posterior and the proper motions conditioned on
    // the parallax error it implies (fit::draw_true).
    tracers::TracerStream rng(s.seed, index, 0x5eed);
    std::array<double, 3> sum{};
    std::array<double, 9> sum2{};
    int used = 0;
    // Cholesky of the (parallax, mu_alpha*, mu_delta) correlation matrix
    const double r01 = src.corr_w_pa, r02 = src.corr_w_pd, r12 = src.corr_pm;
    const double c11 = std::sqrt(std::fmax(0.0, 1 - r01 * r01));
    const double c21 = c11 > 0 ? (r12 - r02 * r01) / c11 : 0;
    const double c22 = std::sqrt(std::fmax(0.0, 1 - r02 * r02 - c21 * c21));
    for (int k = 0; k < s.draws; ++k) {
      // this draw's Galactic parameters (a posterior sample, when marginalising)
      const sky::SolarFrame* sun = &s.sun;
      const RotationCurve* rot = &s.rotation;
      if (!s.galactic_draws.empty()) {
        const auto& g = s.galactic_draws[std::size_t(k) % s.galactic_draws.size()];
        sun = &g.sun, rot = &g.rotation;
      }
      std::array<double, 3> u;
      if (post) {
        const auto t = fit::draw_true(src, *post, s.parallax_offset_mas, rng);
        u = uvw_at(src, t.distance_kpc, t.pmra_masyr, t.pmdec_masyr, t.vlsr_kms, s, *sun, *rot);
      } else {
        const double n1 = rng.normal(), n2 = rng.normal(), n3 = rng.normal(), n4 = rng.normal();
        const Inputs in{w + sw * n1, src.pmra_masyr + src.pmra_err_masyr * (r01 * n1 + c11 * n2),
                        src.pmdec_masyr + src.pmdec_err_masyr * (r02 * n1 + c21 * n2 + c22 * n3),
                        src.vlsr_kms + src.vlsr_err_kms * n4};
        if (!(in.w > 0)) continue; // no distance: a normal distance draw is cut at zero
        u = uvw_of(src, in, sw, s, *sun, *rot);
      }
      for (int a = 0; a < 3; ++a) {
        sum[a] += u[a];
        for (int b = 0; b < 3; ++b)
          sum2[3 * a + b] += u[a] * u[b];
      }
      ++used;
    }
    if (used < 2) {
      out.excluded.push_back(src.name + ": too few Monte Carlo draws with a positive parallax");
      continue;
    }
    if (used < s.draws)
      out.warnings.push_back(src.name + ": " + std::to_string(s.draws - used) +
                             " Monte Carlo draws had a non-positive parallax and were dropped");
    for (int a = 0; a < 3; ++a)
      r.mc_mean[a] = sum[a] / used;
    for (int a = 0; a < 3; ++a)
      for (int b = 0; b < 3; ++b)
        r.mc_cov[3 * a + b] = (sum2[3 * a + b] - used * r.mc_mean[a] * r.mc_mean[b]) / (used - 1);

    // First-order propagation: J C J^T with the Jacobian by central differences.
    const double sig[4] = {sw, src.pmra_err_masyr, src.pmdec_err_masyr, src.vlsr_err_kms};
    double J[3][4];
    for (int k = 0; k < 4; ++k) {
      const double h = 1e-4 * sig[k];
      Inputs p = nominal, m = nominal;
      double* pp[] = {&p.w, &p.pa, &p.pd, &p.v};
      double* mm[] = {&m.w, &m.pa, &m.pd, &m.v};
      *pp[k] += h;
      *mm[k] -= h;
      const auto up = uvw_of(src, p, sw, s, s.sun, s.rotation),
                 um = uvw_of(src, m, sw, s, s.sun, s.rotation);
      for (int a = 0; a < 3; ++a)
        J[a][k] = (up[a] - um[a]) / (2 * h);
    }
    double C[4][4] = {};
    for (int k = 0; k < 4; ++k)
      C[k][k] = sig[k] * sig[k];
    C[1][2] = C[2][1] = r12 * sig[1] * sig[2];
    C[0][1] = C[1][0] = r01 * sig[0] * sig[1];
    C[0][2] = C[2][0] = r02 * sig[0] * sig[2];
    for (int a = 0; a < 3; ++a)
      for (int b = 0; b < 3; ++b) {
        double v = 0;
        for (int k = 0; k < 4; ++k)
          for (int l = 0; l < 4; ++l)
            v += J[a][k] * C[k][l] * J[b][l];
        r.lin_cov[3 * a + b] = v;
      }
    out.sources.push_back(r);
  }
  return out;
}

} // namespace undertow::residuals

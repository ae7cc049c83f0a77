#include "undertow/observe/observation.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <sstream>

#include "undertow/error.hpp"
#include "undertow/tracers/random.hpp"
#include "undertow/units.hpp"

namespace undertow::observe {
namespace {

// The unit vector of a catalog position given in degrees.
sky::Vec3 direction(double ra_deg, double dec_deg) {
  return sky::unit_vector(ra_deg * units::deg, dec_deg * units::deg);
}

double angle_between(const sky::Vec3& a, const sky::Vec3& b) {
  return std::acos(std::clamp(a[0] * b[0] + a[1] * b[1] + a[2] * b[2], -1.0, 1.0));
}

} // namespace

std::vector<double> young_weights(const potential::Model& m, const std::vector<io::Snapshot>& snaps,
                                  const YoungWeights& y) {
  if (snaps.empty()) throw InputError("young-source weights need at least one snapshot");
  const io::Snapshot& obs = snaps.back();
  const std::size_t n = obs.tracers.size();
  std::vector<double> w(n, 0.0);
  if (y.star_age_myr) {
    const double lo = (*y.star_age_myr)[0], hi = (*y.star_age_myr)[1];
    std::size_t stars = 0, picked = 0;
    double youngest = INFINITY, oldest = -INFINITY;
    for (std::size_t i = 0; i < n; ++i) {
      if (!(obs.flags[i] & io::kFlagStar)) continue;
      ++stars;
      const double age = obs.time_myr - obs.birth_time_myr[i];
      youngest = std::min(youngest, age), oldest = std::max(oldest, age);
      if (age >= lo && age <= hi) w[i] = 1, ++picked;
    }
    if (stars == 0)
      throw InputError("star_age_myr: the snapshot at " + detail::num(obs.time_myr) +
                       " Myr holds no stars (stars form only in a run with [gas.stars])");
    if (picked == 0)
      throw InputError("star_age_myr: no star of the snapshot at " + detail::num(obs.time_myr) +
                       " Myr is " + detail::num(lo) + " to " + detail::num(hi) +
                       " Myr old (their ages run from " + detail::num(youngest) + " to " +
                       detail::num(oldest) + " Myr)");
    return w;
  }
  if (!(y.exponent > 0) || !(y.age_window_myr >= 0))
    throw InputError(
        "young-source weights: exponent must be positive and the age window not negative");
  std::map<std::uint64_t, std::size_t> index;
  for (std::size_t i = 0; i < n; ++i)
    index[obs.tracers.id[i]] = i;
  const double power = y.exponent - 1; // the tracers sample the density already
  int used = 0;
  for (const auto& s : snaps) {
    if (s.time_myr < obs.time_myr - y.age_window_myr - 1e-9 || s.time_myr > obs.time_myr) continue;
    if (s.frame != "inertial")
      throw InputError("young-source weights need inertial-frame snapshots");
    std::vector<double> sigma; // surface density of the tracers, per cell (tracer density)
    const double h = y.cell_kpc, half = 30.0;
    const long nc = long(2 * half / h) + 1;
    const auto cell = [&](double x, double yy) -> long {
      const long i = long(std::floor((x + half) / h)), j = long(std::floor((yy + half) / h));
      return (i < 0 || j < 0 || i >= nc || j >= nc) ? -1 : i * nc + j;
    };
    if (y.density == YoungWeights::Density::tracers) {
      sigma.assign(std::size_t(nc * nc), 0.0);
      for (std::size_t k = 0; k < s.tracers.size(); ++k)
        if (const long c = cell(s.tracers.x[k], s.tracers.y[k]); c >= 0) sigma[std::size_t(c)] += 1;
    }
    for (std::size_t k = 0; k < s.tracers.size(); ++k) {
      const auto it = index.find(s.tracers.id[k]);
      if (it == index.end()) continue;
      double rho;
      if (y.density == YoungWeights::Density::tracers) {
        const long c = cell(s.tracers.x[k], s.tracers.y[k]);
        rho = c >= 0 ? sigma[std::size_t(c)] / (h * h) : 0.0; // tracers per kpc^2
      } else {
        const potential::Vec3 r{s.tracers.x[k], s.tracers.y[k], s.tracers.z[k]};
        double arms = 0;
        for (std::size_t q = 0; q < m.patterns.size(); ++q)
          arms += m.pattern_density(q, r, s.time_myr);
        const double axi = m.axisymmetric_density(r);
        rho = axi > 0 ? 1 + arms / axi : 0.0; // the patterns' density contrast
      }
      w[it->second] += rho > 0 ? std::pow(rho, power) : 0.0;
    }
    ++used;
  }
  for (double& x : w)
    x /= used;
  return w;
}

bool in_survey_volume(const orbit::PhaseSpace& t, std::size_t i, const ObservationSettings& s,
                      sky::Observed& o, double& d) {
  const auto& sel = s.selection;
  d = sky::from_galactocentric({{t.x[i], t.y[i], t.z[i]}, {t.vx[i], t.vy[i], t.vz[i]}}, s.sun, o);
  if (d < sel.distance_min_kpc || d > sel.distance_max_kpc) return false;
  if (o.dec_deg < sel.dec_min_deg || o.dec_deg > sel.dec_max_deg) return false;
  double l, b;
  sky::icrs_to_galactic(o.ra_deg * units::deg, o.dec_deg * units::deg, l, b);
  return std::fabs(b) / units::deg <= sel.latitude_max_deg;
}

MockResult observe(const io::Snapshot& snap, const std::vector<double>& weights,
                   const ObservationSettings& s) {
  s.sun.validate();
  if (snap.frame != "inertial")
    throw InputError("observe: the snapshot must be in the inertial frame");
  const auto& t = snap.tracers;
  if (!weights.empty() && weights.size() != t.size())
    throw InputError("observe: one weight per tracer is needed");
  const auto& sel = s.selection;
  MockResult out;
  // Candidates inside the survey's volume and sky, each with its true observables.
  struct Candidate {
    std::size_t i;
    sky::Observed o;
    double d, key;
  };
  std::vector<Candidate> cand;
  for (std::size_t i = 0; i < t.size(); ++i) {
    sky::Observed o;
    double d;
    if (!in_survey_volume(t, i, s, o, d)) continue;
    const double w = weights.empty() ? 1.0 : weights[i];
    if (!(w > 0)) continue;
    // Weighted order without replacement: key = u^(1/w), largest first (Efraimidis & Spirakis
    // 2006, Inf. Proc. Lett. 97, 181), with u from the tracer's own stream.
    tracers::TracerStream rng(s.seed, t.id[i], 0x0b5e);
    cand.push_back({i, o, d, std::log(rng.uniform()) / w});
  }
  out.candidates = cand.size();
  // Error catalog: the directions of its sources, once.
  const auto& e = s.errors;
  std::vector<sky::Vec3> ref_dir;
  if (e.kind == ErrorModel::Kind::catalog)
    for (const auto& r : e.reference.sources)
      ref_dir.push_back(direction(r.ra_deg, r.dec_deg));
  out.catalog.distances = e.kind == ErrorModel::Kind::distance ||
                          (e.kind == ErrorModel::Kind::catalog && e.reference.distances);
  std::sort(cand.begin(), cand.end(), [](const Candidate& a, const Candidate& b) {
    return a.key != b.key ? a.key > b.key : a.i < b.i;
  });
  for (const auto& c : cand) {
    if (sel.max_sources > 0 && out.catalog.sources.size() >= sel.max_sources) break;
    tracers::TracerStream rng(s.seed, t.id[c.i], 0xe770);
    residuals::Source src;
    src.name = "T" + std::to_string(t.id[c.i]);
    src.ra_deg = c.o.ra_deg;
    src.dec_deg = c.o.dec_deg;
    const double w_true = 1 / c.d;
    const double vlsr_true = sky::helio_to_lsr(c.o.vhelio_kms, c.o.ra_deg, c.o.dec_deg, s.lsr);
    switch (e.kind) {
    case ErrorModel::Kind::fixed:
      src.parallax_err_mas = e.parallax_mas, src.pmra_err_masyr = src.pmdec_err_masyr = e.pm_masyr;
      src.vlsr_err_kms = e.vlsr_kms;
      break;
    case ErrorModel::Kind::fractional:
      src.parallax_err_mas = e.parallax_fraction * w_true,
      src.pmra_err_masyr = src.pmdec_err_masyr = e.pm_masyr;
      src.vlsr_err_kms = e.vlsr_kms;
      break;
    case ErrorModel::Kind::distance:
      src.distance_err_kpc = e.distance_fraction * c.d,
      src.pmra_err_masyr = src.pmdec_err_masyr = e.pm_masyr;
      src.vlsr_err_kms = e.vlsr_kms;
      break;
    case ErrorModel::Kind::catalog: {
      if (ref_dir.empty()) throw InputError("observe: the error catalog has no sources");
      const sky::Vec3 here = direction(c.o.ra_deg, c.o.dec_deg);
      const residuals::Source* best = nullptr;
      double bd = INFINITY;
      for (std::size_t k = 0; k < ref_dir.size(); ++k) {
        const double a = angle_between(ref_dir[k], here);
        if (a < bd) bd = a, best = &e.reference.sources[k];
      }
      if (best->has_distance())
        src.distance_err_kpc = best->distance_err_kpc / best->distance_kpc * c.d;
      else
        src.parallax_err_mas = best->parallax_err_mas;
      src.pmra_err_masyr = best->pmra_err_masyr;
      src.pmdec_err_masyr = best->pmdec_err_masyr, src.vlsr_err_kms = best->vlsr_err_kms;
      break;
    }
    }
    // the first normal draws the parallax, or the distance given instead (cut at zero below)
    if (src.has_distance())
      src.distance_kpc = c.d + src.distance_err_kpc * rng.normal();
    else
      src.parallax_mas = w_true + src.parallax_err_mas * rng.normal();
    src.pmra_masyr = c.o.pmra_masyr + src.pmra_err_masyr * rng.normal();
    src.pmdec_masyr = c.o.pmdec_masyr + src.pmdec_err_masyr * rng.normal();
    src.vlsr_kms = vlsr_true + src.vlsr_err_kms * rng.normal();
    if (src.signal_to_noise() < sel.parallax_snr_min) {
      ++out.rejected_snr;
      continue;
    }
    if (src.has_distance() && !(src.distance_kpc > 0)) { // a catalog distance is positive
      ++out.rejected_parallax;
      continue;
    }
    // the observed-parallax range; for a distance, the parallax it stands for
    const double w_obs = src.has_distance() ? 1 / src.distance_kpc : src.parallax_mas;
    if (w_obs < sel.parallax_min_mas || w_obs > sel.parallax_max_mas) {
      ++out.rejected_parallax;
      continue;
    }
    out.catalog.sources.push_back(src);
    out.tracer_ids.push_back(t.id[c.i]);
  }
  return out;
}

std::string describe_sun(const ObservationSettings& o) {
  std::ostringstream d;
  d.precision(15);
  d << "R0 = " << o.sun.r0_kpc << " kpc, z☉ = " << o.sun.z_sun_kpc
    << " kpc, Θ0 = " << o.sun.theta0_kms << " km/s, (U☉, V☉, W☉) = (" << o.sun.u_sun_kms << ", "
    << o.sun.v_sun_kms << ", " << o.sun.w_sun_kms << ") km/s, LSR "
    << (o.lsr == sky::LsrForm::apex ? "apex" : "components") << ", from " << o.sun_source;
  return d.str();
}

} // namespace undertow::observe

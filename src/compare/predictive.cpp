#include "undertow/compare/predictive.hpp"

#include <boost/math/distributions/chi_squared.hpp>
#include <boost/math/distributions/fisher_f.hpp>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/students_t.hpp>
#include <cmath>
#include <stdexcept>

namespace undertow::compare {

Predictive predictive(const SampleMoments& m) {
  if (m.k < 4) throw std::invalid_argument("predictive: needs at least 4 simulated sources");
  const double k = double(m.k), nu = k - 3;
  Predictive p;
  p.nu = nu;
  p.location = Eigen::Vector3d(m.mean[0], m.mean[1], m.mean[2]);
  const auto& s = m.ss;
  p.scale << s[0], s[1], s[2], s[1], s[3], s[4], s[2], s[4], s[5];
  p.scale *= (1 + 1 / k) / nu;
  return p;
}

double effective_dof(double nu, double trace_scale, double trace_added) {
  if (!std::isfinite(nu) || !(trace_scale > 0)) return INFINITY;
  const double r = (trace_scale + trace_added) / trace_scale;
  const double v = nu * r * r;
  return v > 1e8 ? INFINITY : v;
}

double ln_t3(double q, double ln_det, double nu) {
  constexpr double ln2pi = 1.8378770664093453;
  if (!std::isfinite(nu)) return -0.5 * (q + ln_det) - 1.5 * ln2pi;
  return std::lgamma(0.5 * (nu + 3)) - std::lgamma(0.5 * nu) - 1.5 * std::log(nu * M_PI) -
         0.5 * ln_det - 0.5 * (nu + 3) * std::log1p(q / nu);
}

double t3_tail(double q, double nu) {
  if (!(q > 0)) return 1;
  if (!std::isfinite(nu))
    return boost::math::cdf(
        boost::math::complement(boost::math::chi_squared_distribution<double>(3), q));
  return boost::math::cdf(
      boost::math::complement(boost::math::fisher_f_distribution<double>(3, nu), q / 3));
}

double normal_equivalent(double t, double nu) {
  if (!std::isfinite(nu)) return t;
  const boost::math::students_t_distribution<double> st(nu);
  const boost::math::normal_distribution<double> n;
  // work in the tail nearer to t so that far tails keep their precision
  if (t > 0) {
    const double p = boost::math::cdf(boost::math::complement(st, t));
    return p > 0 ? -boost::math::quantile(n, p) : 38.5;
  }
  const double p = boost::math::cdf(st, t);
  return p > 0 ? boost::math::quantile(n, p) : -38.5;
}

} // namespace undertow::compare

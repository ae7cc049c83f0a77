#include "undertow/dynamics/resonances.hpp"

#include <boost/math/tools/roots.hpp>
#include <cmath>
#include <cstdio>
#include <functional>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/error.hpp"

namespace undertow::dynamics {
namespace {

std::string fmt(double v) {
  char b[32];
  std::snprintf(b, sizeof b, "%.4g", v);
  return b;
}

// All roots of f(R) = Omega_p in [r_min, r_max]: scan a logarithmic grid for sign changes,
// then refine each bracket with TOMS 748 (Boost.Math).
Resonance find(std::string name, std::string condition, const std::function<double(double)>& f,
               double target, double r_min, double r_max) {
  Resonance res{std::move(name), std::move(condition), {}, {}};
  constexpr int n = 600;
  double lo = INFINITY, hi = -INFINITY;
  double r_prev = r_min, g_prev = f(r_min) - target;
  for (int i = 1; i <= n; ++i) {
    const double r = r_min * std::pow(r_max / r_min, double(i) / n);
    const double g = f(r) - target;
    if (std::isfinite(g)) {
      lo = std::fmin(lo, g + target);
      hi = std::fmax(hi, g + target);
    }
    if (std::isfinite(g) && std::isfinite(g_prev) && (g_prev < 0) != (g < 0)) {
      std::uintmax_t iters = 200;
      auto tol = boost::math::tools::eps_tolerance<double>(48);
      const auto br = boost::math::tools::toms748_solve([&](double x) { return f(x) - target; },
                                                        r_prev, r, g_prev, g, tol, iters);
      res.radii.push_back(0.5 * (br.first + br.second));
    } else if (g == 0) {
      res.radii.push_back(r);
    }
    r_prev = r;
    g_prev = g;
  }
  if (res.radii.empty())
    res.note = "none in [" + fmt(r_min) + ", " + fmt(r_max) +
               "] kpc: " + res.condition.substr(0, res.condition.find(" =")) + " ranges over [" +
               fmt(lo) + ", " + fmt(hi) + "] km/s/kpc there, never " + fmt(target);
  return res;
}

} // namespace

std::vector<Resonance> resonances(const potential::Model& m, double omega_p, int arms, double r_min,
                                  double r_max) {
  if (!std::isfinite(omega_p))
    throw InputError("pattern speed must be finite, got " + std::to_string(omega_p));
  if (arms < 1)
    throw InputError("arms must be a positive whole number, got " + std::to_string(arms));
  if (!(r_min > 0 && r_max > r_min)) throw InputError("resonance search needs 0 < r_min < r_max");
  const double mm = arms;
  const auto Om = [&](double R) { return omega(m, R); };
  const auto Ka = [&](double R) { return kappa(m, R); };
  const std::string ms = std::to_string(arms);
  std::vector<Resonance> out;
  out.push_back(find("corotation", "Omega = Omega_p", Om, omega_p, r_min, r_max));
  out.push_back(find(
      "inner Lindblad", "Omega - kappa/" + ms + " = Omega_p",
      [&](double R) { return Om(R) - Ka(R) / mm; }, omega_p, r_min, r_max));
  out.push_back(find(
      "outer Lindblad", "Omega + kappa/" + ms + " = Omega_p",
      [&](double R) { return Om(R) + Ka(R) / mm; }, omega_p, r_min, r_max));
  out.push_back(find(
      "inner 4:1", "Omega - kappa/4 = Omega_p", [&](double R) { return Om(R) - Ka(R) / 4; },
      omega_p, r_min, r_max));
  out.push_back(find(
      "outer 4:1", "Omega + kappa/4 = Omega_p", [&](double R) { return Om(R) + Ka(R) / 4; },
      omega_p, r_min, r_max));
  return out;
}

} // namespace undertow::dynamics

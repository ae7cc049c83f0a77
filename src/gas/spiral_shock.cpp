#include "undertow/gas/spiral_shock.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>
#include <variant>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/error.hpp"
#include "undertow/units.hpp"

namespace undertow::gas {

namespace {

constexpr double two_pi = 2 * units::pi;

struct Flow {
  double u, v;
};

// The steady equations across the arms; nullopt-free: the caller keeps u away from c and 0.
class Across {
public:
  explicit Across(const ShockProblem& p)
      : p_(p), k_(two_pi / p.spacing), c2_(p.sound_speed * p.sound_speed),
        shear_(p.kappa * p.kappa / (2 * p.omega)) {}
  Flow slope(double x, Flow f) const {
    return {f.u * (2 * p_.omega * f.v - p_.forcing.slope(x, k_)) / (f.u * f.u - c2_),
            -shear_ * (f.u - p_.u0) / f.u};
  }
  Flow step(double x, Flow f, double h) const { // classical fourth-order Runge-Kutta
    const Flow a = slope(x, f);
    const Flow b = slope(x + h / 2, {f.u + h / 2 * a.u, f.v + h / 2 * a.v});
    const Flow c = slope(x + h / 2, {f.u + h / 2 * b.u, f.v + h / 2 * b.v});
    const Flow d = slope(x + h, {f.u + h * c.u, f.v + h * c.v});
    return {f.u + h / 6 * (a.u + 2 * b.u + 2 * c.u + d.u),
            f.v + h / 6 * (a.v + 2 * b.v + 2 * c.v + d.v)};
  }
  double k() const { return k_; }
  double shear() const { return shear_; }

private:
  const ShockProblem& p_;
  double k_, c2_, shear_;
};

// The linear response to every harmonic of the arm, at x: a first guess for the smooth flow.
Flow linear_flow(const ShockProblem& p, double x) {
  const double k = two_pi / p.spacing, c = p.sound_speed;
  const double shear = p.kappa * p.kappa / (2 * p.omega);
  Flow f{p.u0, 0};
  for (std::size_t j = 0; j < p.forcing.cos_terms.size(); ++j) {
    const double nk = (j + 1.0) * k, a = p.forcing.cos_terms[j], b = p.forcing.sin_terms[j];
    const double g = nk * nk / (p.kappa * p.kappa + nk * nk * (c * c - p.u0 * p.u0));
    // u1 = u0 g Phi1_n(x);  v1 = -(shear / u0) * integral of u1.
    f.u += p.u0 * g * (a * std::cos(nk * x) + b * std::sin(nk * x));
    f.v -= shear * g * (a * std::sin(nk * x) - b * std::cos(nk * x)) / nk;
  }
  return f;
}

// Integrates n steps of h from (x0, f0), storing every node; false when the flow reaches the
// sound speed or stops (then the arrays end there).
bool integrate(const Across& eq, double x0, Flow f0, double h, int n, double c, bool supersonic,
               std::vector<Flow>& out) {
  out.assign(1, f0);
  Flow f = f0;
  for (int j = 0; j < n; ++j) {
    f = eq.step(x0 + j * h, f, h);
    if (!std::isfinite(f.u) || !std::isfinite(f.v) || f.u <= 0 || (f.u > c) != supersonic)
      return false;
    out.push_back(f);
  }
  return true;
}

void check_problem(const ShockProblem& p) {
  const auto need = [](bool ok, const std::string& what) {
    if (!ok) throw InputError("arm shock: " + what);
  };
  need(p.omega > 0 && p.kappa > 0, "needs positive Omega and kappa (the circular flow)");
  need(p.sound_speed > 0, "the sound speed must be positive");
  need(p.spacing > 0, "the arm spacing must be positive");
  need(std::isfinite(p.u0) && p.u0 != 0,
       "the circular flow does not cross the arms (corotation): no steady flow to solve");
}

// The same problem seen after a half turn in the plane (x -> -x, y -> -y): the flow then moves
// towards +x. The equations are unchanged by the turn.
ShockProblem turned(const ShockProblem& p) {
  ShockProblem q = p;
  q.u0 = -p.u0;
  for (auto& b : q.forcing.sin_terms)
    b = -b;
  return q;
}

// The shocked flow for one trial sonic point xs: the supersonic branch forward from xs and the
// subsonic branch back from xs + spacing, on the same nodes xs + delta + i h.
struct Trial {
  bool ok = false;
  double xs = 0, vs = 0, mismatch = 0; // v before minus v after at the jump
  double shock = 0;                    // node coordinate of the jump, in steps from xs + delta
  double delta = 0, h = 0;
  std::vector<Flow> sup, sub; // sub[j] at node n - j
};

Trial trial(const ShockProblem& p, const Across& eq, int n, double xs) {
  Trial t;
  t.xs = xs;
  const double c = p.sound_speed, k = eq.k();
  const double q = (p.kappa * p.kappa * (p.u0 - c) / c - p.forcing.curvature(xs, k)) / 2;
  if (!(q > 0)) return t; // no smooth passage through the sound speed here
  const double du = std::sqrt(q), dv = -eq.shear() * (c - p.u0) / c;
  t.vs = p.forcing.slope(xs, k) / (2 * p.omega);
  t.delta = 0.25 * p.spacing / n;
  t.h = (p.spacing - 2 * t.delta) / n;
  integrate(eq, xs + t.delta, {c + du * t.delta, t.vs + dv * t.delta}, t.h, n, c, true, t.sup);
  integrate(eq, xs + p.spacing - t.delta, {c - du * t.delta, t.vs - dv * t.delta}, -t.h, n, c,
            false, t.sub);
  const int first = n - static_cast<int>(t.sub.size()) + 1;
  const int last = static_cast<int>(t.sup.size()) - 1;
  const auto jump = [&](int i) { return t.sup[i].u * t.sub[n - i].u - c * c; };
  // The jump is where the product of the two branches' speeds rises through c^2: nearest the
  // next sonic point, where the subsonic branch approaches c.
  for (int i = last - 1; i >= std::max(first, 0); --i) {
    const double a = jump(i), b = jump(i + 1);
    if (a < 0 && b >= 0) {
      const double f = a / (a - b);
      const auto at = [&](double x0, double x1) { return x0 + f * (x1 - x0); };
      t.shock = i + f;
      t.mismatch = at(t.sup[i].v, t.sup[i + 1].v) - at(t.sub[n - i].v, t.sub[n - i - 1].v);
      t.ok = true;
      return t;
    }
  }
  return t;
}

// The smooth periodic flow: Newton iteration on the return map over one spacing, from the
// linear response.
bool smooth_flow(const ShockProblem& p, const Across& eq, int n, double tol,
                 std::vector<Flow>& out) {
  const double x0 = -0.5 * p.spacing, h = p.spacing / n, c = p.sound_speed;
  const bool fast = p.u0 > c;
  Flow f = linear_flow(p, x0);
  if ((f.u > c) != fast) f.u = p.u0;
  std::vector<Flow> path;
  const auto end = [&](Flow a, Flow& e) {
    if (!integrate(eq, x0, a, h, n, c, fast, path)) return false;
    e = path.back();
    return true;
  };
  for (int it = 0; it < 60; ++it) {
    Flow e, eu, ev;
    if (!end(f, e)) return false;
    const double gu = e.u - f.u, gv = e.v - f.v;
    if (std::hypot(gu, gv) < tol * c) {
      out = path;
      out.pop_back(); // the node at x0 + spacing is the first one again
      return true;
    }
    const double eps = 1e-7 * c;
    if (!end({f.u + eps, f.v}, eu) || !end({f.u, f.v + eps}, ev)) return false;
    const double a = (eu.u - e.u) / eps - 1, b = (ev.u - e.u) / eps;
    const double cc = (eu.v - e.v) / eps, d = (ev.v - e.v) / eps - 1;
    const double det = a * d - b * cc;
    if (!(std::fabs(det) > 0)) return false;
    double su = -(d * gu - b * gv) / det, sv = -(-cc * gu + a * gv) / det;
    // Never step across the sound speed.
    const double room = 0.5 * std::fabs(f.u - c);
    if (std::fabs(su) > room) {
      sv *= room / std::fabs(su);
      su = std::copysign(room, su);
    }
    f.u += su;
    f.v += sv;
  }
  return false;
}

bool shocked_flow(const ShockProblem& p, const Across& eq, int n, ShockProfile& f) {
  const int candidates = 1024;
  std::vector<Trial> tries;
  for (int j = 0; j < candidates; ++j)
    tries.push_back(trial(p, eq, n, -0.5 * p.spacing + p.spacing * j / candidates));
  for (int j = 0; j < candidates; ++j) {
    const Trial& a = tries[j];
    const Trial& b = tries[(j + 1) % candidates];
    if (!a.ok || !b.ok || (a.mismatch < 0) == (b.mismatch < 0)) continue;
    // Bisect on the sonic point between the two candidates.
    double lo = a.xs, hi = b.xs + (j + 1 == candidates ? p.spacing : 0);
    Trial tl = a, best;
    for (int it = 0; it < 60; ++it) {
      const double mid = 0.5 * (lo + hi);
      best = trial(p, eq, n, mid);
      if (!best.ok) break;
      if ((best.mismatch < 0) == (tl.mismatch < 0)) {
        lo = mid;
        tl = best;
      } else {
        hi = mid;
      }
    }
    if (!best.ok || std::fabs(best.mismatch) > 1e-6 * p.sound_speed) continue;
    // The profile on the output grid: supersonic before the jump, subsonic after.
    const double xs = best.xs, xsh = xs + best.delta + best.shock * best.h;
    const auto flow_at = [&](double y) -> Flow {
      while (y < xs)
        y += p.spacing;
      while (y >= xs + p.spacing)
        y -= p.spacing;
      const double s = (y - xs - best.delta) / best.h; // node coordinate
      const Flow sonic{p.sound_speed, best.vs};
      if (y < xsh) {
        if (s <= 0) {
          const double w = (y - xs) / best.delta;
          return {sonic.u + w * (best.sup[0].u - sonic.u), sonic.v + w * (best.sup[0].v - sonic.v)};
        }
        const int i = std::min(static_cast<int>(s), static_cast<int>(best.sup.size()) - 2);
        const double w = s - i;
        return {best.sup[i].u + w * (best.sup[i + 1].u - best.sup[i].u),
                best.sup[i].v + w * (best.sup[i + 1].v - best.sup[i].v)};
      }
      if (s >= n) {
        const double w = (xs + p.spacing - y) / best.delta;
        return {sonic.u + w * (best.sub[0].u - sonic.u), sonic.v + w * (best.sub[0].v - sonic.v)};
      }
      const int i =
          std::max(static_cast<int>(std::ceil(s)), n - static_cast<int>(best.sub.size()) + 2);
      const double w = i - s; // towards node i - 1
      return {best.sub[n - i].u + w * (best.sub[n - i + 1].u - best.sub[n - i].u),
              best.sub[n - i].v + w * (best.sub[n - i + 1].v - best.sub[n - i].v)};
    };
    for (std::size_t i = 0; i < f.x.size(); ++i) {
      const Flow g = flow_at(f.x[i]);
      f.u[i] = g.u;
      f.v[i] = g.v;
    }
    const int i = static_cast<int>(best.shock);
    const double w = best.shock - i;
    f.shocked = true;
    f.u_before = best.sup[i].u + w * (best.sup[i + 1].u - best.sup[i].u);
    f.u_after = best.sub[n - i].u + w * (best.sub[n - i - 1].u - best.sub[n - i].u);
    f.shock_x = std::remainder(xsh, p.spacing);
    f.sonic_x = std::remainder(xs, p.spacing);
    return true;
  }
  return false;
}

} // namespace

double ArmForcing::potential(double x, double k) const {
  double phi = 0;
  for (std::size_t j = 0; j < cos_terms.size(); ++j) {
    const double a = (j + 1.0) * k * x;
    phi += cos_terms[j] * std::cos(a) + sin_terms[j] * std::sin(a);
  }
  return phi;
}

double ArmForcing::curvature(double x, double k) const {
  double d = 0;
  for (std::size_t j = 0; j < cos_terms.size(); ++j) {
    const double nk = (j + 1.0) * k, a = nk * x;
    d -= nk * nk * (cos_terms[j] * std::cos(a) + sin_terms[j] * std::sin(a));
  }
  return d;
}

double ArmForcing::slope(double x, double k) const {
  double d = 0;
  for (std::size_t j = 0; j < cos_terms.size(); ++j) {
    const double nk = (j + 1.0) * k, a = nk * x;
    d += nk * (-cos_terms[j] * std::sin(a) + sin_terms[j] * std::cos(a));
  }
  return d;
}

ArmForcing cosine_arm(double amplitude_kms2) {
  return {{-amplitude_kms2}, {0.0}};
}

ShockProblem shock_problem(const potential::Model& model, std::size_t pattern, double radius_kpc,
                           double sound_speed_kms) {
  if (pattern >= model.patterns.size())
    throw InputError("arm shock: the model has no pattern number " + std::to_string(pattern + 1));
  const auto& pat = model.patterns[pattern];
  if (!(radius_kpc > 0)) throw InputError("arm shock: the radius must be positive");
  ShockProblem p;
  p.radius = radius_kpc;
  p.sound_speed = sound_speed_kms;
  if (const auto* s = std::get_if<potential::LogSpiral>(&pat.shape)) {
    p.pitch_deg = std::atan(1 / s->cotp) / units::deg;
    p.arms = s->m;
  } else if (const auto* g = std::get_if<potential::CoxGomezSpiral>(&pat.shape)) {
    p.pitch_deg = std::asin(g->sin_a) / units::deg;
    p.arms = g->arms;
  } else {
    throw InputError("arm shock: pattern '" + pat.label + "' is a " + pat.kind() +
                     ", not a spiral; the tight-winding flow needs arms with a pitch angle");
  }
  const double sinp = std::sin(p.pitch_deg * units::deg);
  p.omega = dynamics::omega(model, radius_kpc);
  p.kappa = dynamics::kappa(model, radius_kpc);
  p.u0 = radius_kpc * (p.omega - pat.pattern_speed) * sinp;
  p.spacing = two_pi * radius_kpc * sinp / p.arms;

  // Sample the arm potential around the circle over one arm period in azimuth: the phase
  // advances by m per radian there, so x = R sin(p) (psi - psi_trough).
  const double t = pat.growth.end_myr();
  const auto phi_at = [&](double psi) {
    return model.pattern_potential(
        pattern, {-radius_kpc * std::cos(psi), radius_kpc * std::sin(psi), 0.0}, t);
  };
  const int samples = 512;
  const double period = two_pi / p.arms;
  double psi_min = 0, lowest = phi_at(0);
  for (int j = 1; j < samples; ++j) {
    const double psi = period * j / samples, v = phi_at(psi);
    if (v < lowest) lowest = v, psi_min = psi;
  }
  // Refine the trough by golden-section search within one sample either side.
  double a = psi_min - period / samples, b = psi_min + period / samples;
  const double g = (std::sqrt(5.0) - 1) / 2;
  for (int it = 0; it < 60; ++it) {
    const double c1 = b - g * (b - a), c2 = a + g * (b - a);
    if (phi_at(c1) < phi_at(c2))
      b = c2;
    else
      a = c1;
  }
  psi_min = 0.5 * (a + b);
  const int harmonics = 16;
  p.forcing.cos_terms.assign(harmonics, 0.0);
  p.forcing.sin_terms.assign(harmonics, 0.0);
  std::vector<double> phi(samples);
  for (int j = 0; j < samples; ++j)
    phi[j] = phi_at(psi_min + period * j / samples);
  for (int h = 1; h <= harmonics; ++h)
    for (int j = 0; j < samples; ++j) {
      const double arg = two_pi * h * j / samples;
      p.forcing.cos_terms[h - 1] += 2.0 / samples * phi[j] * std::cos(arg);
      p.forcing.sin_terms[h - 1] += 2.0 / samples * phi[j] * std::sin(arg);
    }
  return p;
}

ShockProfile solve_spiral_shock(const ShockProblem& problem, const ShockSettings& set) {
  check_problem(problem);
  if (set.cells < 64) throw InputError("arm shock: at least 64 cells across an arm spacing");
  const bool reverse = problem.u0 < 0;
  const ShockProblem p = reverse ? turned(problem) : problem;
  const int n = set.cells;
  const Across eq(p);
  ShockProfile f;
  f.x.resize(n);
  f.u.resize(n);
  f.v.resize(n);
  f.density.resize(n);
  f.potential.resize(n);
  for (int i = 0; i < n; ++i) {
    f.x[i] = -0.5 * p.spacing + p.spacing * i / n;
    f.potential[i] = p.forcing.potential(f.x[i], eq.k());
  }
  std::vector<Flow> smooth;
  if (smooth_flow(p, eq, n, set.tolerance, smooth)) {
    for (int i = 0; i < n; ++i) {
      f.u[i] = smooth[i].u;
      f.v[i] = smooth[i].v;
    }
    f.converged = true;
  } else if (shocked_flow(p, eq, n, f)) {
    f.converged = true;
  } else {
    f.why = "neither a smooth periodic flow nor a shocked flow through a sonic point was found "
            "(near a resonance, or an arm too strong for this sound speed)";
    return f;
  }
  // S u is the same everywhere; the mean of S is 1.
  double mean_inverse = 0;
  for (int i = 0; i < n; ++i)
    mean_inverse += 1 / f.u[i];
  mean_inverse /= n;
  double lo = 1e300, hi = 0;
  for (int i = 0; i < n; ++i) {
    f.density[i] = 1 / (f.u[i] * mean_inverse);
    lo = std::min(lo, f.density[i]);
    hi = std::max(hi, f.density[i]);
  }
  f.compression = hi / lo;
  // The densest gas is just after the jump, between output nodes: take it from the branches.
  if (f.shocked) f.compression = std::max(hi, 1 / (f.u_after * mean_inverse)) / lo;
  if (reverse) {
    // Back to the problem's own orientation: x -> -x, u, v -> -u, -v. Node i sits at
    // -spacing/2 + i h, so x -> -x maps node i to node n - i (node 0 to itself).
    for (auto* a : {&f.density, &f.u, &f.v, &f.potential})
      std::reverse(a->begin() + 1, a->end());
    for (int i = 0; i < n; ++i) {
      f.u[i] = -f.u[i];
      f.v[i] = -f.v[i];
    }
    f.shock_x = -f.shock_x;
    f.sonic_x = -f.sonic_x;
    f.u_before = -f.u_before;
    f.u_after = -f.u_after;
  }
  return f;
}

LinearArmResponse linear_arm_response(const ShockProblem& p, double amplitude_kms2) {
  const double k = two_pi / p.spacing;
  const double k2 = k * k, c = p.sound_speed;
  LinearArmResponse r;
  r.density = k2 * amplitude_kms2 / (p.kappa * p.kappa + k2 * c * c - k2 * p.u0 * p.u0);
  r.along = p.kappa * p.kappa * r.density / (2 * p.omega * k);
  return r;
}

// The across-arm direction is cos(p) e_R + sin(p) e_psi, the along-arm one -sin(p) e_R +
// cos(p) e_psi (e_psi in the sense of rotation).
double profile_toward_centre(const ShockProblem& p, const ShockProfile& f, std::size_t i) {
  const double sp = std::sin(p.pitch_deg * units::deg), cp = std::cos(p.pitch_deg * units::deg);
  const double vr = (f.u[i] - p.u0) * cp - f.v[i] * sp;
  return -vr;
}

double profile_along_rotation(const ShockProblem& p, const ShockProfile& f, std::size_t i) {
  const double sp = std::sin(p.pitch_deg * units::deg), cp = std::cos(p.pitch_deg * units::deg);
  return (f.u[i] - p.u0) * sp + f.v[i] * cp;
}

io::Table shock_profile_table(const ShockProblem& p, const ShockProfile& f) {
  io::Table t;
  t.title = "Steady isothermal flow across the arms at R = " + io::format_number(p.radius, 6) +
            " kpc (Roberts 1969)";
  t.columns = {{"x_kpc", "x", "x", "kpc", 8},
               {"phase_deg", "\\chi", "χ", "deg", 8},
               {"arm_potential_km2_s2", "\\Phi_1", "Φ1", "(km/s)^2", 8},
               {"density_ratio", "\\Sigma/\\bar\\Sigma", "Σ/⟨Σ⟩", "", 8},
               {"u_across_kms", "u_\\perp", "u⊥", "km/s", 8},
               {"v_along_kms", "v_\\parallel", "v∥", "km/s", 8},
               {"U_s_kms", "U_s", "U_s", "km/s", 8},
               {"V_s_kms", "V_s", "V_s", "km/s", 8}};
  for (std::size_t i = 0; i < f.x.size(); ++i)
    t.add_row({f.x[i], 360 * f.x[i] / p.spacing, f.potential[i], f.density[i], f.u[i], f.v[i],
               profile_toward_centre(p, f, i), profile_along_rotation(p, f, i)});
  t.notes.push_back("x across the arms from the potential trough, positive in the direction of "
                    "the phase gradient (outward and forward); U_s toward the centre, V_s in the "
                    "sense of rotation, both relative to the circular flow");
  return t;
}

std::string describe_shock(const ShockProblem& p, const ShockProfile& f) {
  std::ostringstream o;
  const auto num = [](double v, int d = 4) { return io::format_number(v, d); };
  o << "arm flow at R = " << num(p.radius) << " kpc: m = " << p.arms << ", pitch "
    << num(p.pitch_deg) << " deg, arm spacing " << num(p.spacing) << " kpc, Omega " << num(p.omega)
    << " and kappa " << num(p.kappa) << " km/s/kpc\n"
    << "  circular flow across the arms u0 = " << num(p.u0) << " km/s, sound speed "
    << num(p.sound_speed) << " km/s (Mach " << num(std::fabs(p.u0) / p.sound_speed, 3) << ")\n";
  if (!f.converged) {
    o << "  WARNING: no steady flow: " << f.why << "\n";
    return o.str();
  }
  double sum = 0, lag = 0;
  for (std::size_t i = 0; i < f.x.size(); ++i) {
    sum += f.density[i];
    lag += f.density[i] * profile_along_rotation(p, f, i);
  }
  o << "  densest/thinnest gas " << num(f.compression) << "; mass-weighted mean V_s "
    << num(lag / sum, 3) << " km/s\n";
  if (f.shocked)
    o << "  shock at x = " << num(f.shock_x) << " kpc (phase " << num(360 * f.shock_x / p.spacing)
      << " deg from the trough): u drops from " << num(f.u_before) << " to " << num(f.u_after)
      << " km/s, u1 u2 / c^2 = " << num(f.u_before * f.u_after / (p.sound_speed * p.sound_speed))
      << "; sonic point at x = " << num(f.sonic_x) << " kpc\n";
  else
    o << "  no shock: the flow stays on one side of the sound speed\n";
  return o.str();
}

} // namespace undertow::gas

#pragma once
// The steady flow of an isothermal gas through tightly wound spiral arms (Roberts 1969, ApJ
// 158, 123; Shu, Milione & Roberts 1973, ApJ 183, 819): one dimension across the arms, x along
// the gradient of the arm phase, y along the arms. The steady flow obeys
//   (u - c^2 / u) du/dx = 2 Omega v - dPhi1/dx,      u dv/dx = -(kappa^2 / (2 Omega)) (u - u0),
//   S u = const,
// u the speed across the arms (u0 that of the circular flow, R (Omega - Omega_p) sin p), v the
// speed along the arms relative to the circular flow, S the surface density over its mean.
// A weak arm gives a smooth periodic flow: found by Newton iteration on the return map over
// one arm spacing. A strong arm gives a transonic flow: it accelerates smoothly through a sonic
// point (u = c, 2 Omega v = dPhi1/dx, the slope from l'Hopital's rule) and returns to subsonic
// speed through a shock with the isothermal jump u1 u2 = c^2, v continuous. The sonic point is
// the one whose supersonic branch (integrated forward) and subsonic branch (integrated back
// from the next sonic point) meet the jump condition with equal v; the integrations are
// fourth-order Runge-Kutta on the output grid.
#include <cstddef>
#include <string>
#include <vector>

#include "undertow/io/table.hpp"
#include "undertow/potential/model.hpp"

namespace undertow::gas {

// The arm potential across one arm spacing as a Fourier series in the phase 2 pi x / spacing
// (x = 0 at the potential's trough): Phi1(x) = sum_n a_n cos(n k x) + b_n sin(n k x).
struct ArmForcing {
  std::vector<double> cos_terms, sin_terms; // (km/s)^2, n = 1, 2, ...
  double potential(double x, double k) const;
  double slope(double x, double k) const;     // dPhi1/dx, (km/s)^2/kpc
  double curvature(double x, double k) const; // d^2Phi1/dx^2, (km/s/kpc)^2
};

struct ShockProblem {
  double radius = 8;      // kpc
  double pitch_deg = 12;  // of the arms, trailing
  int arms = 2;           // m
  double omega = 27.5;    // km/s/kpc, of the circular flow at the radius
  double kappa = 38.9;    // km/s/kpc
  double u0 = 20;         // km/s, the circular flow's speed across the arms (sign: direction)
  double sound_speed = 8; // km/s, effective (isothermal) sound speed of the gas
  double spacing = 5.2;   // kpc, between arms measured across them: 2 pi R sin p / m
  ArmForcing forcing;     // Phi1 across one spacing
};

// A pure cosine arm, Phi1 = -amplitude cos(2 pi x / spacing): the form of a logarithmic spiral.
ArmForcing cosine_arm(double amplitude_kms2);

// The problem at radius R for pattern number `pattern` of a model (a log-spiral or a
// Cox-Gomez spiral, at full amplitude), its frequencies from the axisymmetric part. The arm
// potential is sampled around the circle at R in the midplane.
ShockProblem shock_problem(const potential::Model& model, std::size_t pattern, double radius_kpc,
                           double sound_speed_kms);

struct ShockSettings {
  int cells = 2048;         // integration steps (and output cells) across one arm spacing
  double tolerance = 1e-10; // of the periodic solution's return map, relative to c
};

struct ShockProfile {
  std::vector<double> x;         // kpc, cell centres, 0 = potential trough, flow towards +x
  std::vector<double> density;   // surface density over its mean
  std::vector<double> u;         // km/s across the arms
  std::vector<double> v;         // km/s along the arms, relative to the circular flow
  std::vector<double> potential; // Phi1, (km/s)^2
  bool converged = false;        // a periodic (smooth or shocked) solution was found
  std::string why;               // when not: what failed
  // The shock: where the flow drops from supersonic to subsonic, if it does.
  bool shocked = false;
  double shock_x = 0;     // kpc
  double sonic_x = 0;     // kpc, the sonic point of a shocked flow
  double u_before = 0;    // km/s, just upstream
  double u_after = 0;     // km/s, just downstream
  double compression = 0; // densest over thinnest
};

ShockProfile solve_spiral_shock(const ShockProblem& p, const ShockSettings& s = {});

// The linear (weak-arm) response to a cosine arm Phi1 = -A cos(k x), without self-gravity:
// S = 1 + s1 cos(k x), u = u0 - u0 s1 cos(k x), v = v1 sin(k x), with
// s1 = k^2 A / (kappa^2 + k^2 c^2 - k^2 u0^2), v1 = kappa^2 s1 / (2 Omega k)
// (from the equations above, linearised; the WKB gas response, Binney & Tremaine 2008, §6.2).
struct LinearArmResponse {
  double density = 0; // s1
  double along = 0;   // v1, km/s
};
LinearArmResponse linear_arm_response(const ShockProblem& p, double amplitude_kms2);

// Peculiar motions in the Galaxy's terms: U toward the centre, V in the sense of rotation,
// relative to the circular flow (docs/conventions.md), at profile cell i.
double profile_toward_centre(const ShockProblem& p, const ShockProfile& f, std::size_t i);
double profile_along_rotation(const ShockProblem& p, const ShockProfile& f, std::size_t i);

io::Table shock_profile_table(const ShockProblem& p, const ShockProfile& f);
std::string describe_shock(const ShockProblem& p, const ShockProfile& f);

} // namespace undertow::gas

#include "undertow/dynamics/profile.hpp"

#include <cmath>
#include <cstdio>

#include "undertow/dynamics/frequencies.hpp"
#include "undertow/dynamics/mass.hpp"
#include "undertow/error.hpp"
#include "undertow/units.hpp"

namespace undertow::dynamics {

std::vector<double> radius_grid(double from, double to, double step) {
  if (!(from > 0) || !std::isfinite(from))
    throw InputError("radius grid: the first radius must be positive");
  if (!(to >= from) || !std::isfinite(to))
    throw InputError("radius grid: the last radius must not be below the first");
  if (!(step > 0) || !std::isfinite(step))
    throw InputError("radius grid: the step must be positive");
  const long n = std::lround(std::floor((to - from) / step * (1 + 1e-12))) + 1;
  if (n > 100000) throw InputError("radius grid: more than 100000 radii; use a larger step");
  std::vector<double> r;
  for (long i = 0; i < n; ++i)
    r.push_back(from + double(i) * step);
  return r;
}

io::Table model_profile(const potential::Model& m, const std::vector<double>& radii,
                        std::optional<double> escape_to) {
  io::Table t;
  t.title = "Midplane profile of model '" + m.name + "'";
  t.columns.push_back({"R_kpc", "R", "R", "kpc", 6});
  t.columns.push_back({"vc_kms", "v_c", "v_c", "km/s", 6});
  for (const auto& c : m.components)
    t.columns.push_back(
        {"vc_" + c.label + "_kms", "v_{c," + c.label + "}", "v_c," + c.label, "km/s", 6});
  t.columns.push_back({"omega_kms_kpc", "\\Omega", "Ω", "km/s/kpc", 6});
  t.columns.push_back({"kappa_kms_kpc", "\\kappa", "κ", "km/s/kpc", 6});
  t.columns.push_back({"nu_kms_kpc", "\\nu", "ν", "km/s/kpc", 6});
  t.columns.push_back({"oort_a_kms_kpc", "A", "A", "km/s/kpc", 5});
  t.columns.push_back({"oort_b_kms_kpc", "B", "B", "km/s/kpc", 5});
  const bool escape = escape_to || m.vanishes_at_infinity();
  if (escape) t.columns.push_back({"vesc_kms", "v_{\\rm esc}", "v_esc", "km/s", 6});
  t.columns.push_back({"mass_enclosed_msun", "M(<r)", "M(<r)", "Msun", 5});
  t.columns.push_back({"rho_midplane_msun_pc3", "\\rho(R, 0)", "ρ(R,0)", "Msun/pc^3", 5});
  if (escape)
    t.notes.push_back(escape_to ? "escape speed to r = " + format_number_kpc(*escape_to)
                                : "escape speed to infinity");
  else
    t.notes.push_back(
        "no escape speed: the potential does not vanish at infinity (give a radius to escape to)");
  t.notes.push_back("M(<r): mass inside the sphere of radius r = R; axisymmetric components only");
  for (double R : radii) {
    if (!(R > 0)) throw InputError("profile radii must be positive");
    std::vector<double> row{R, circular_speed(m, R)};
    for (std::size_t i = 0; i < m.components.size(); ++i)
      row.push_back(circular_speed_component(m, i, R));
    row.push_back(omega(m, R));
    row.push_back(kappa(m, R));
    row.push_back(nu(m, R));
    row.push_back(oort_a(m, R));
    row.push_back(oort_b(m, R));
    if (escape) row.push_back(escape_speed(m, R, escape_to));
    row.push_back(enclosed_mass(m, R));
    row.push_back(m.axisymmetric_density({R, 0, 0}) / units::msun_pc3);
    t.add_row(std::move(row));
  }
  return t;
}

std::string format_number_kpc(double r) {
  char b[48];
  std::snprintf(b, sizeof b, "%.4g kpc", r);
  return b;
}

std::string describe_resonances(const std::vector<Resonance>& res, double omega_p, int arms,
                                const std::string& label) {
  char head[160];
  std::snprintf(head, sizeof head, "Resonances of %s: Omega_p = %.4g km/s/kpc, m = %d\n",
                label.c_str(), omega_p, arms);
  std::string s = head;
  for (const auto& r : res) {
    if (arms == 4 && r.name.find("4:1") != std::string::npos) {
      s += "  (the 4:1 resonances coincide with the Lindblad resonances for m = 4)\n";
      break;
    }
    char b[96];
    std::snprintf(b, sizeof b, "  %-15s %-28s ", r.name.c_str(), ("(" + r.condition + ")").c_str());
    s += b;
    if (r.radii.empty()) {
      s += r.note;
    } else {
      for (std::size_t i = 0; i < r.radii.size(); ++i) {
        char v[32];
        std::snprintf(v, sizeof v, "%s%.3f", i ? ", " : "", r.radii[i]);
        s += v;
      }
      s += " kpc";
    }
    s += "\n";
  }
  return s;
}

} // namespace undertow::dynamics

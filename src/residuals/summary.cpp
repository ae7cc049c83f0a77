#include "undertow/residuals/summary.hpp"

#include <cmath>
#include <map>

#include "undertow/tracers/random.hpp"

namespace undertow::residuals {
namespace {

void mean_sd(const std::vector<double>& v, double& m, double& sd) {
  m = 0;
  for (double x : v)
    m += x;
  m /= double(v.size());
  double s = 0;
  for (double x : v)
    s += (x - m) * (x - m);
  sd = v.size() > 1 ? std::sqrt(s / double(v.size() - 1)) : NAN;
}

} // namespace

Moments bootstrap_moments(const std::vector<double>& v, int resamples, std::uint64_t seed,
                          std::uint64_t stream) {
  Moments m;
  if (v.empty()) return {NAN, NAN, NAN, NAN};
  mean_sd(v, m.mean, m.dispersion);
  tracers::TracerStream rng(seed, stream, 0xb007);
  std::vector<double> means, sds, sample(v.size());
  for (int b = 0; b < resamples; ++b) {
    for (auto& x : sample)
      x = v[std::size_t(rng.uniform() * double(v.size())) % v.size()];
    double mm, ss;
    mean_sd(sample, mm, ss);
    means.push_back(mm);
    sds.push_back(ss);
  }
  double a, b;
  mean_sd(means, a, m.mean_err);
  mean_sd(sds, b, m.dispersion_err);
  return m;
}

std::vector<Summary> summarise(const ResidualResult& r, int resamples, std::uint64_t seed) {
  std::map<std::string, std::vector<const SourceResidual*>> groups;
  for (const auto& s : r.sources)
    if (!s.group.empty()) groups[s.group].push_back(&s);
  std::vector<std::pair<std::string, std::vector<const SourceResidual*>>> sets;
  std::vector<const SourceResidual*> all;
  for (const auto& s : r.sources)
    all.push_back(&s);
  sets.emplace_back("all", all);
  for (auto& [g, v] : groups)
    sets.emplace_back(g, v);
  std::vector<Summary> out;
  std::uint64_t stream = 0;
  for (const auto& [name, members] : sets) {
    Summary s;
    s.group = name;
    s.n = members.size();
    for (int a = 0; a < 3; ++a) {
      std::vector<double> v;
      for (const auto* m : members)
        v.push_back(m->uvw[a]);
      const auto mo = bootstrap_moments(v, resamples, seed, stream++);
      s.mean[a] = mo.mean, s.mean_err[a] = mo.mean_err;
      s.dispersion[a] = mo.dispersion, s.dispersion_err[a] = mo.dispersion_err;
    }
    out.push_back(s);
  }
  return out;
}

io::Table source_table(const ResidualResult& r) {
  io::Table t;
  t.title = "Peculiar motions of the catalog's sources";
  t.text_headers = {"name"};
  t.columns = {{"distance_kpc", "d", "d", "kpc", 5},
               {"R_kpc", "R", "R", "kpc", 5},
               {"psi_deg", "\\psi", "ψ", "deg", 5},
               {"z_kpc", "z", "z", "kpc", 4},
               {"U_kms", "U_s", "U_s", "km/s", 4},
               {"U_err_kms", "\\sigma_U", "σ_U", "km/s", 3},
               {"V_kms", "V_s", "V_s", "km/s", 4},
               {"V_err_kms", "\\sigma_V", "σ_V", "km/s", 3},
               {"W_kms", "W_s", "W_s", "km/s", 4},
               {"W_err_kms", "\\sigma_W", "σ_W", "km/s", 3},
               {"U_err_linear_kms", "\\sigma_U^{\\rm lin}", "σ_U(lin)", "km/s", 3},
               {"V_err_linear_kms", "\\sigma_V^{\\rm lin}", "σ_V(lin)", "km/s", 3},
               {"W_err_linear_kms", "\\sigma_W^{\\rm lin}", "σ_W(lin)", "km/s", 3},
               {"frac_parallax_err", "\\sigma_\\varpi/\\varpi", "σ_ϖ/ϖ", "", 3}};
  for (const auto& s : r.sources) {
    t.text_rows.push_back({s.name});
    t.add_row({s.distance_kpc, s.R_kpc, s.psi_deg, s.z_kpc, s.uvw[0], std::sqrt(s.mc_cov[0]),
               s.uvw[1], std::sqrt(s.mc_cov[4]), s.uvw[2], std::sqrt(s.mc_cov[8]),
               std::sqrt(s.lin_cov[0]), std::sqrt(s.lin_cov[4]), std::sqrt(s.lin_cov[8]),
               s.frac_parallax_err});
  }
  return t;
}

io::Table summary_table(const std::vector<Summary>& s) {
  io::Table t;
  t.title = "Mean peculiar motions and dispersions (bootstrap errors)";
  t.text_headers = {"group"};
  t.columns = {{"n", "N", "N", "", 6}};
  const char* names[] = {"U", "V", "W"};
  for (int a = 0; a < 3; ++a) {
    const std::string n = names[a];
    t.columns.push_back(
        {"mean_" + n + "_kms", "\\langle " + n + "_s\\rangle", "⟨" + n + "_s⟩", "km/s", 4});
    t.columns.push_back({"mean_" + n + "_err_kms", "\\pm", "±", "km/s", 3});
    t.columns.push_back({"sigma_" + n + "_kms", "\\sigma_" + n, "σ_" + n, "km/s", 4});
    t.columns.push_back({"sigma_" + n + "_err_kms", "\\pm", "±", "km/s", 3});
  }
  for (std::size_t i = 0; i < s.size(); ++i) {
    std::vector<double> row{double(s[i].n)};
    for (int a = 0; a < 3; ++a)
      row.insert(row.end(),
                 {s[i].mean[a], s[i].mean_err[a], s[i].dispersion[a], s[i].dispersion_err[a]});
    t.text_rows.push_back({s[i].group});
    t.add_row(row);
  }
  return t;
}

} // namespace undertow::residuals

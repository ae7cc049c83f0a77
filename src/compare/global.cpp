#include "undertow/compare/global.hpp"

#include <stdexcept>

#include <cmath>
#include <cstdio>
#include <set>

#include "undertow/compare/statistics.hpp"
#include "undertow/residuals/summary.hpp"

namespace undertow::compare {
namespace {

SampleStats stats(const std::vector<double>& v, int resamples, std::uint64_t seed,
                  std::uint64_t stream) {
  SampleStats s;
  s.n = v.size();
  const auto m = residuals::bootstrap_moments(v, resamples, seed, stream);
  s.mean = m.mean, s.mean_err = m.mean_err, s.dispersion = m.dispersion;
  s.median = median(v);
  s.robust_dispersion = robust_dispersion(v);
  return s;
}

// A bin's label that reads as a range, also for negative edges: "psi -40 to -20 deg".
std::string range(const char* what, double lo, double hi, const char* unit) {
  char b[128];
  std::snprintf(b, sizeof b, "%s %.10g to %.10g %s", what, lo, hi, unit);
  return b;
}

} // namespace

ComponentComparison compare_samples(const std::vector<double>& a, const std::vector<double>& b,
                                    int resamples, std::uint64_t seed, std::uint64_t stream) {
  ComponentComparison c;
  c.measured = stats(a, resamples, seed, 2 * stream);
  c.simulated = stats(b, resamples, seed, 2 * stream + 1);
  c.difference = c.measured.mean - c.simulated.mean;
  c.difference_err = std::hypot(c.measured.mean_err, c.simulated.mean_err);
  c.pull = c.difference_err > 0 ? c.difference / c.difference_err : 0;
  c.ks_p = ks_two_sample(a, b).p_value;
  c.ad_p = anderson_darling({a, b}).p_value;
  return c;
}

const SubsetComparison& GlobalComparison::all() const {
  if (subsets.empty() || subsets.front().label != "all")
    throw std::logic_error("global comparison: the subset of all sources was left out");
  return subsets.front();
}

GlobalComparison compare_globally(const residuals::ResidualResult& m,
                                  const residuals::ResidualResult& s, const Binning& bins,
                                  int resamples, std::uint64_t seed) {
  GlobalComparison g;
  struct Subset {
    std::string label;
    std::vector<const residuals::SourceResidual*> a, b;
  };
  std::vector<Subset> subsets;
  const auto all = [](const residuals::ResidualResult& r, auto&& pred) {
    std::vector<const residuals::SourceResidual*> out;
    for (const auto& x : r.sources)
      if (pred(x)) out.push_back(&x);
    return out;
  };
  const auto yes = [](const auto&) { return true; };
  subsets.push_back({"all", all(m, yes), all(s, yes)});
  for (std::size_t i = 0; i + 1 < bins.radius_edges_kpc.size(); ++i) {
    const double lo = bins.radius_edges_kpc[i], hi = bins.radius_edges_kpc[i + 1];
    const auto in = [&](const auto& x) { return x.R_kpc >= lo && x.R_kpc < hi; };
    subsets.push_back({range("R", lo, hi, "kpc"), all(m, in), all(s, in)});
  }
  for (std::size_t i = 0; i + 1 < bins.azimuth_edges_deg.size(); ++i) {
    const double lo = bins.azimuth_edges_deg[i], hi = bins.azimuth_edges_deg[i + 1];
    const auto in = [&](const auto& x) { return x.psi_deg >= lo && x.psi_deg < hi; };
    subsets.push_back({range("psi", lo, hi, "deg"), all(m, in), all(s, in)});
  }
  std::set<std::string> groups;
  for (const auto& x : m.sources)
    if (!x.group.empty()) groups.insert(x.group);
  for (const auto& label : groups) {
    const auto same = [&](const auto& x) { return x.group == label; };
    auto sim = all(s, same); // simulations usually carry no labels: then all their sources
    subsets.push_back({"group " + label, all(m, same), sim.empty() ? all(s, yes) : sim});
  }
  std::uint64_t stream = 0;
  for (const auto& sub : subsets) {
    if (sub.a.size() < 3 || sub.b.size() < 3) {
      g.notes.push_back(sub.label + ": left out (" + std::to_string(sub.a.size()) + " measured, " +
                        std::to_string(sub.b.size()) + " simulated sources)");
      continue;
    }
    SubsetComparison out;
    out.label = sub.label;
    for (int c = 0; c < 3; ++c) {
      std::vector<double> a, b;
      for (const auto* x : sub.a)
        a.push_back(x->uvw[c]);
      for (const auto* x : sub.b)
        b.push_back(x->uvw[c]);
      out.uvw[std::size_t(c)] = compare_samples(a, b, resamples, seed, stream++);
    }
    g.subsets.push_back(std::move(out));
  }
  g.notes.push_back("groups are compared with the simulated sources of the same label, or with all "
                    "of them when the simulation has none; p-values of the Anderson-Darling "
                    "test are clipped to [0.001, 0.25] (Scholz & Stephens 1987 table)");
  return g;
}

io::Table global_table(const GlobalComparison& g) {
  io::Table t;
  t.title = "Measured vs simulated peculiar motions";
  t.text_headers = {"subset", "component"};
  t.columns = {{"n_meas", "N_{\\rm meas}", "N_meas", "", 6},
               {"n_sim", "N_{\\rm sim}", "N_sim", "", 6},
               {"mean_meas_kms", "\\langle v\\rangle_{\\rm meas}", "mean_meas", "km/s", 4},
               {"mean_meas_err_kms", "\\pm", "±", "km/s", 3},
               {"mean_sim_kms", "\\langle v\\rangle_{\\rm sim}", "mean_sim", "km/s", 4},
               {"mean_sim_err_kms", "\\pm", "±", "km/s", 3},
               {"difference_kms", "\\Delta", "Δ", "km/s", 4},
               {"pull", "\\Delta/\\sigma_\\Delta", "Δ/σ_Δ", "", 3},
               {"median_meas_kms", "{\\rm med}_{\\rm meas}", "med_meas", "km/s", 4},
               {"median_sim_kms", "{\\rm med}_{\\rm sim}", "med_sim", "km/s", 4},
               {"sigma_meas_kms", "\\sigma_{\\rm meas}", "σ_meas", "km/s", 4},
               {"sigma_sim_kms", "\\sigma_{\\rm sim}", "σ_sim", "km/s", 4},
               {"robust_sigma_meas_kms", "\\sigma^{\\rm MAD}_{\\rm meas}", "σMAD_meas", "km/s", 4},
               {"robust_sigma_sim_kms", "\\sigma^{\\rm MAD}_{\\rm sim}", "σMAD_sim", "km/s", 4},
               {"ks_p", "p_{\\rm KS}", "p_KS", "", 3},
               {"ad_p", "p_{\\rm AD}", "p_AD", "", 3}};
  const char* comp[] = {"U_s", "V_s", "W_s"};
  for (const auto& sub : g.subsets)
    for (int c = 0; c < 3; ++c) {
      const auto& r = sub.uvw[std::size_t(c)];
      t.add_row({sub.label, comp[c]},
                {double(r.measured.n), double(r.simulated.n), r.measured.mean, r.measured.mean_err,
                 r.simulated.mean, r.simulated.mean_err, r.difference, r.pull, r.measured.median,
                 r.simulated.median, r.measured.dispersion, r.simulated.dispersion,
                 r.measured.robust_dispersion, r.simulated.robust_dispersion, r.ks_p, r.ad_p});
    }
  t.notes = g.notes;
  return t;
}

} // namespace undertow::compare

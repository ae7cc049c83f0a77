#include "undertow/sweep/gather.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <map>
#include <numeric>
#include <optional>

#include "undertow/io/hdf5.hpp"
#include "undertow/io/staged_folder.hpp"
#include "undertow/io/table.hpp"
#include "undertow/io/table_hdf5.hpp"
#include "undertow/io/toml_writer.hpp"
#include "undertow/io/unit_notation.hpp"
#include "undertow/sweep/key_path.hpp"
#include "undertow/sweep/posterior.hpp"

namespace undertow::sweep {
namespace {

namespace fs = std::filesystem;

using R = const PointResult&;

struct Stat {
  const char* name;
  const char* latex;
  const char* plain;
  const char* unit;
  int precision;
  bool descending;                        // larger is better
  double (*value)(R r, double ref_log_l); // from a point's result
};

const Stat stats[] = {
    // stats[1] is ln L, the order when there is no delta ln L
    {"delta_log_likelihood", "\\Delta\\ln L", "Δ ln L", "", 7, true,
     [](R r, double ref) { return r.log_likelihood - ref; }},
    {"log_likelihood", "\\ln L", "ln L", "", 8, true, [](R r, double) { return r.log_likelihood; }},
    {"log_likelihood_scatter", "s_{\\ln L}", "scatter", "", 3, false,
     [](R r, double) { return r.log_likelihood_scatter; }},
    {"realisations", "K", "K", "", 3, false, [](R r, double) { return double(r.realisations); }},
    {"chi2", "\\chi^2", "χ²", "", 7, false, [](R r, double) { return r.chi2; }},
    {"measured_sources", "N", "N", "", 6, false,
     [](R r, double) { return double(r.measured_sources); }},
    {"outliers", "N_{>3\\sigma}", "N>3σ", "", 6, false,
     [](R r, double) { return double(r.outliers); }},
    {"mean_U_simulated_kms", "\\langle U_s\\rangle_{\\rm sim}", "⟨U_s⟩_sim", "km/s", 4, false,
     [](R r, double) { return r.mean_simulated[0]; }},
    {"mean_V_simulated_kms", "\\langle V_s\\rangle_{\\rm sim}", "⟨V_s⟩_sim", "km/s", 4, false,
     [](R r, double) { return r.mean_simulated[1]; }},
    {"mean_V_measured_kms", "\\langle V_s\\rangle_{\\rm meas}", "⟨V_s⟩_meas", "km/s", 4, false,
     [](R r, double) { return r.mean_measured[1]; }},
    {"mean_V_pull", "\\Delta V/\\sigma", "ΔV/σ", "", 3, false,
     [](R r, double) { return r.pull[1]; }},
};

} // namespace

std::string sortable_statistics() {
  std::string list = "number";
  for (const auto& s : stats)
    list += std::string(", ") + s.name;
  return list;
}

namespace {

// A swept value as a number (NaN for the reference, which has none).
double parameter_value(const Point& q, std::size_t j) {
  return q.reference ? NAN : q.values.get(j)->value<double>().value_or(NAN);
}

std::string latex_name(const std::string& s) {
  std::string o = "\\mathrm{";
  for (char c : s)
    o += c == '_' ? std::string("\\_") : std::string(1, c);
  return o + "}";
}

bool numeric_parameter(const Plan& p, std::size_t j) {
  for (const auto& q : p.points)
    if (!q.reference && !(q.values.get(j)->is_integer() || q.values.get(j)->is_floating_point()))
      return false;
  return true;
}

} // namespace

GatherReport gather(const Plan& p, const GatherOptions& o) {
  const bool has_ref = !p.reference.empty();
  std::vector<const Stat*> columns; // statistics shown
  for (const auto& s : stats)
    if (has_ref || std::string(s.name) != "delta_log_likelihood") columns.push_back(&s);

  const std::string sort =
      o.sort.empty() ? (has_ref ? "delta_log_likelihood" : "log_likelihood") : o.sort;
  bool descending = false;
  bool known = sort == "number";
  const Stat* sort_stat = nullptr;
  for (const auto& s : stats)
    if (sort == s.name) known = true, descending = s.descending, sort_stat = &s;
  for (std::size_t j = 0; j < p.parameters.size(); ++j)
    if (sort == p.parameters[j]) {
      if (!numeric_parameter(p, j))
        throw InputError(SourcePlace{"", 0, 0, "--sort"},
                         "'" + sort + "' has values that are not numbers; sort by a statistic");
      known = true;
    }
  if (sort == "delta_log_likelihood" && !has_ref)
    throw InputError(SourcePlace{"", 0, 0, "--sort"},
                     "delta_log_likelihood needs a reference model in the sweep ([sweep] "
                     "reference = ...)");
  if (!known && (sort == "mean_V_significance" || sort == "V_significance"))
    throw InputError(SourcePlace{"", 0, 0, "--sort"},
                     "'" + sort +
                         "' is renamed mean_V_pull (a difference over its error is a "
                         "pull; docs/migration.md)");
  if (!known) {
    std::string list = "number";
    for (const auto* c : columns)
      list += ", " + std::string(c->name);
    for (const auto& k : p.parameters)
      list += ", " + k;
    throw InputError(SourcePlace{"", 0, 0, "--sort"},
                     "unknown statistic '" + sort + "'; one of: " + list);
  }
  if (o.order == "ascending")
    descending = false;
  else if (o.order == "descending")
    descending = true;
  else if (!o.order.empty())
    throw InputError(SourcePlace{"", 0, 0, "--order"}, "must be ascending or descending");

  GatherReport rep;
  std::vector<PointStatus> status;
  for (const auto& q : p.points) {
    status.push_back(point_status(p, q));
    const auto& st = status.back();
    const std::string label = "point " + std::to_string(q.number) + " (" + q.id + ")";
    switch (st.state) {
    case PointStatus::State::complete:
      ++rep.complete;
      break;
    case PointStatus::State::failed:
    case PointStatus::State::error:
      rep.failed.push_back(label + ": " + st.detail);
      break;
    case PointStatus::State::corrupt:
      rep.missing.push_back(label + ": " + st.detail + "; run the shard again");
      break;
    default:
      rep.missing.push_back(label + ": " + state_name(st.state));
      break;
    }
  }
  const bool whole = rep.missing.empty() && rep.failed.empty();
  if (!whole && !o.partial && !o.posterior_required) return rep;

  // The posterior, made before anything is written so that a required one that fails leaves
  // nothing behind.
  std::optional<SweepPosterior> post;
  std::vector<std::string> post_keys, post_units;
  try {
    if (!whole)
      throw InputError(SourcePlace{"", 0, 0, "posterior"},
                       "the sweep is incomplete; a posterior needs every point");
    for (std::size_t j = 0; j < p.parameters.size(); ++j) {
      if (!numeric_parameter(p, j))
        throw InputError(SourcePlace{"", 0, 0, "posterior"},
                         "'" + p.parameters[j] + "' has values that are not numbers");
      post_keys.push_back(p.parameters[j]);
      post_units.push_back(io::unit_of_name(parse_key_path(p.parameters[j]).back().key));
    }
    // replicates of one parameter set are one point: their mean ln L; its error from each
    // run's realisations (scatter^2 / K) or, with one realisation each, from the replicates
    std::map<std::vector<double>, std::vector<const PointResult*>> groups;
    for (std::size_t i = 0; i < p.points.size(); ++i) {
      if (p.points[i].reference) continue;
      std::vector<double> v;
      for (std::size_t j = 0; j < p.parameters.size(); ++j)
        v.push_back(parameter_value(p.points[i], j));
      groups[v].push_back(&status[i].result);
    }
    std::vector<PosteriorPoint> pts;
    for (const auto& [v, rs] : groups) {
      PosteriorPoint q;
      q.values = v;
      double var_real = 0, m = 0;
      for (const auto* r : rs) {
        m += r->log_likelihood / double(rs.size());
        if (r->realisations > 1)
          var_real += r->log_likelihood_scatter * r->log_likelihood_scatter /
                      double(r->realisations) / double(rs.size() * rs.size());
      }
      double var_rep = 0;
      if (rs.size() > 1) {
        for (const auto* r : rs)
          var_rep += (r->log_likelihood - m) * (r->log_likelihood - m);
        var_rep /= double(rs.size() - 1) * double(rs.size());
      }
      q.log_likelihood = m;
      q.error = std::sqrt(std::max(var_real, var_rep));
      pts.push_back(q);
    }
    PosteriorOptions po;
    po.grid = p.design == "grid";
    po.edge_mass = o.edge_mass;
    post = sweep_posterior(post_keys, post_units, pts, po);
  } catch (const InputError& e) {
    std::string why = e.what();
    if (why.rfind("posterior: ", 0) == 0) why = why.substr(11);
    if (o.posterior_required) throw InputError(SourcePlace{p.file, 0, 0, "posterior"}, why);
    rep.posterior_refused = why;
  }
  if (!whole && !o.partial) return rep;
  double ref_log_l = NAN;
  std::string sort_by = sort;
  if (has_ref && status[0].state == PointStatus::State::complete)
    ref_log_l = status[0].result.log_likelihood;
  else if (has_ref && sort == "delta_log_likelihood")
    sort_by = "log_likelihood"; // a partial sweep without its reference: the next best order
  if (sort_by != sort) sort_stat = &stats[1];

  // The table: complete points only, sorted.
  io::Table t;
  t.title = "Sweep " + p.name + ": " + std::to_string(rep.complete) + " of " +
            std::to_string(p.points.size()) + " points";
  t.text_headers = {"id"};
  t.columns.push_back({"number", "\\#", "#", "", 6});
  std::vector<std::size_t> numeric;
  for (std::size_t j = 0; j < p.parameters.size(); ++j) {
    if (!numeric_parameter(p, j)) continue;
    numeric.push_back(j);
    const auto steps = parse_key_path(p.parameters[j]);
    // The last key names the column, unless another parameter ends in the same key.
    std::string shown = steps.back().key;
    for (std::size_t k = 0; k < p.parameters.size(); ++k)
      if (k != j && parse_key_path(p.parameters[k]).back().key == shown) shown = p.parameters[j];
    t.columns.push_back(
        {p.parameters[j], latex_name(shown), shown, io::unit_of_name(steps.back().key), 6});
  }
  if (p.replicates > 1) t.columns.push_back({"replicate", "r", "r", "", 6});
  for (const auto* s : columns)
    t.columns.push_back({s->name, s->latex, s->plain, s->unit, s->precision});

  const auto sort_value = [&](std::size_t i) -> double {
    if (sort_by == "number") return double(i);
    for (std::size_t j = 0; j < p.parameters.size(); ++j)
      if (sort_by == p.parameters[j]) return parameter_value(p.points[i], j);
    return sort_stat->value(status[i].result, ref_log_l);
  };
  std::vector<std::size_t> order;
  for (std::size_t i = 0; i < p.points.size(); ++i)
    if (status[i].state == PointStatus::State::complete) order.push_back(i);
  std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
    const double x = sort_value(a), y = sort_value(b);
    if (std::isnan(x) || std::isnan(y)) return !std::isnan(x) && std::isnan(y); // nan last
    return descending ? x > y : x < y;
  });
  for (std::size_t i : order) {
    const Point& q = p.points[i];
    std::string label = q.id;
    if (q.reference) label += " (reference)";
    for (std::size_t j = 0; j < p.parameters.size(); ++j)
      if (!q.reference && std::find(numeric.begin(), numeric.end(), j) == numeric.end())
        label += " " + p.parameters[j] + "=" + io::toml_value_text(*q.values.get(j));
    std::vector<double> row{double(q.number)};
    for (std::size_t j : numeric)
      row.push_back(parameter_value(q, j));
    if (p.replicates > 1) row.push_back(double(q.replicate));
    for (const auto* s : columns)
      row.push_back(s->value(status[i].result, ref_log_l));
    t.text_rows.push_back({label});
    t.add_row(row);
  }
  t.notes.push_back("sorted by " + sort_by +
                    (descending ? " (largest first)" : " (smallest first)"));
  if (sort_by != sort)
    t.notes.push_back("the reference model (point 0) has not finished: no delta ln L, sorted by "
                      "ln L instead");
  if (has_ref)
    t.notes.push_back("Δ ln L > 0: the point explains the measured catalog better than the "
                      "reference model (point 0); whether a difference is significant depends on "
                      "the points' scatter over realisations (column scatter; undertow versus "
                      "on two point folders gives Delta ln L with its uncertainty), and every "
                      "point shares the base scenario's other settings.");
  if (!whole) {
    t.notes.push_back("PARTIAL SWEEP: " + std::to_string(rep.missing.size()) + " missing and " +
                      std::to_string(rep.failed.size()) + " failed points are not in this table");
    for (const auto& m : rep.missing)
      t.notes.push_back("missing: " + m);
    for (const auto& f : rep.failed)
      t.notes.push_back("failed: " + f);
  }
  const std::string folder = o.folder.empty() ? p.folder : o.folder;
  const std::string prefix = (fs::path(folder) / (p.name + "-results")).string();
  io::Table post_table, marg_table;
  if (post) {
    post_table.title = "Posterior over the swept parameters (uniform prior over the swept box)";
    post_table.text_headers = {"parameter", "unit"}; // values in each parameter's own unit
    post_table.columns = {{"best", "\\hat\\theta", "best", "", 6},
                          {"median", "{\\rm median}", "median", "", 6},
                          {"lo68", "68\\%_{\\rm lo}", "68%lo", "", 6},
                          {"hi68", "68\\%_{\\rm hi}", "68%hi", "", 6},
                          {"lo95", "95\\%_{\\rm lo}", "95%lo", "", 6},
                          {"hi95", "95\\%_{\\rm hi}", "95%hi", "", 6},
                          {"mass_low_edge", "m_{\\rm low}", "m_low", "", 3},
                          {"mass_high_edge", "m_{\\rm high}", "m_high", "", 3}};
    marg_table.title = "Marginal posterior and profile ln L per swept value";
    marg_table.text_headers = {"parameter", "unit"};
    marg_table.columns = {
        {"value", "\\theta", "value", "", 6},
        {"marginal", "p", "p", "", 4},
        {"profile_delta_log_likelihood", "\\Delta\\ln L_{\\rm prof}", "Δ ln L_prof", "", 5}};
    for (const auto& pp : post->parameters) {
      post_table.add_row({pp.key, pp.unit}, {pp.best, pp.median, pp.lo68, pp.hi68, pp.lo95, pp.hi95,
                                             pp.mass_low_edge, pp.mass_high_edge});
      if (p.design == "grid")
        for (std::size_t k = 0; k < pp.values.size(); ++k) {
          marg_table.add_row({pp.key, pp.unit}, {pp.values[k], pp.marginal[k], pp.profile[k]});
        }
    }
    std::string best = "best point:";
    for (const auto& pp : post->parameters)
      best += " " + pp.key + " = " + detail::num(pp.best) + (pp.unit.empty() ? "" : " " + pp.unit) +
              ";";
    char b[96];
    std::snprintf(b, sizeof b, " best in %.0f %% of the redraws of ln L within its error",
                  100 * post->best_probability);
    post_table.notes.push_back(best + b);
    for (const auto& n : post->notes)
      post_table.notes.push_back(n);
    marg_table.notes = post->notes;
    t.notes.push_back("posterior over the swept parameters: " + prefix + "-posterior.*");
  } else if (!rep.posterior_refused.empty()) {
    t.notes.push_back("no posterior written: " + rep.posterior_refused);
  }
  // All the tables join the folder together or none does (a full disk, a refused posterior).
  rep.files = io::write_files_together(folder, [&](const std::string& tmp) {
    const std::string stem = (fs::path(tmp) / (p.name + "-results")).string();
    std::vector<std::string> files = io::write_table_files(stem, t);
    if (post) {
      for (const auto& f : io::write_table_files(stem + "-posterior", post_table))
        files.push_back(f);
      if (!marg_table.rows.empty())
        for (const auto& f : io::write_table_files(stem + "-marginals", marg_table))
          files.push_back(f);
    }
    // HDF5: every point in plan order, with its status; NaN where a point has no result.
    files.push_back(stem + ".h5");
    io::h5::File::write_atomically(files.back(), [&](const io::h5::File& f) {
      namespace h = io::h5;
      h::set_attr(f, f.id(), "undertow_format", std::string("sweep-results"));
      h::set_attr(f, f.id(), "name", p.name);
      h::set_attr(f, f.id(), "design", p.design);
      h::set_attr(f, f.id(), "points", std::int64_t(p.points.size()));
      h::set_attr(f, f.id(), "complete", std::int64_t(rep.complete));
      h::set_attr(f, f.id(), "base_scenario", p.base);
      if (has_ref) h::set_attr(f, f.id(), "reference_scenario", p.reference);
      std::vector<std::uint64_t> num;
      std::vector<std::string> ids, states, details;
      for (std::size_t i = 0; i < p.points.size(); ++i) {
        num.push_back(i);
        ids.push_back(p.points[i].id);
        states.push_back(state_name(status[i].state));
        details.push_back(status[i].detail);
      }
      h::write_u64(f, f.id(), "number", num, "point number in the plan");
      h::write_strings(f, f.id(), "id", ids, "point id (digest of its scenario)");
      h::write_strings(f, f.id(), "status", states, "complete, missing, partial, failed, corrupt");
      h::write_strings(f, f.id(), "detail", details, "error of a failed point");
      const auto pg = h::create_group(f, "parameters");
      for (std::size_t j = 0; j < p.parameters.size(); ++j) {
        const std::string& k = p.parameters[j];
        const auto steps = parse_key_path(k);
        if (std::find(numeric.begin(), numeric.end(), j) != numeric.end()) {
          std::vector<double> v;
          for (const auto& q : p.points)
            v.push_back(parameter_value(q, j));
          h::write_doubles(f, pg.id(), k, v, 1, io::unit_of_name(steps.back().key),
                           "swept value (NaN for the reference)");
        } else {
          std::vector<std::string> v;
          for (const auto& q : p.points)
            v.push_back(q.reference ? "" : io::toml_value_text(*q.values.get(j)));
          h::write_strings(f, pg.id(), k, v, "swept value as TOML text");
        }
      }
      if (p.replicates > 1) {
        std::vector<std::uint64_t> r;
        for (const auto& q : p.points)
          r.push_back(q.replicate);
        h::write_u64(f, pg.id(), "replicate", r, "replicate (seeds derived from it)");
      }
      if (post) {
        io::write_table_group(f, "posterior", post_table);
        if (!marg_table.rows.empty()) io::write_table_group(f, "marginals", marg_table);
      }
      const auto sg = h::create_group(f, "statistics");
      for (const auto* s : columns) {
        std::vector<double> v;
        for (std::size_t i = 0; i < p.points.size(); ++i)
          v.push_back(status[i].state == PointStatus::State::complete
                          ? s->value(status[i].result, ref_log_l)
                          : NAN);
        h::write_doubles(f, sg.id(), s->name, v, 1, s->unit, s->plain);
      }
    });
    return files;
  });
  return rep;
}

} // namespace undertow::sweep

#include "undertow/fit/report.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <memory>
#include <optional>
#include <sstream>
#include <unistd.h>

#include "undertow/detail/kernel.hpp"
#include "undertow/fit/measurement_draw.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/hdf5.hpp"
#include "undertow/io/staged_folder.hpp"
#include "undertow/io/table_hdf5.hpp"
#include "undertow/residuals/peculiar.hpp"
#include "undertow/units.hpp"

namespace undertow::fit {
namespace {

double at(const FullParams& p, Param k) {
  return p[std::size_t(k)];
}

residuals::ResidualSettings settings_for(const std::shared_ptr<const KinematicModel>& mp,
                                         const FullParams& p) {
  const KinematicModel& m = *mp;
  residuals::ResidualSettings rs;
  rs.sun = m.sun(p);
  rs.rotation.kind = residuals::RotationCurve::Kind::model;
  rs.rotation.model = [mp, p](double R) { return mp->theta(R, p); }; // shares the model's table
  rs.lsr = m.lsr;
  return rs;
}

constexpr double kLo = 0.15865525393145707, kHi = 0.8413447460685429;

} // namespace

// The fit's distance prior with the disk's scale lengths of the parameters p.
DistancePrior prior_at(const KinematicModel& m, const FullParams& p) {
  DistancePrior d = m.prior;
  d.disk_scale_length_kpc = at(p, Param::disk_scale_length);
  d.disk_scale_height_kpc = at(p, Param::disk_scale_height);
  return d;
}

Selection select_sources(const FitFile& f, const residuals::Catalog& c) {
  Selection sel;
  sel.used.file = c.file;
  const auto& prior = f.spec.model.prior;
  const double cos_cut = std::cos(f.longitude_min_deg * units::deg);
  const auto off = offset_range(f.spec);
  const double omin = off.free ? off.min : off.value, omax = off.free ? off.max : off.value;
  for (const auto& s : c.sources) {
    const sky::Vec3 n = sky::galactic_direction(s.ra_deg, s.dec_deg);
    if (f.longitude_min_deg > 0 && n[0] > cos_cut) {
      sel.excluded.push_back(s.name +
                             ": within longitude_min_deg = " + detail::num(f.longitude_min_deg) +
                             " deg of the Galactic centre's direction");
      continue;
    }
    // the likelihood's own test: the parallax within 7 sigma of the prior's range
    if (!parallax_within_prior(s, prior, omin, omax)) {
      sel.excluded.push_back(
          s.name +
          (s.has_distance() ? ": distance " + detail::num(s.distance_kpc) + " ± " +
                                  detail::num(s.distance_err_kpc) + " kpc"
                            : ": parallax " + detail::num(s.parallax_mas) + " ± " +
                                  detail::num(s.parallax_err_mas) + " mas") +
          " is more than 7 sigma from the prior's range " + detail::num(prior.distance_min_kpc) +
          "-" + detail::num(prior.distance_max_kpc) + " kpc");
      continue;
    }
    sel.used.sources.push_back(s);
  }
  if (sel.used.sources.size() < 2)
    throw InputError(SourcePlace{c.file, 0, 0, {}},
                     "a kinematic fit needs at least two sources; " +
                         std::to_string(sel.used.sources.size()) + " of " +
                         std::to_string(c.sources.size()) + " are usable" +
                         (sel.excluded.empty() ? "" : " (" + sel.excluded[0] + ")"));
  return sel;
}

std::vector<SourceResult> source_results(const FitSpec& s, const residuals::Catalog& used,
                                         const Likelihood& L, const FitResult& r, int draws) {
  const auto thetas = posterior_draws(s, r, std::size_t(draws));
  std::vector<FullParams> med_p(1);
  {
    std::vector<double> x;
    for (const auto& m : r.summary)
      x.push_back(m.median);
    med_p[0] = full_from_free(s, r.free, x.data());
  }
  const FullParams& pm = med_p[0];
  const Geometry g{at(pm, Param::r0), at(pm, Param::z_sun)};
  std::vector<std::vector<double>> pout_all;
  std::vector<double> lnl, po, pmean(used.sources.size(), 0.0);
  if (s.model.outliers) {
    for (const auto& th : thetas) {
      L.per_source(th, lnl, &po);
      for (std::size_t i = 0; i < po.size(); ++i)
        pmean[i] += po[i] / double(thetas.size());
    }
  }
  const auto model = std::make_shared<const KinematicModel>(s.model);
  std::vector<residuals::ResidualSettings> settings;
  for (const auto& th : thetas)
    settings.push_back(settings_for(model, th));
  const auto med_settings = settings_for(model, pm);
  const DistancePrior med_prior = prior_at(s.model, pm);
  std::vector<SourceResult> out(used.sources.size());
  const long n = long(used.sources.size());
#pragma omp parallel for schedule(dynamic)
  for (long k = 0; k < n; ++k) {
    const auto& src = used.sources[std::size_t(k)];
    SourceResult& res = out[std::size_t(k)];
    res.name = src.name, res.group = src.group;
    res.outlier_probability = pmean[std::size_t(k)];
    const sky::Vec3 dir = sky::galactic_direction(src.ra_deg, src.dec_deg);
    std::optional<DistancePosterior> opt;
    try {
      opt.emplace(DistancePosterior::of_source(src, at(pm, Param::parallax_offset), dir.data(),
                                               med_prior, g));
    } catch (const InputError&) { // possible only at the edge of the range: no per-source result
      res.distance_kpc = res.distance_lo_kpc = res.distance_hi_kpc = NAN;
      res.uvw.fill(NAN), res.uvw_lo.fill(NAN), res.uvw_hi.fill(NAN);
      continue;
    }
    const DistancePosterior& post = *opt;
    res.distance_kpc = post.median();
    res.distance_lo_kpc = post.quantile(kLo);
    res.distance_hi_kpc = post.quantile(kHi);
    {
      const sky::Observed o{src.ra_deg, src.dec_deg, src.pmra_masyr, src.pmdec_masyr,
                            sky::lsr_to_helio(src.vlsr_kms, src.ra_deg, src.dec_deg, s.model.lsr)};
      residuals::peculiar_motion(o, res.distance_kpc, med_settings, &res.R_kpc, &res.psi_deg);
    }
    std::array<std::vector<double>, 3> u;
    tracers::TracerStream rng(s.sampler.seed, std::uint64_t(k), 0x5ac7);
    for (std::size_t t = 0; t < thetas.size(); ++t) {
      const auto d = draw_true(src, post, at(thetas[t], Param::parallax_offset), rng);
      const sky::Observed o{src.ra_deg, src.dec_deg, d.pmra_masyr, d.pmdec_masyr,
                            sky::lsr_to_helio(d.vlsr_kms, src.ra_deg, src.dec_deg, s.model.lsr)};
      const auto v = residuals::peculiar_motion(o, d.distance_kpc, settings[t]);
      for (int a = 0; a < 3; ++a)
        u[std::size_t(a)].push_back(v[std::size_t(a)]);
    }
    for (std::size_t a = 0; a < 3; ++a) {
      res.uvw[a] = quantile(u[a], 0.5);
      res.uvw_lo[a] = quantile(u[a], kLo);
      res.uvw_hi[a] = quantile(u[a], kHi);
    }
    res.kinematic = kinematic_distance(src.ra_deg, src.dec_deg, src.vlsr_kms, s.model, pm,
                                       std::max(25.0, s.model.prior.distance_max_kpc));
    const auto& kd = res.kinematic;
    if (std::isfinite(kd.near_kpc)) {
      res.kinematic_kpc =
          std::fabs(kd.near_kpc - res.distance_kpc) <= std::fabs(kd.far_kpc - res.distance_kpc)
              ? kd.near_kpc
              : kd.far_kpc;
      res.kinematic_ratio = res.kinematic_kpc / res.distance_kpc;
      res.factor_two = res.kinematic_ratio >= 2 || res.kinematic_ratio <= 0.5;
    }
  }
  return out;
}

namespace {

std::string prior_text(const ParamSetting& q) {
  if (!q.free) return "fixed at " + detail::num(q.value);
  std::string t;
  switch (q.prior.kind) {
  case Prior::Kind::gaussian:
    t = "Gaussian " + detail::num(q.prior.mean) + " ± " + detail::num(q.prior.sigma);
    break;
  case Prior::Kind::uniform:
    t = "uniform on [" + detail::num(q.prior.min) + ", " + detail::num(q.prior.max) + "]";
    break;
  case Prior::Kind::flat:
    t = "flat (improper)";
    break;
  }
  if (q.prior.kind == Prior::Kind::gaussian &&
      (std::isfinite(q.prior.min) || std::isfinite(q.prior.max)))
    t += " within [" + detail::num(q.prior.min) + ", " + detail::num(q.prior.max) + "]";
  return t;
}

io::Table parameter_table(const FitFile& f, const FitResult& r, const std::string& status) {
  io::Table t;
  t.title = "Kinematic fit: posterior median, 16 and 84 % quantiles, maximum a posteriori";
  t.text_headers = {"parameter"};
  t.columns = {{"median", "\\mathrm{median}", "median", "", 10},
               {"minus", "-\\sigma", "−", "", 6},
               {"plus", "+\\sigma", "+", "", 6},
               {"map", "\\mathrm{MAP}", "MAP", "", 10},
               {"free", "\\mathrm{free}", "free", "", 1},
               {"tau_steps", "\\tau\\,(\\mathrm{steps})", "τ (steps)", "", 4},
               {"r_hat", "\\hat R", "R̂", "", 5}};
  for (const auto& q : f.spec.params) {
    const auto it = std::find(r.free.begin(), r.free.end(), q.param);
    t.text_rows.push_back({param_info(q.param).key});
    if (it == r.free.end()) {
      t.add_row({q.value, NAN, NAN, NAN, 0, NAN, NAN});
    } else {
      const std::size_t k = std::size_t(it - r.free.begin());
      const auto& m = r.summary[k];
      t.add_row({m.median, m.median - m.lo, m.hi - m.median, m.map, 1,
                 k < r.diag.tau.size() ? r.diag.tau[k] : NAN,
                 k < r.diag.r_hat.size() ? r.diag.r_hat[k] : NAN});
    }
  }
  for (std::size_t k = 0; k < r.derived.size(); ++k) {
    const auto& m = r.derived[k];
    t.text_rows.push_back({r.derived_names[k] + " (derived)"});
    t.add_row({m.median, m.median - m.lo, m.hi - m.median, m.map, NAN, NAN, NAN});
  }
  t.notes.push_back(
      "Units: in each parameter's name (_kpc, _kms = km/s, _kms_kpc = km/s/kpc, _mas).");
  for (const auto& q : f.spec.params)
    t.notes.push_back(std::string(param_info(q.param).key) + ": " + prior_text(q));
  t.notes.push_back(status);
  return t;
}

io::Table correlation_table(const FitResult& r) {
  io::Table t;
  t.title = "Posterior correlation coefficients of the free parameters";
  t.text_headers = {"parameter"};
  const std::size_t n = r.free.size();
  for (Param p : r.free)
    t.columns.push_back({param_info(p).key, param_info(p).latex, param_info(p).plain, "", 4});
  for (std::size_t a = 0; a < n; ++a) {
    t.text_rows.push_back({param_info(r.free[a]).key});
    std::vector<double> row(r.correlation.begin() + long(a * n),
                            r.correlation.begin() + long((a + 1) * n));
    t.add_row(row);
  }
  return t;
}

io::Table source_table(const std::vector<SourceResult>& src) {
  io::Table t;
  t.title = "Sources at the posterior: parallax distance, peculiar motion (median and 16/84 %, "
            "over the measurement errors and the parameters' posterior), outlier probability";
  t.text_headers = {"name"};
  t.columns = {{"distance_kpc", "d", "d", "kpc", 8},
               {"distance_lo_kpc", "d_{16}", "d16", "kpc", 8},
               {"distance_hi_kpc", "d_{84}", "d84", "kpc", 8},
               {"R_kpc", "R", "R", "kpc", 8},
               {"psi_deg", "\\psi", "ψ", "deg", 7},
               {"U_s_kms", "U_s", "U_s", "km/s", 7},
               {"U_s_lo_kms", "U_{s,16}", "U_s16", "km/s", 7},
               {"U_s_hi_kms", "U_{s,84}", "U_s84", "km/s", 7},
               {"V_s_kms", "V_s", "V_s", "km/s", 7},
               {"V_s_lo_kms", "V_{s,16}", "V_s16", "km/s", 7},
               {"V_s_hi_kms", "V_{s,84}", "V_s84", "km/s", 7},
               {"W_s_kms", "W_s", "W_s", "km/s", 7},
               {"W_s_lo_kms", "W_{s,16}", "W_s16", "km/s", 7},
               {"W_s_hi_kms", "W_{s,84}", "W_s84", "km/s", 7},
               {"p_outlier", "p_\\mathrm{out}", "p_out", "", 4}};
  for (const auto& s : src) {
    t.text_rows.push_back({s.name});
    t.add_row({s.distance_kpc, s.distance_lo_kpc, s.distance_hi_kpc, s.R_kpc, s.psi_deg, s.uvw[0],
               s.uvw_lo[0], s.uvw_hi[0], s.uvw[1], s.uvw_lo[1], s.uvw_hi[1], s.uvw[2], s.uvw_lo[2],
               s.uvw_hi[2], s.outlier_probability});
  }
  return t;
}

io::Table kinematic_table(const std::vector<SourceResult>& src) {
  io::Table t;
  t.title = "Kinematic distances under the fitted rotation curve against parallax distances";
  t.text_headers = {"name"};
  t.columns = {{"parallax_distance_kpc", "d_\\varpi", "d_ϖ", "kpc", 6},
               {"near_kpc", "d_\\mathrm{near}", "d_near", "kpc", 6},
               {"far_kpc", "d_\\mathrm{far}", "d_far", "kpc", 6},
               {"kinematic_kpc", "d_\\mathrm{kin}", "d_kin", "kpc", 6},
               {"ratio", "d_\\mathrm{kin}/d_\\varpi", "d_kin/d_ϖ", "", 4},
               {"no_fit", "\\mathrm{no\\,fit}", "no fit", "", 1},
               {"factor_two", "\\times 2", "off by ≥ 2×", "", 1}};
  int flagged = 0, beyond = 0;
  for (const auto& s : src) {
    t.text_rows.push_back({s.name});
    t.add_row({s.distance_kpc, s.kinematic.near_kpc, s.kinematic.far_kpc, s.kinematic_kpc,
               s.kinematic_ratio, s.kinematic.beyond_terminal ? 1.0 : 0.0,
               s.factor_two ? 1.0 : 0.0});
    flagged += s.factor_two;
    beyond += s.kinematic.beyond_terminal;
  }
  t.notes.push_back("Kinematic distance: where the fitted rotation curve plus the fitted mean "
                    "motion gives the measured v_LSR. Of near and far, the one closer to the "
                    "parallax distance: the parallax resolves the ambiguity, so the count of "
                    "factor-two cases is a lower bound. no_fit = 1: no distance gives the "
                    "velocity (inside the solar circle: beyond the terminal velocity, and the "
                    "tangent point is given; outside it: a velocity of the wrong sign).");
  t.notes.push_back(std::to_string(flagged) + " of " + std::to_string(src.size()) +
                    " sources have a kinematic distance off by a factor of two or more; " +
                    std::to_string(beyond) + " have a velocity that no distance gives.");
  return t;
}

std::string status_line(const FitResult& r) {
  std::ostringstream o;
  o << (r.converged     ? "converged"
        : r.interrupted ? "INTERRUPTED"
                        : "NOT CONVERGED")
    << ": " << r.walkers << " walkers × " << r.steps << " steps, first " << r.diag.burn
    << " discarded; largest autocorrelation time " << detail::num(r.diag.tau_max) << " steps (kept "
    << detail::num(double(r.diag.kept) / r.diag.tau_max) << " τ), largest split-R̂ "
    << detail::num(r.diag.r_hat_max) << ", acceptance " << detail::num(r.acceptance);
  if (!r.converged && !r.interrupted)
    o << "; about " << r.more_steps_needed << " more steps are needed (raise steps_max)";
  return o.str();
}

} // namespace

void check_output_folder(const std::string& folder) {
  io::check_replaceable_folder(folder, "fit.h5", "fit");
}

namespace {
std::vector<std::string> write_fit_files(const std::string& folder, const FitFile& f,
                                         const Selection& sel, const FitResult& r,
                                         const std::vector<SourceResult>& src);
}

// Everything is written into a temporary folder beside the output, which then takes the output's
// place (an earlier fit there is replaced only once the new one is complete).
std::vector<std::string> write_fit_outputs(const std::string& folder, const FitFile& f,
                                           const Selection& sel, const FitResult& r,
                                           const std::vector<SourceResult>& src) {
  return io::write_folder_atomically(folder, "fit.h5", "fit", [&](const std::string& tmp) {
    return write_fit_files(tmp, f, sel, r, src);
  });
}

namespace {
std::vector<std::string> write_fit_files(const std::string& folder, const FitFile& f,
                                         const Selection& sel, const FitResult& r,
                                         const std::vector<SourceResult>& src) {
  std::filesystem::create_directories(folder);
  const std::string status = status_line(r);
  const std::string sentence = constraint_summary(f.spec, r);
  const auto pt = parameter_table(f, r, status);
  const auto ct = correlation_table(r);
  auto st = source_table(src);
  for (const auto& e : sel.excluded)
    st.notes.push_back("left out: " + e);
  const auto kt = kinematic_table(src);
  std::vector<std::string> files;
  for (const auto& [stem, t] : {std::pair{"parameters", &pt}, std::pair{"correlations", &ct},
                                std::pair{"sources", static_cast<const io::Table*>(&st)},
                                std::pair{"kinematic-distances", &kt}}) {
    const auto w = io::write_table_files(folder + "/" + stem, *t);
    files.insert(files.end(), w.begin(), w.end());
  }
  // the HDF5 file: chain, samples, tables, and the Galactic parameters for other commands
  const std::size_t nf = r.free.size();
  const std::string h5 = folder + "/fit.h5";
  io::h5::File::write_atomically(h5, [&](const io::h5::File& file) {
    const auto root = io::h5::open_group(file, "/");
    io::h5::set_attr(file, root.id(), "tool",
                     std::string("undertow ") + UNDERTOW_VERSION + " (" + UNDERTOW_GIT_REVISION +
                         ")");
    io::h5::set_attr(file, root.id(), "fit_file", f.spec.file);
    io::h5::set_attr(file, root.id(), "fit_file_text", f.text);
    io::h5::set_attr(file, root.id(), "catalog", f.spec.catalog_path);
    io::h5::set_attr(file, root.id(), "status", status);
    io::h5::set_attr(file, root.id(), "summary", sentence);
    io::h5::set_attr(file, root.id(), "converged", std::int64_t(r.converged));
    const auto chain = io::h5::create_group(file, "chain");
    std::string names;
    for (Param p : r.free)
      names += (names.empty() ? "" : ",") + std::string(param_info(p).key);
    io::h5::set_attr(file, chain.id(), "parameters", names);
    io::h5::set_attr(file, chain.id(), "walkers", std::int64_t(r.walkers));
    io::h5::set_attr(file, chain.id(), "steps", std::int64_t(r.steps));
    io::h5::set_attr(file, chain.id(), "burn_in_steps", std::int64_t(r.diag.burn));
    io::h5::write_doubles(file, chain.id(), "positions", r.chain, nf,
                          "units of each parameter (see attribute parameters)",
                          "walker positions, rows = step × walkers + walker");
    io::h5::write_doubles(file, chain.id(), "ln_posterior", r.ln_post, 1, "",
                          "ln posterior, rows = step × walkers + walker");
    const auto gal = io::h5::create_group(file, "galactic");
    io::h5::set_attr(file, gal.id(), "rotation_form", rotation_form_name(f.spec.model.rotation));
    io::h5::set_attr(file, gal.id(), "angular_speed_form",
                     std::int64_t(f.spec.model.angular_speed_form));
    io::h5::set_attr(file, gal.id(), "lsr",
                     std::string(f.spec.model.lsr == sky::LsrForm::apex ? "apex" : "components"));
    std::string all;
    for (std::size_t k = 0; k < kParams; ++k)
      all += (k ? "," : "") + std::string(param_info(Param(k)).key);
    io::h5::set_attr(file, gal.id(), "parameters", all);
    std::vector<double> med(kParams);
    {
      std::vector<double> x;
      for (const auto& m : r.summary)
        x.push_back(m.median);
      const auto p = full_from_free(f.spec, r.free, x.data());
      med.assign(p.begin(), p.end());
    }
    io::h5::write_doubles(file, gal.id(), "median", med, kParams, "see attribute parameters",
                          "posterior median of every parameter (fixed ones at their value)");
    std::vector<double> samples;
    for (const auto& p : posterior_draws(f.spec, r, 2000))
      samples.insert(samples.end(), p.begin(), p.end());
    io::h5::write_doubles(file, gal.id(), "samples", samples, kParams, "see attribute parameters",
                          "up to 2000 posterior samples spread over the kept chain");
    if (!f.spec.model.model_vc_kms.empty()) {
      io::h5::write_doubles(file, gal.id(), "model_vc_kms", f.spec.model.model_vc_kms, 1, "km/s",
                            "the model file's circular speed at R = i × model_step_kpc");
      io::h5::set_attr(file, gal.id(), "model_step_kpc", f.spec.model.model_step_kpc);
    }
    io::write_table_group(file, "parameters", pt);
    io::write_table_group(file, "correlations", ct);
    io::write_table_group(file, "sources", st);
    io::write_table_group(file, "kinematic_distances", kt);
  });
  files.push_back(h5);
  {
    io::AtomicFile s(folder + "/summary.txt");
    auto& o = s.stream();
    o << "Kinematic fit of " << f.spec.catalog_path << " (" << sel.used.sources.size()
      << " sources used, " << sel.excluded.size() << " left out) with " << f.spec.file << "\n"
      << "Rotation curve: " << rotation_form_name(f.spec.model.rotation)
      << "; distance prior: " << distance_prior_name(f.spec.model.prior.kind) << " on ["
      << f.spec.model.prior.distance_min_kpc << ", " << f.spec.model.prior.distance_max_kpc
      << "] kpc";
    if (f.spec.model.prior.parallax_snr_min > 0)
      o << ", catalog selected at parallax/error > " << f.spec.model.prior.parallax_snr_min;
    o << "; " << f.spec.model.nodes << " quadrature nodes per source\n" << status << "\n\n";
    io::write_table(o, pt, io::TableFormat::markdown);
    o << "\n" << sentence << "\n";
    for (const auto& n : r.notes)
      o << "note: " << n << "\n";
    for (const auto& w : r.warnings)
      o << "warning: " << w << "\n";
    s.commit();
  }
  files.push_back(folder + "/summary.txt");
  return files;
}

} // namespace

GalacticFromFit read_galactic_parameters(const std::string& path) {
  GalacticFromFit g;
  g.file = path;
  const auto f = io::h5::File::open_read(path);
  if (!io::h5::exists(f, "galactic"))
    throw InputError(
        SourcePlace{path, 0, 0, "galactic"},
        "not a kinematic fit's output (no group 'galactic'; written by 'undertow fit')");
  const auto gal = io::h5::open_group(f, "galactic");
  if (io::h5::get_attr_string(f, gal.id(), "parameters")
          .find(param_info(Param::disk_scale_height).key) == std::string::npos)
    throw InputError(SourcePlace{path, 0, 0, "galactic"}, "written by another version of undertow");
  const auto root = io::h5::open_group(f, "/");
  g.converged = io::h5::get_attr_int(f, root.id(), "converged") != 0;
  g.model.rotation = rotation_form_from_name(io::h5::get_attr_string(f, gal.id(), "rotation_form"));
  g.model.angular_speed_form = io::h5::get_attr_int(f, gal.id(), "angular_speed_form") != 0;
  g.model.lsr = sky::lsr_form_from_name(io::h5::get_attr_string(f, gal.id(), "lsr"));
  const auto med = io::h5::read_doubles(f, gal.id(), "median", kParams);
  std::copy(med.begin(), med.end(), g.median.begin());
  std::size_t rows = 0;
  const auto smp = io::h5::read_doubles(f, gal.id(), "samples", kParams, &rows);
  for (std::size_t i = 0; i < rows; ++i) {
    FullParams p;
    std::copy(smp.begin() + long(i * kParams), smp.begin() + long((i + 1) * kParams), p.begin());
    g.samples.push_back(p);
  }
  if (g.model.rotation == RotationForm::model) {
    g.model.model_vc_kms = io::h5::read_doubles(f, gal.id(), "model_vc_kms", 1);
    g.model.model_step_kpc = io::h5::get_attr_double(f, gal.id(), "model_step_kpc");
  }
  return g;
}

} // namespace undertow::fit

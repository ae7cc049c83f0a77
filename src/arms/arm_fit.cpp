#include "undertow/arms/arm_fit.hpp"

#include <chrono>
#include <cmath>
#include <map>
#include <omp.h>
#include <sstream>

#include "undertow/arms/spiral_geometry.hpp"
#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"
#include "undertow/fit/distance_prior.hpp"
#include "undertow/io/atomic_file.hpp"
#include "undertow/io/hdf5.hpp"
#include "undertow/io/staged_folder.hpp"
#include "undertow/io/table_hdf5.hpp"
#include "undertow/sky/galactic.hpp"
#include "undertow/units.hpp"

namespace undertow::arms {

ArmFit run_arm_fit(const residuals::Catalog& c, const ArmFitSettings& s,
                   const std::atomic<bool>* stop) {
  const auto t0 = std::chrono::steady_clock::now();
  s.lines.validate();
  s.priors.validate();
  if (s.lines.width_min_kpc > s.priors.width_min_kpc)
    throw detail::ParameterError("width range", "must not start below the sight lines' width_min");
  if (s.geometries.empty()) throw InputError("arm fit: no Galactic geometry given");
  if (s.max_arms < 1 || s.max_arms > 16)
    throw detail::ParameterError("max arms", "must lie between 1 and 16");
  ArmFit f;
  f.catalog = c.file;
  f.catalog_warnings = c.warnings;
  // the groups, in the order given or of first appearance
  std::vector<std::string> names = s.groups;
  std::map<std::string, std::vector<residuals::Source>> by_group;
  std::size_t unlabelled = 0;
  for (const auto& src : c.sources) {
    if (src.group.empty()) {
      ++unlabelled;
      continue;
    }
    if (s.groups.empty() && !by_group.count(src.group)) names.push_back(src.group);
    by_group[src.group].push_back(src);
  }
  if (unlabelled)
    f.notes.push_back(std::to_string(unlabelled) + " source(s) without a group label left out");
  if (names.empty())
    throw InputError(SourcePlace{c.file, 0, 0, "group"},
                     "no source has a group label: the arm fit needs the sources of each arm "
                     "segment labelled in the column 'group'");
  for (const auto& g : names) {
    if (!by_group.count(g))
      throw InputError(SourcePlace{c.file, 0, 0, "group"}, "no source is in group '" + g + "'");
    check_segment(by_group[g], s.nominal(), g, c.file);
  }
  // the likelihoods: one per segment and geometry, built before the parallel part
  const std::size_t ng = s.geometries.size();
  std::vector<std::vector<SegmentLikelihood>> L(names.size());
  for (std::size_t k = 0; k < names.size(); ++k) {
    const auto& src = by_group[names[k]];
    for (const auto& g : s.geometries) {
      const double psi = s.reference_azimuth_deg ? *s.reference_azimuth_deg * units::deg
                                                 : reference_azimuth(src, g);
      SightLines lines = s.lines;
      if (s.azimuth_range_deg) {
        lines.window_lo = azimuth_from((*s.azimuth_range_deg)[0] * units::deg, psi);
        lines.window_hi =
            lines.window_lo + ((*s.azimuth_range_deg)[1] - (*s.azimuth_range_deg)[0]) * units::deg;
      } else { // the sources' own span, widened by a quarter of it and at least 5 deg each way
        const auto span = azimuth_span(src, g, psi);
        const double pad = std::max(5 * units::deg, 0.25 * (span[1] - span[0]));
        lines.window_lo = span[0] - pad, lines.window_hi = span[1] + pad;
      }
      L[k].emplace_back(src, g, psi, lines, c.file);
    }
  }
  // the sources' measured places, with their 1σ reach along the line of sight
  f.sources.title = "The fitted sources' places at their measured distances and ±1 sigma";
  f.sources.text_headers = {"name", "group"};
  for (const char* c : {"x_kpc", "y_kpc", "x_near_kpc", "y_near_kpc", "x_far_kpc", "y_far_kpc"})
    f.sources.columns.push_back({c, c, c, "kpc", 5});
  for (const auto& g : names)
    for (const auto& src : by_group[g]) {
      const auto n = sky::galactic_direction(src.ra_deg, src.dec_deg);
      const double w = src.parallax_mas - src.parallax_offset_mas, sw = src.parallax_err_mas;
      const double dmax = s.lines.distance_max_kpc;
      const double d = src.measured_distance_kpc();
      const double dn = src.has_distance() ? std::max(0.0, src.distance_kpc - src.distance_err_kpc)
                                           : 1 / (w + sw);
      const double df = src.has_distance() ? src.distance_kpc + src.distance_err_kpc
                                           : (w - sw > 0 ? std::min(dmax, 1 / (w - sw)) : dmax);
      std::vector<double> row;
      for (double dd : {d, dn, df}) {
        double x = NAN, y = NAN, z = 0;
        if (dd > 0)
          fit::galactocentric_xyz(dd, n.data(), s.nominal().r0_kpc, s.nominal().z_sun_kpc, x, y, z);
        row.push_back(x), row.push_back(y);
      }
      f.sources.add_row({src.name, g}, row);
    }
  f.segments.resize(names.size());
  if (s.naive) f.naive.resize(names.size());
  // the segments in parallel, each chain on one thread; each segment's seed depends on its
  // place in the list only, so the results do not depend on the number of threads
  const long jobs = long(names.size()) * (s.naive ? 2 : 1);
#pragma omp parallel for schedule(dynamic, 1)
  for (long j = 0; j < jobs; ++j) {
    const std::size_t k = std::size_t(j) % names.size();
    const bool naive = std::size_t(j) >= names.size();
    std::vector<const SegmentLikelihood*> ls;
    for (std::size_t g = 0; g < ng; ++g)
      ls.push_back(&L[k][g]);
    SegmentSampling sm = s.sampling;
    sm.seed = s.sampling.seed + 1000 * k + (naive ? 500 : 0);
    auto r =
        fit_segment(ls, s.priors, sm, naive ? SegmentMethod::naive : SegmentMethod::marginalised,
                    names[k], stop);
    const auto& nl = L[k][ng / 2]; // the nominal geometry's window
    r.window_min_deg = (nl.psi_ref() + nl.window_lo()) / units::deg;
    r.window_max_deg = (nl.psi_ref() + nl.window_hi()) / units::deg;
    (naive ? f.naive[k] : f.segments[k]) = std::move(r);
  }
  for (const auto& r : f.segments)
    if (r.interrupted) return f;
  if (names.size() >= 2) {
    std::vector<SegmentSummary> sums;
    for (const auto& r : f.segments)
      sums.push_back(summary_of(r));
    ArmCountSettings cs;
    cs.m_max = s.max_arms;
    cs.pitch_min_deg = s.priors.pitch_min_deg, cs.pitch_max_deg = s.priors.pitch_max_deg;
    cs.radius_min_kpc = s.priors.radius_min_kpc, cs.radius_max_kpc = s.priors.radius_max_kpc;
    cs.reference_radius_kpc = s.nominal().r0_kpc;
    f.count = count_arms(sums, cs);
  }
  for (const auto& r : f.segments)
    if (!r.converged)
      f.notes.push_back("segment '" + r.group + "': the chain has not converged after " +
                        std::to_string(r.steps) + " steps (τ = " + detail::num(r.tau_max) +
                        ", R̂ = " + detail::num(r.r_hat_max) + "): its intervals are rough");
  for (const auto& r : f.segments) {
    const auto& p = s.priors;
    if (r.pitch_deg.hi > p.pitch_max_deg - 0.05 * (p.pitch_max_deg - p.pitch_min_deg) ||
        r.pitch_deg.lo < p.pitch_min_deg + 0.05 * (p.pitch_max_deg - p.pitch_min_deg))
      f.notes.push_back("segment '" + r.group +
                        "': the pitch's interval reaches the edge of "
                        "the prior range; the interval is set by the prior there, not the data");
    if (r.width_kpc.hi > p.width_max_kpc - 0.05 * (p.width_max_kpc - p.width_min_kpc))
      f.notes.push_back("segment '" + r.group +
                        "': the width reaches the top of its range: the "
                        "sources may not follow one arm");
  }
  f.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return f;
}

namespace {

std::vector<double> interval_row(const Interval& x) {
  return {x.median, x.median - x.lo, x.hi - x.median};
}

io::Table segments_of(const std::vector<SegmentResult>& v, const std::string& title) {
  io::Table t;
  t.title = title;
  t.text_headers = {"group"};
  t.columns = {{"sources", "N", "N", "", 4},
               {"psi_ref_deg", "\\psi_{\\rm ref}", "ψ_ref", "deg", 5},
               {"pitch_deg", "p", "p", "deg", 4},
               {"pitch_minus_deg", "-\\sigma_p", "−σ_p", "deg", 2},
               {"pitch_plus_deg", "+\\sigma_p", "+σ_p", "deg", 2},
               {"radius_kpc", "R_{\\rm ref}", "R_ref", "kpc", 4},
               {"radius_minus_kpc", "-\\sigma_R", "−σ_R", "kpc", 2},
               {"radius_plus_kpc", "+\\sigma_R", "+σ_R", "kpc", 2},
               {"width_kpc", "w", "w", "kpc", 3},
               {"width_minus_kpc", "-\\sigma_w", "−σ_w", "kpc", 2},
               {"width_plus_kpc", "+\\sigma_w", "+σ_w", "kpc", 2},
               {"tau_steps", "\\tau", "τ", "", 3},
               {"r_hat", "\\hat R", "R̂", "", 4},
               {"converged", "\\mathrm{conv}", "converged", "", 1},
               {"window_min_deg", "\\psi_{\\rm min}", "ψ_min", "deg", 4},
               {"window_max_deg", "\\psi_{\\rm max}", "ψ_max", "deg", 4}};
  for (const auto& r : v) {
    std::vector<double> row{double(r.sources), r.psi_ref_deg};
    for (const auto* x : {&r.pitch_deg, &r.radius_kpc, &r.width_kpc}) {
      const auto q = interval_row(*x);
      row.insert(row.end(), q.begin(), q.end());
    }
    row.insert(row.end(), {r.tau_max, r.r_hat_max, r.converged ? 1.0 : 0.0, r.window_min_deg,
                           r.window_max_deg});
    t.add_row({r.group}, row);
  }
  t.notes.push_back("ln R = ln R_ref − (ψ − ψ_ref) tan p: R_ref is the arm's radius at the "
                    "reference azimuth ψ_ref (from the Sun's direction, in the sense of rotation); "
                    "median and 16/84 % quantiles of the posterior; w: dispersion across the arm");
  return t;
}

} // namespace

io::Table segment_table(const ArmFit& f) {
  auto t =
      segments_of(f.segments, "Arm segments: pitch, radius and width (distances marginalised)");
  for (const auto& n : f.notes)
    t.notes.push_back(n);
  return t;
}

io::Table naive_table(const ArmFit& f) {
  auto t = segments_of(f.naive, "Arm segments fitted naively at 1/parallax (for comparison only)");
  t.notes.push_back("naive: each source at 1/ϖ, distance errors ignored; biased when parallax "
                    "errors are not small (docs/arms.md): do not quote these");
  return t;
}

io::Table count_table(const ArmCountResult& c) {
  io::Table t;
  t.title = "Number of arms: evidence for m arms of one pitch and regular spacing";
  t.columns = {{"arms", "m", "m", "", 2},
               {"ln_evidence", "\\ln Z_m - \\ln Z_{\\rm indep}", "ln Z_m − ln Z_indep", "", 4},
               {"probability", "P(m)", "P(m)", "", 3}};
  for (std::size_t i = 0; i < c.m.size(); ++i)
    t.add_row({double(c.m[i]), c.ln_evidence[i], c.probability[i]});
  t.notes.push_back("Z_indep: segments placed independently (no regular spacing), one shared "
                    "pitch; P(m): posterior with equal prior on m = 1 to " +
                    std::to_string(c.m.size()));
  return t;
}

io::Table membership_table(const ArmFit& f) {
  io::Table t;
  t.title = "Which segments could lie on one arm (at the preferred number of arms)";
  t.text_headers = {"group"};
  t.columns = {{"arm", "k", "arm", "", 2},
               {"arm_probability", "P(k)", "P(arm)", "", 3},
               {"same_arm_as_first", "P(k=0)", "P(same arm as first)", "", 3}};
  if (!f.count) return t;
  for (std::size_t q = 0; q < f.segments.size(); ++q)
    t.add_row({f.segments[q].group}, {double(f.count->arm[q]), f.count->arm_probability[q],
                                      f.count->same_arm_as_first[q]});
  t.notes.push_back("arm: counted inward from the first segment's arm (0), modulo m = " +
                    std::to_string(f.count->best_m) +
                    "; segments with the same arm number could lie on one arm");
  return t;
}

std::string arm_summary(const ArmFit& f, const ArmFitSettings& s) {
  std::ostringstream o;
  const auto fmt = [](double v, int prec) {
    std::ostringstream x;
    x.setf(std::ios::fixed);
    x.precision(prec);
    x << v;
    return x.str();
  };
  o << "arm geometry of " << f.catalog << " (" << f.segments.size() << " segment"
    << (f.segments.size() == 1 ? "" : "s") << "; Galactic geometry: " << s.geometry_source
    << ", R0 = " << fmt(s.nominal().r0_kpc, 3) << " kpc";
  if (s.geometries.size() > 1)
    o << " (draws from " << fmt(s.geometries.front().r0_kpc, 3) << " to "
      << fmt(s.geometries.back().r0_kpc, 3) << ")";
  o << ")\n";
  for (std::size_t k = 0; k < f.segments.size(); ++k) {
    const auto& r = f.segments[k];
    o << "  " << r.group << ": " << r.sources
      << " sources, pitch p = " << fmt(r.pitch_deg.median, 1) << " −"
      << fmt(r.pitch_deg.median - r.pitch_deg.lo, 1) << " +"
      << fmt(r.pitch_deg.hi - r.pitch_deg.median, 1) << " deg, R = " << fmt(r.radius_kpc.median, 2)
      << " ± " << fmt(r.radius_kpc.sigma(), 2) << " kpc at ψ = " << fmt(r.psi_ref_deg, 1)
      << " deg, width w = " << fmt(r.width_kpc.median, 2) << " ± " << fmt(r.width_kpc.sigma(), 2)
      << " kpc" << (r.converged ? "" : " (NOT CONVERGED)") << "\n";
    if (!f.naive.empty())
      o << "    naive at 1/ϖ (not for quoting): p = " << fmt(f.naive[k].pitch_deg.median, 1)
        << " ± " << fmt(f.naive[k].pitch_deg.sigma(), 1)
        << " deg, w = " << fmt(f.naive[k].width_kpc.median, 2) << " kpc\n";
  }
  if (f.count) {
    const auto& c = *f.count;
    o << "number of arms: m = " << c.best_m
      << " preferred, P = " << fmt(c.probability[std::size_t(c.best_m - 1)], 2) << "; ln Z("
      << c.best_m << ") − ln Z(next best) = " << fmt(c.ln_bayes_factor_next, 2)
      << "; against independent "
      << "segments " << fmt(c.ln_bayes_factor_independent, 2) << "\n";
    if (c.ln_bayes_factor_next < std::log(3.0))
      o << "  the data cannot tell m = " << c.best_m
        << " from the next best apart (Bayes factor below 3): do not quote a number of arms\n";
    if (c.ln_bayes_factor_independent < std::log(3.0))
      o << "  regular spacing is not preferred over independent segments (Bayes factor below "
           "3)\n";
    // two decimals: the shared pitch is often known to a tenth of a degree or better
    o << "  at m = " << c.best_m << ": shared pitch " << fmt(c.pitch_deg.median, 2) << " −"
      << fmt(c.pitch_deg.median - c.pitch_deg.lo, 2) << " +"
      << fmt(c.pitch_deg.hi - c.pitch_deg.median, 2)
      << " deg; an arm crosses R = " << fmt(s.nominal().r0_kpc, 2)
      << " kpc at ψ = " << fmt(c.arm_azimuth_deg, 1) << " ± " << fmt(c.arm_azimuth_sigma_deg, 1)
      << " deg (modulo " << fmt(360.0 / c.best_m, 1) << " deg)\n";
  } else {
    o << "number of arms: needs two segments or more\n";
  }
  for (const auto& n : f.notes)
    o << "note: " << n << "\n";
  // counted here as well as printed when read: a summary read later must not hide them
  if (!f.catalog_warnings.empty()) {
    const std::size_t shown = 10;
    o << f.catalog_warnings.size() << " warning" << (f.catalog_warnings.size() == 1 ? "" : "s")
      << " reading " << f.catalog << ":\n";
    for (std::size_t i = 0; i < f.catalog_warnings.size() && i < shown; ++i)
      o << "warning: " << f.catalog_warnings[i] << "\n";
    if (f.catalog_warnings.size() > shown)
      o << "warning: ... and " << f.catalog_warnings.size() - shown << " more\n";
  }
  return o.str();
}

std::vector<std::string> write_arm_outputs(const std::string& folder, const ArmFit& f,
                                           const ArmFitSettings& s) {
  return io::write_folder_atomically(folder, "arms.h5", "arm fit", [&](const std::string& dir) {
    std::vector<std::string> files;
    const auto add = [&](const std::string& stem, const io::Table& t) {
      const auto w = io::write_table_files(dir + "/" + stem, t);
      files.insert(files.end(), w.begin(), w.end());
    };
    const auto st = segment_table(f);
    add("arm-segments", st);
    if (!f.naive.empty()) add("arm-segments-naive", naive_table(f));
    if (f.count) {
      add("arm-count", count_table(*f.count));
      add("arm-membership", membership_table(f));
    }
    const std::string h5 = dir + "/arms.h5";
    io::h5::File::write_atomically(h5, [&](const io::h5::File& file) {
      const auto root = io::h5::open_group(file, "/");
      io::h5::set_attr(file, root.id(), "tool",
                       std::string("undertow ") + UNDERTOW_VERSION + " (" + UNDERTOW_GIT_REVISION +
                           ")");
      io::h5::set_attr(file, root.id(), "catalog", f.catalog);
      io::h5::set_attr(file, root.id(), "geometry", s.geometry_source);
      io::h5::set_attr(file, root.id(), "r0_kpc", s.nominal().r0_kpc);
      io::write_table_group(file, "segments", st);
      io::write_table_group(file, "sources", f.sources);
      const auto samples = io::h5::create_group(file, "samples");
      for (const auto& r : f.segments) {
        std::vector<double> v;
        for (const auto& x : r.samples)
          v.insert(v.end(), x.begin(), x.end());
        io::h5::write_doubles(file, samples.id(), r.group, v, 3, "deg, ln kpc, kpc",
                              "posterior samples: pitch p, ln R_ref, width w");
      }
      if (f.count) {
        io::write_table_group(file, "count", count_table(*f.count));
        io::write_table_group(file, "membership", membership_table(f));
        const auto best = io::h5::create_group(file, "preferred");
        io::h5::set_attr(file, best.id(), "arms", std::int64_t(f.count->best_m));
        const auto& p = f.count->pitch_deg;
        io::h5::set_attr(file, best.id(), "pitch_deg", p.median);
        io::h5::set_attr(file, best.id(), "pitch_minus_deg", p.median - p.lo);
        io::h5::set_attr(file, best.id(), "pitch_plus_deg", p.hi - p.median);
        io::h5::set_attr(file, best.id(), "arm_azimuth_deg", f.count->arm_azimuth_deg);
        io::h5::set_attr(file, best.id(), "arm_azimuth_sigma_deg", f.count->arm_azimuth_sigma_deg);
        io::h5::set_attr(file, best.id(), "arm_azimuth_radius_kpc", s.nominal().r0_kpc);
        io::h5::set_attr(file, best.id(), "ln_bayes_factor_next", f.count->ln_bayes_factor_next);
      }
    });
    files.push_back(h5);
    {
      io::AtomicFile out(dir + "/summary.txt");
      out.stream() << arm_summary(f, s);
      out.commit();
    }
    files.push_back(dir + "/summary.txt");
    return files;
  });
}

} // namespace undertow::arms

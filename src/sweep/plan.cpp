#include "undertow/sweep/plan.hpp"

#include <algorithm>
#include <cstring>
#include <filesystem>
#include <map>

#include "undertow/io/digest.hpp"
#include "undertow/io/paths.hpp"
#include "undertow/io/staged_folder.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/io/toml_table.hpp"
#include "undertow/io/toml_writer.hpp"
#include "undertow/sweep/design.hpp"
#include "undertow/sweep/key_path.hpp"
#include "undertow/tracers/random.hpp"

namespace undertow::sweep {
namespace {

namespace fs = std::filesystem;

// Scenario values that name files; relative ones are relative to the scenario's folder.
const char* const path_keys[] = {"tracers.file", "observation.errors.catalog", "comparison.catalog",
                                 "observation.sun.from_fit"};
const char* const seed_keys[] = {"run.seed", "observation.seed", "comparison.seed"};
constexpr std::size_t max_points = 100000;

bool is_path_key(const std::string& k) {
  for (const char* p : path_keys)
    if (k == p) return true;
  return false;
}

// A point's folder is <plan>/points/<id>; a file's path relative to it, from one relative to
// `from_dir`.
// An absolute folder; "" (the parent of a bare file name) is the current folder.
fs::path absolute_dir(const fs::path& d) {
  return d.empty() ? fs::current_path() : fs::absolute(d);
}

std::string rebase(const std::string& value, const fs::path& from_dir, const fs::path& folder) {
  const fs::path v(value);
  const fs::path abs = (v.is_absolute() ? v : absolute_dir(from_dir) / v).lexically_normal();
  const fs::path here = (absolute_dir(folder) / "points" / "x").lexically_normal();
  // Relative only when the two share more than the root: a plan moved with its data still works,
  // and a file elsewhere on the machine keeps its absolute path.
  auto a = abs.begin(), h = here.begin();
  std::size_t common = 0;
  while (a != abs.end() && h != here.end() && *a == *h)
    ++a, ++h, ++common;
  const fs::path rel = abs.lexically_relative(here);
  return common <= 1 || rel.empty() ? abs.string() : rel.string();
}

// The base or reference scenario as a table: the galaxy's model file copied in (so that its
// values can be swept by key path) and file paths made relative to a point's folder.
toml::table load_base(const std::string& path, const std::string& folder) {
  toml::table t = io::parse_toml_file(path);
  const fs::path dir = fs::path(path).parent_path();
  if (auto* g = t["galaxy"].as_table(); g && g->contains("model_file")) {
    const auto* mf = g->get("model_file")->as_string();
    if (!mf) io::TableReader(*g, path, "galaxy").fail("model_file", "must be a string");
    t.insert_or_assign("galaxy", io::parse_toml_file(io::path_beside(path, mf->get())));
  }
  for (const char* k : path_keys)
    if (const toml::node* n = find_at_key_path(t, k); n && n->is_string())
      set_at_key_path(t, k, toml::value<std::string>(rebase(n->as_string()->get(), dir, folder)));
  return t;
}

std::uint64_t replicate_seed(double base, std::size_t r) {
  using tracers::TracerStream;
  // Below 10^9: every seed reader accepts it (comparison.seed is the strictest).
  return TracerStream::mix(std::uint64_t(base) ^ TracerStream::mix(r + 0x5eed)) % 1000000000;
}

// "key = value, key = value": a point's values, in its header, logs and tables.
std::string assignments(const std::vector<std::string>& keys, const toml::array& values) {
  std::string s;
  for (std::size_t j = 0; j < keys.size(); ++j)
    s += (j ? ", " : "") + keys[j] + " = " + io::toml_value_text(*values.get(j));
  return s;
}

struct Built {
  std::string text, id;
};

Built build_point(const toml::table& base, const std::vector<std::string>& keys,
                  const toml::array& values, std::size_t replicate, bool reference) {
  toml::table t = base;
  std::string header;
  if (reference) {
    header = "# undertow sweep: the reference model\n";
  } else {
    for (std::size_t j = 0; j < keys.size(); ++j)
      set_at_key_path(t, keys[j], *values.get(j));
    header = "# undertow sweep point: " + assignments(keys, values);
    if (replicate > 0) {
      header += ", replicate " + std::to_string(replicate);
      for (const char* k : seed_keys) {
        // Every seed of a table that exists, given or not: a replicate differs in every draw.
        const std::string table(k, std::strchr(k, '.'));
        if (!t.contains(table)) continue;
        const toml::node* n = find_at_key_path(t, k);
        const double given = n ? n->value<double>().value_or(0) : 0;
        set_at_key_path(t, k,
                        toml::value<std::int64_t>(std::int64_t(replicate_seed(given, replicate))));
      }
    }
    header += "\n";
  }
  header += "# File paths are relative to this file's folder, <plan>/points/<id>/.\n";
  Built b;
  b.text = header + io::toml_text(t);
  b.id = io::hex64(io::fnv1a64(b.text)).substr(0, 12);
  return b;
}

// The scenario reader's message without its file prefix (the file is not on disk yet).
std::string without_file(const InputError& e) {
  const auto& pl = e.place();
  std::string m = e.what();
  if (!pl.file.empty() && m.rfind(pl.file, 0) == 0) {
    m.erase(0, pl.file.size());
    while (!m.empty() && (m[0] == ':' || std::isdigit(static_cast<unsigned char>(m[0]))))
      m.erase(0, 1);
    if (m.rfind(" ", 0) == 0) m.erase(0, 1);
  }
  return m;
}

} // namespace

std::string point_folder(const Plan& p, const Point& q) {
  return (fs::path(p.folder) / "points" / q.id).lexically_normal().string();
}

std::string scenario_path(const Plan& p, const Point& q) {
  return (fs::path(point_folder(p, q)) / "scenario.toml").string();
}

scenario::Scenario point_scenario(const Plan& p, const Point& q) {
  return scenario::parse_scenario(q.scenario, scenario_path(p, q));
}

std::string describe(const Plan& p, const Point& q) {
  if (q.reference) return "reference";
  std::string s = assignments(p.parameters, q.values);
  if (p.replicates > 1) s += ", replicate " + std::to_string(q.replicate);
  return s;
}

Plan make_plan(const SweepSpec& spec, const std::string& folder) {
  Plan p;
  p.folder = folder;
  p.name = spec.name;
  p.description = spec.description;
  p.sweep_file = fs::absolute(spec.path)
                     .lexically_normal()
                     .lexically_relative(absolute_dir(folder).lexically_normal())
                     .string();
  p.design = spec.design == SweepSpec::Design::grid ? "grid" : "latin-hypercube";
  p.replicates = spec.replicates;
  p.keep_orbits = spec.keep_orbits;
  for (const auto& q : spec.parameters)
    p.parameters.push_back(q.key);

  const auto at_sweep = [&](const std::string& what) {
    return InputError(SourcePlace{spec.path, 0, 0, "sweep"}, what);
  };
  const toml::table base = load_base(spec.base_path, folder);
  p.base = io::toml_text(base);
  std::optional<toml::table> ref;
  if (!spec.reference_path.empty()) {
    ref = load_base(spec.reference_path, folder);
    p.reference = io::toml_text(*ref);
  }

  // The size first, before a huge grid is built in memory.
  double size = double(spec.replicates) *
                (spec.design == SweepSpec::Design::grid ? 1.0 : double(spec.points));
  if (spec.design == SweepSpec::Design::grid)
    for (const auto& q : spec.parameters)
      size *= double(q.values.size());
  size += ref ? 1 : 0;
  if (size > double(max_points))
    throw at_sweep("the sweep has " + detail::num(size) + " points; the limit is " +
                   std::to_string(max_points) +
                   " (a sweep this size would flood a shared cluster: split it)");
  std::vector<toml::array> rows =
      spec.design == SweepSpec::Design::grid
          ? grid_rows(spec.parameters)
          : latin_hypercube_rows(spec.parameters, spec.points, spec.seed);
  const fs::path sweep_dir = fs::path(spec.path).parent_path();
  for (auto& row : rows)
    for (std::size_t j = 0; j < row.size(); ++j)
      if (is_path_key(spec.parameters[j].key) && row.get(j)->is_string())
        *row.get(j)->as_string() = rebase(row.get(j)->as_string()->get(), sweep_dir, folder);

  std::map<std::string, std::size_t> ids;
  const auto add = [&](const Built& b, bool reference, std::size_t replicate, toml::array values,
                       const Parameter* blame) {
    Point q;
    q.number = p.points.size();
    q.id = b.id;
    q.reference = reference;
    q.replicate = replicate;
    q.values = std::move(values);
    q.scenario = b.text;
    if (const auto [it, fresh] = ids.emplace(q.id, q.number); !fresh)
      throw at_sweep("points " + std::to_string(it->second) + " and " + std::to_string(q.number) +
                     " have the same scenario (" + describe(p, q) + ")");
    try {
      const auto sc = point_scenario(p, q);
      // What a whole run needs, checked now rather than on the cluster.
      if (!sc.observation || !sc.comparison)
        throw InputError(SourcePlace{sc.path, 0, 0, !sc.observation ? "observation" : "comparison"},
                         "a sweep point is a whole run (undertow run): it needs [observation] "
                         "and [comparison] tables");
      if (!fs::is_regular_file(sc.comparison->catalog))
        throw InputError(SourcePlace{sc.path, 0, 0, "comparison.catalog"},
                         "the measured catalog " + sc.comparison->catalog + " does not exist");
    } catch (const InputError& e) {
      SourcePlace at{spec.path, 0, 0, reference ? "sweep.reference" : "sweep.base"};
      if (blame) at = blame->place, at.field = "parameter '" + blame->key + "'";
      for (const auto& par : spec.parameters)
        if (e.place().field == par.key) at = par.place, at.field = "parameter '" + par.key + "'";
      throw InputError(at, "point " + std::to_string(q.number) + " (" + describe(p, q) +
                               ") is not a valid scenario: " + without_file(e));
    }
    p.points.push_back(std::move(q));
  };
  if (ref) add(build_point(*ref, {}, {}, 0, true), true, 0, {}, nullptr);
  for (const auto& row : rows)
    for (std::size_t r = 0; r < spec.replicates; ++r) {
      Built b;
      try {
        b = build_point(base, p.parameters, row, r, false);
      } catch (const KeyPathError& e) {
        // The first parameter whose path fails is the one to name.
        for (const auto& par : spec.parameters) {
          toml::table probe = base;
          try {
            set_at_key_path(probe, par.key, toml::value<std::int64_t>(0));
          } catch (const KeyPathError& e2) {
            throw InputError(par.place, e2.what());
          }
        }
        throw at_sweep(e.what());
      }
      add(b, false, r, row, spec.parameters.size() == 1 ? &spec.parameters[0] : nullptr);
    }
  // Delta ln L against the reference means "this galaxy against that one" only when both see
  // the same survey in the same way.
  for (const auto& par : spec.parameters) {
    const auto starts = [&](const char* head) { return par.key.rfind(head, 0) == 0; };
    // The measured residuals are computed with each point's own rotation curve and Sun.
    if (starts("observation.sun") || starts("observation.lsr") || starts("galaxy.component") ||
        starts("galaxy.calibration"))
      p.warnings.push_back("'" + par.key +
                           "' changes the measured residuals themselves (they are computed "
                           "with each point's rotation curve and Sun): ln L of two points then "
                           "compares different data, so do not read the table as a likelihood "
                           "fit of this parameter");
    else if (ref && (starts("observation.") || starts("comparison.")))
      p.warnings.push_back("'" + par.key +
                           "' changes how the points observe or compare, but the reference "
                           "keeps its own value: delta ln L then mixes that change with the "
                           "models'");
  }
  if (ref)
    for (const char* k : {"observation", "comparison"}) {
      const auto* a = base[k].as_table();
      const auto* b = (*ref)[k].as_table();
      if (a && b && io::toml_text(*a) != io::toml_text(*b))
        p.warnings.push_back(std::string("the reference's [") + k +
                             "] differs from the base's: delta ln L then measures more than the "
                             "difference of the models");
    }
  return p;
}

void write_plan(const Plan& p) {
  std::string o;
  o += "# undertow sweep plan, written by `undertow sweep plan` and read by `sweep run`, `sweep\n"
       "# slurm`, `sweep status` and `sweep gather`. Do not edit it: change the sweep file and\n"
       "# plan again (points whose scenario is unchanged keep their id and their results).\n";
  o += "# " + std::to_string(p.points.size()) + " points";
  if (!p.reference.empty()) o += " (number 0 is the reference model)";
  o += "; a point's complete scenario: `undertow sweep show <folder> --point N`.\n\n";
  toml::table head;
  head.insert("name", p.name);
  head.insert("description", p.description);
  head.insert("sweep_file", p.sweep_file);
  head.insert("design", p.design);
  head.insert("replicates", std::int64_t(p.replicates));
  head.insert("keep_orbits", p.keep_orbits);
  toml::array keys;
  for (const auto& k : p.parameters)
    keys.push_back(k);
  head.insert("parameters", keys);
  head.insert("points", std::int64_t(p.points.size()));
  o += "[plan]\n" + io::toml_text(head);
  for (const auto& q : p.points) {
    o += "\n[[point]]\nnumber = " + std::to_string(q.number) + "\nid = \"" + q.id + "\"\n";
    if (q.reference) {
      o += "reference = true\n";
    } else {
      o += "values = " + io::toml_value_text(q.values) + "\n";
      if (p.replicates > 1) o += "replicate = " + std::to_string(q.replicate) + "\n";
    }
  }
  const auto block = [](const std::string& text) {
    if (text.find("'''") == std::string::npos) return "'''\n" + text + "'''";
    return io::toml_value_text(toml::value<std::string>(text));
  };
  o += "\n# The scenarios every point is made from: the base with each point's values set, and\n"
       "# the reference as given. The galaxy's model file is copied in; file paths are relative\n"
       "# to a point's folder.\n[scenario]\nbase = " +
       block(p.base) + "\n";
  if (!p.reference.empty()) o += "reference = " + block(p.reference) + "\n";
  // a folder this call creates is removed again if the plan cannot be written (a full disk)
  io::write_files_together(p.folder, [&](const std::string& tmp) {
    const std::string file = (fs::path(tmp) / "plan.toml").string();
    io::write_text_file(file, o);
    return std::vector<std::string>{file};
  });
}

Plan read_plan(const std::string& folder_or_file, bool build) {
  const fs::path given(folder_or_file);
  const fs::path file = fs::is_directory(given) ? given / "plan.toml" : given;
  if (!fs::is_regular_file(file))
    throw InputError(SourcePlace{file.string(), 0, 0, {}},
                     "no sweep plan here; make one with `undertow sweep plan <sweep file>`");
  const std::string path = file.string();
  const toml::table root = io::parse_toml_file(path);
  io::TableReader r(root, path, "");
  r.check_keys({"plan", "point", "scenario"});
  Plan p;
  p.folder = file.parent_path().empty() ? "." : file.parent_path().string();
  p.file = path;
  const toml::table* h = r.table("plan");
  const toml::table* sc = r.table("scenario");
  if (!h || !sc) r.fail("", "not a sweep plan (no [plan] or [scenario] table)");
  io::TableReader hr(*h, path, "plan");
  hr.check_keys({"name", "description", "sweep_file", "design", "replicates", "keep_orbits",
                 "parameters", "points"});
  p.name = hr.string("name");
  p.description = hr.string_or("description", "");
  p.sweep_file = hr.string_or("sweep_file", "");
  p.design = hr.string("design");
  p.replicates = std::size_t(hr.integer("replicates"));
  p.keep_orbits = hr.boolean_or("keep_orbits", false);
  p.parameters = hr.strings("parameters");
  io::TableReader sr(*sc, path, "scenario");
  sr.check_keys({"base", "reference"});
  p.base = sr.string("base");
  p.reference = sr.string_or("reference", "");
  const toml::array* pts = r.array_of_tables("point");
  const std::size_t n = pts ? pts->size() : 0;
  if (n != std::size_t(hr.integer("points")))
    hr.fail("points", "does not match the [[point]] list");
  if (n == 0) hr.fail("points", "the plan has no points");
  for (std::size_t i = 0; i < n; ++i) {
    io::TableReader q(*pts->get(i)->as_table(), path, "point[" + std::to_string(i) + "]");
    q.check_keys({"number", "id", "reference", "values", "replicate"});
    Point pt;
    pt.number = std::size_t(q.integer("number"));
    if (pt.number != i) q.fail("number", "points must be numbered 0, 1, 2, ... in order");
    pt.id = q.string("id");
    pt.reference = q.boolean_or("reference", false);
    pt.replicate = std::size_t(q.number_or("replicate", 0));
    if (pt.reference && p.reference.empty())
      q.fail("reference", "the plan has no reference scenario");
    if (!pt.reference) {
      const toml::array* v = pts->get(i)->as_table()->get_as<toml::array>("values");
      if (!v || v->size() != p.parameters.size())
        q.fail("values", "must hold one value per parameter");
      pt.values = *v;
    }
    p.points.push_back(std::move(pt));
  }
  if (build) {
    std::vector<std::size_t> all(n);
    for (std::size_t i = 0; i < n; ++i)
      all[i] = i;
    build_points(p, all);
  }
  return p;
}

void build_points(Plan& p, const std::vector<std::size_t>& numbers) {
  const toml::table base = io::parse_toml_text(p.base, p.file + " [scenario.base]");
  std::optional<toml::table> ref;
  if (!p.reference.empty())
    ref = io::parse_toml_text(p.reference, p.file + " [scenario.reference]");
  for (std::size_t i : numbers) {
    Point& pt = p.points.at(i);
    if (!pt.scenario.empty()) continue;
    const SourcePlace at{p.file, 0, 0, "point[" + std::to_string(i) + "]"};
    Built b;
    try {
      b = pt.reference ? build_point(*ref, {}, {}, 0, true)
                       : build_point(base, p.parameters, pt.values, pt.replicate, false);
    } catch (const KeyPathError& e) {
      throw InputError(at, e.what());
    }
    if (b.id != pt.id)
      throw InputError(at, "its id does not match its scenario (was plan.toml edited? plan again)");
    pt.scenario = b.text;
  }
}

std::vector<std::string> input_files(const Point& q) {
  const toml::table t = io::parse_toml_text(q.scenario, "point " + q.id);
  std::vector<std::string> out;
  for (const char* k : path_keys)
    if (const toml::node* n = find_at_key_path(t, k); n && n->is_string())
      out.push_back(n->as_string()->get());
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
  return out;
}

} // namespace undertow::sweep

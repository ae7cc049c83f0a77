#include "undertow/sweep/sweep_file.hpp"

#include <cmath>
#include <filesystem>
#include <set>
#include <stdexcept>

#include "undertow/io/paths.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/io/toml_table.hpp"
#include "undertow/io/toml_writer.hpp"
#include "undertow/sweep/key_path.hpp"

namespace undertow::sweep {
namespace {

namespace fs = std::filesystem;
using io::TableReader;

double as_number(const toml::node& n, const char* what) {
  if (const auto* i = n.as_integer()) return double(i->get());
  if (const auto* f = n.as_floating_point()) {
    if (!std::isfinite(f->get()))
      throw std::invalid_argument(std::string(what) + " must be finite");
    return f->get();
  }
  throw std::invalid_argument(std::string(what) + " must be a number");
}

// Rounded to 12 significant digits, so that 0.02 + 3 * 0.02 reads 0.08 and not 0.08000000000000002.
double tidy(double v) {
  char b[32];
  std::snprintf(b, sizeof b, "%.12g", v);
  return std::strtod(b, nullptr);
}

} // namespace

toml::array range_values(const toml::node& from, const toml::node& to, const toml::node* count,
                         const toml::node* step, bool log_scale) {
  const double a = as_number(from, "from"), b = as_number(to, "to");
  const bool whole = from.is_integer() && to.is_integer() && (!step || step->is_integer());
  std::vector<double> v;
  if (count && step) throw std::invalid_argument("give count or step, not both");
  if (!count && !step) throw std::invalid_argument("give count or step with from and to");
  if (count) {
    if (!count->is_integer()) throw std::invalid_argument("count must be a whole number");
    const auto n = count->as_integer()->get();
    if (n < 1) throw std::invalid_argument("count must be at least 1, got " + std::to_string(n));
    if (n > 1000000) throw std::invalid_argument("count above 1000000");
    if (n == 1 && a != b) throw std::invalid_argument("count = 1 needs from = to");
    if (log_scale && !(a > 0 && b > 0))
      throw std::invalid_argument("scale = \"log\" needs positive from and to");
    for (std::int64_t k = 0; k < n; ++k) {
      const double f = n == 1 ? 0.0 : double(k) / double(n - 1);
      v.push_back(log_scale ? a * std::pow(b / a, f) : a + f * (b - a));
    }
  } else {
    if (log_scale) throw std::invalid_argument("scale = \"log\" goes with count, not step");
    const double s = as_number(*step, "step");
    if (!(s > 0)) throw std::invalid_argument("step must be positive");
    if (b < a) throw std::invalid_argument("the range is empty: to < from with a positive step");
    const double n = std::floor((b - a) / s * (1 + 1e-12) + 1e-12);
    if (n >= 1000000) throw std::invalid_argument("more than 1000000 values");
    for (long k = 0; k <= long(n); ++k)
      v.push_back(a + double(k) * s);
  }
  toml::array out;
  for (double x : v) {
    x = tidy(x);
    if (whole && std::floor(x) == x && std::fabs(x) < 9e15)
      out.push_back(std::int64_t(x));
    else
      out.push_back(x);
  }
  return out;
}

SweepSpec parse_sweep_file(const std::string& text, const std::string& path) {
  SweepSpec s;
  s.path = path;
  const toml::table root = io::parse_toml_text(text, path);
  TableReader r(root, path, "");
  r.check_keys({"sweep", "parameter"});
  const toml::table* st = r.table("sweep");
  if (!st) r.fail("", "missing [sweep] table");
  TableReader w(*st, path, "sweep");
  w.check_keys({"name", "description", "base", "reference", "design", "points", "seed",
                "replicates", "keep_orbits"});
  s.name = w.string("name");
  // The name becomes file and job names: keep it to characters every shell and file system take.
  if (s.name.empty() || s.name.size() > 64 ||
      s.name.find_first_not_of(
          "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789_.-") != std::string::npos)
    w.fail("name", "use 1 to 64 letters, digits, '_', '-' or '.'");
  s.description = w.string_or("description", "");
  s.base_path = io::path_beside(path, w.string("base"));
  std::error_code ec; // a path the system refuses (too long, say) does not exist: no throw
  if (!fs::is_regular_file(s.base_path, ec))
    w.fail("base", "the base scenario " + s.base_path + " does not exist");
  if (w.has("reference")) {
    s.reference_path = io::path_beside(path, w.string("reference"));
    if (!fs::is_regular_file(s.reference_path, ec))
      w.fail("reference", "the reference scenario " + s.reference_path + " does not exist");
  }
  const std::string design = w.string_or("design", "grid");
  if (design == "grid")
    s.design = SweepSpec::Design::grid;
  else if (design == "latin-hypercube")
    s.design = SweepSpec::Design::latin_hypercube;
  else
    w.fail("design", "must be \"grid\" or \"latin-hypercube\", got \"" + design + "\"");
  const auto whole = [&](const char* k, double fallback, double lo, double hi) {
    const double v = w.number_or(k, fallback);
    if (!(v >= lo && v <= hi && std::floor(v) == v))
      w.fail(k, "must be a whole number from " + detail::num(lo) + " to " + detail::num(hi) +
                    ", got " + detail::num(v));
    return v;
  };
  if (s.design == SweepSpec::Design::latin_hypercube) {
    if (!w.has("points")) w.fail("points", "a latin-hypercube design needs points");
    s.points = std::size_t(whole("points", 0, 1, 1e6));
    s.seed = std::uint64_t(whole("seed", 1, 0, 9.007199254740992e15));
  } else {
    if (w.has("points")) w.fail("points", "only a latin-hypercube design has points");
    if (w.has("seed")) w.fail("seed", "only a latin-hypercube design has a seed");
  }
  s.replicates = std::size_t(whole("replicates", 1, 1, 10000));
  s.keep_orbits = w.boolean_or("keep_orbits", false);

  const toml::array* ps = r.array_of_tables("parameter");
  if (!ps || ps->empty()) r.fail("", "no [[parameter]] to vary");
  std::set<std::string> seen;
  for (std::size_t i = 0; i < ps->size(); ++i) {
    const toml::table& pt = *ps->get(i)->as_table();
    TableReader q(pt, path, "parameter[" + std::to_string(i) + "]");
    Parameter p;
    p.key = q.string("key");
    p.place = q.place("key");
    try {
      (void)parse_key_path(p.key);
    } catch (const KeyPathError& e) {
      q.fail("key", e.what());
    }
    if (!seen.insert(p.key).second) q.fail("key", "'" + p.key + "' is swept twice");
    const std::string scale = q.string_or("scale", "linear");
    if (scale != "linear" && scale != "log") q.fail("scale", "must be \"linear\" or \"log\"");
    p.log_scale = scale == "log";
    if (s.design == SweepSpec::Design::grid) {
      q.check_keys({"key", "values", "from", "to", "count", "step", "scale"});
      if (q.has("values")) {
        for (const char* k : {"from", "to", "count", "step", "scale"})
          if (q.has(k)) q.fail(k, "give values or a range (from, to, count or step), not both");
        const toml::array* v = pt["values"].as_array();
        if (!v) q.fail("values", "must be an array");
        if (v->empty()) q.fail("values", "the list of values is empty");
        for (std::size_t a = 0; a < v->size(); ++a) {
          if (v->get(a)->is_table() || v->get(a)->is_date() || v->get(a)->is_time() ||
              v->get(a)->is_date_time())
            q.fail("values", "values must be numbers, strings, booleans or arrays");
          for (std::size_t b = 0; b < a; ++b)
            if (io::toml_value_text(*v->get(a)) == io::toml_value_text(*v->get(b)))
              q.fail("values",
                     "value " + std::to_string(a + 1) + " repeats value " + std::to_string(b + 1));
        }
        p.values = *v;
      } else {
        if (!q.has("from") || !q.has("to"))
          q.fail("", "give values = [...] or a range: from, to and count or step");
        try {
          p.values = range_values(*pt.get("from"), *pt.get("to"), pt.get("count"), pt.get("step"),
                                  p.log_scale);
        } catch (const std::invalid_argument& e) {
          q.fail(pt.contains("count") ? "count" : pt.contains("step") ? "step" : "from", e.what());
        }
      }
    } else {
      q.check_keys({"key", "from", "to", "scale"});
      p.from = q.number("from");
      p.to = q.number("to");
      if (!(p.to > p.from)) q.fail("to", "the range is empty: to must exceed from");
      if (p.log_scale && !(p.from > 0)) q.fail("from", "scale = \"log\" needs positive from");
    }
    s.parameters.push_back(std::move(p));
  }
  return s;
}

SweepSpec load_sweep_file(const std::string& path) {
  return parse_sweep_file(io::read_text_file(path), path);
}

} // namespace undertow::sweep

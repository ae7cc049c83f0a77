#include "undertow/io/toml_table.hpp"

#include "undertow/io/text_file.hpp"

#include <algorithm>
#include <cmath>

namespace undertow::io {

TableReader::TableReader(const toml::table& t, std::string file, std::string context)
    : t_(t), file_(std::move(file)), context_(std::move(context)) {}

const toml::node* TableReader::get(std::string_view key) const {
  used_.insert(std::string(key));
  return t_.get(key);
}

bool TableReader::has(std::string_view key) const {
  return t_.contains(key);
}

SourcePlace TableReader::place(std::string_view key) const {
  SourcePlace p{file_, 0, 0,
                context_.empty() ? std::string(key)
                                 : (key.empty() ? context_ : context_ + "." + std::string(key))};
  const toml::node* n = key.empty() ? nullptr : t_.get(key);
  const auto& src = n ? n->source() : t_.source();
  p.line = int(src.begin.line);
  p.column = int(src.begin.column);
  return p;
}

void TableReader::fail(std::string_view key, const std::string& what) const {
  throw InputError(place(key), what);
}

std::optional<double> TableReader::optional_number(std::string_view key) const {
  const toml::node* n = get(key);
  if (!n) return std::nullopt;
  double v;
  if (auto f = n->as_floating_point())
    v = f->get();
  else if (auto i = n->as_integer())
    v = double(i->get());
  else
    fail(key, "must be a number");
  if (!std::isfinite(v)) fail(key, "must be a finite number, got " + std::to_string(v));
  return v;
}

double TableReader::number(std::string_view key) const {
  if (auto v = optional_number(key)) return *v;
  fail("", "missing required key '" + std::string(key) + "'");
}

double TableReader::number_or(std::string_view key, double fallback) const {
  return optional_number(key).value_or(fallback);
}

int TableReader::integer(std::string_view key) const {
  const toml::node* n = get(key);
  if (!n) fail("", "missing required key '" + std::string(key) + "'");
  auto i = n->as_integer();
  if (!i) fail(key, "must be a whole number");
  if (i->get() < -2147483647 || i->get() > 2147483647) fail(key, "is out of range");
  return int(i->get());
}

std::string TableReader::string(std::string_view key) const {
  const toml::node* n = get(key);
  if (!n) fail("", "missing required key '" + std::string(key) + "'");
  auto s = n->as_string();
  if (!s) fail(key, "must be a string");
  return s->get();
}

std::string TableReader::string_or(std::string_view key, std::string fallback) const {
  return has(key) ? string(key) : (get(key), fallback);
}

std::vector<std::string> TableReader::strings(std::string_view key) const {
  const toml::node* n = get(key);
  if (!n) fail("", "missing required key '" + std::string(key) + "'");
  auto a = n->as_array();
  if (!a) fail(key, "must be an array of strings");
  std::vector<std::string> out;
  for (const auto& e : *a) {
    auto s = e.as_string();
    if (!s) fail(key, "must be an array of strings");
    out.push_back(s->get());
  }
  return out;
}

std::map<std::string, std::string> TableReader::string_map_or_empty(std::string_view key) const {
  std::map<std::string, std::string> out;
  const toml::node* n = get(key);
  if (!n) return out;
  const auto* t = n->as_table();
  if (!t) fail(key, "must be a table of strings (e.g. {parallax_mas = \"plx\"})");
  for (const auto& [k, v] : *t) {
    const auto* s = v.as_string();
    if (!s) fail(key, "'" + std::string(k.str()) + "' must be a string (a column name)");
    out.emplace(std::string(k.str()), s->get());
  }
  return out;
}

bool TableReader::is_array(std::string_view key) const {
  const toml::node* n = get(key);
  return n && n->is_array();
}

std::vector<double> TableReader::numbers(std::string_view key) const {
  const toml::node* n = get(key);
  if (!n) fail("", "missing required key '" + std::string(key) + "'");
  auto a = n->as_array();
  if (!a) fail(key, "must be an array of numbers");
  std::vector<double> out;
  for (const auto& e : *a) {
    double v;
    if (auto f = e.as_floating_point())
      v = f->get();
    else if (auto i = e.as_integer())
      v = double(i->get());
    else
      fail(key, "must be an array of numbers");
    if (!std::isfinite(v)) fail(key, "must hold finite numbers only");
    out.push_back(v);
  }
  return out;
}

bool TableReader::boolean_or(std::string_view key, bool fallback) const {
  const toml::node* n = get(key);
  if (!n) return fallback;
  auto b = n->as_boolean();
  if (!b) fail(key, "must be true or false");
  return b->get();
}

const toml::table* TableReader::table(std::string_view key) const {
  const toml::node* n = get(key);
  if (!n) return nullptr;
  auto t = n->as_table();
  if (!t) fail(key, "must be a table");
  return t;
}

const toml::array* TableReader::array_of_tables(std::string_view key) const {
  const toml::node* n = get(key);
  if (!n) return nullptr;
  auto a = n->as_array();
  if (!a || !a->is_array_of_tables())
    fail(key, "must be written as [[" + std::string(key) + "]] tables");
  return a;
}

namespace {
// Keys renamed since undertow 0.1 (CHANGELOG.md, docs/migration.md): the old spelling is refused,
// naming the new one, wherever the new one is valid.
struct Renamed {
  std::string_view old_name, new_name, note;
};
constexpr Renamed kRenamed[] = {
    {"max_radius_kpc", "radius_max_kpc", ""},
    {"max_sources", "sources_max", ""},
    {"min_parallax_snr", "parallax_snr_min", ""},
    {"min_neighbours", "neighbours_min", ""},
    {"max_age_myr", "age_max_myr", ""},
    {"amplitude_kms2", "amplitude_km2_s2", ""},
    {"parallax_fraction", "parallax_err_fraction", ""},
    {"parallax_mas", "parallax_err_mas", ""},
    {"pm_masyr", "pm_err_masyr", ""},
    {"vlsr_kms", "vlsr_err_kms", ""},
    {"radius_kpc", "neighbourhood_radius_kpc", ""},
    {"density_msun_pc3", "density_msun_kpc3", ", in Msun/kpc^3: 10^9 times the old value"},
};

[[noreturn]] void unknown_key(const TableReader& r, const toml::key& k,
                              const std::vector<std::string>& valid) {
  SourcePlace at = r.place(k.str());
  at.line = int(k.source().begin.line); // point at the key itself, not its value
  at.column = int(k.source().begin.column);
  for (const auto& [old_name, new_name, note] : kRenamed)
    if (k.str() == old_name && std::find(valid.begin(), valid.end(), new_name) != valid.end())
      throw InputError(at, "renamed: write '" + std::string(new_name) + "'" + std::string(note) +
                               " (see CHANGELOG.md and docs/migration.md)");
  std::string list;
  for (const auto& s : valid)
    list += (list.empty() ? "" : ", ") + s;
  throw InputError(at, "unknown key; valid keys here: " + list);
}
} // namespace

void TableReader::check_keys(const std::vector<std::string>& valid) const {
  for (const auto& [k, v] : t_)
    if (std::find(valid.begin(), valid.end(), k.str()) == valid.end()) unknown_key(*this, k, valid);
}

void TableReader::finish(const std::vector<std::string>& valid) const {
  for (const auto& [k, v] : t_)
    if (!used_.count(k.str())) unknown_key(*this, k, valid);
}

namespace {
InputError from_parse_error(const toml::parse_error& e, const std::string& file) {
  return InputError(SourcePlace{file, int(e.source().begin.line), int(e.source().begin.column), {}},
                    std::string(e.description()));
}
} // namespace

toml::table parse_toml_file(const std::string& path) {
  return parse_toml_text(read_text_file(path), path);
}

toml::table parse_toml_text(std::string_view text, const std::string& source_name) {
  try {
    return toml::parse(text, source_name);
  } catch (const toml::parse_error& e) {
    throw from_parse_error(e, source_name);
  }
}

} // namespace undertow::io

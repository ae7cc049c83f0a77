#include "undertow/io/toml_writer.hpp"

#include <charconv>
#include <cmath>
#include <stdexcept>

namespace undertow::io {
namespace {

bool bare(std::string_view k) {
  if (k.empty()) return false;
  for (char c : k)
    if (!((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '_' ||
          c == '-'))
      return false;
  return true;
}

std::string quoted(std::string_view s) {
  std::string o = "\"";
  for (unsigned char c : s) {
    switch (c) {
    case '"':
      o += "\\\"";
      break;
    case '\\':
      o += "\\\\";
      break;
    case '\n':
      o += "\\n";
      break;
    case '\t':
      o += "\\t";
      break;
    case '\r':
      o += "\\r";
      break;
    default:
      if (c < 0x20 || c == 0x7f) {
        char b[8];
        std::snprintf(b, sizeof b, "\\u%04x", c);
        o += b;
      } else {
        o += char(c);
      }
    }
  }
  return o + "\"";
}

std::string key_text(std::string_view k) {
  return bare(k) ? std::string(k) : quoted(k);
}

std::string float_text(double v) {
  if (std::isnan(v)) return "nan";
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  char b[64];
  const auto r = std::to_chars(b, b + sizeof b, v);
  std::string s(b, r.ptr);
  // TOML floats need a fraction or an exponent: "3" would read back as an integer.
  if (s.find_first_of(".e") == std::string::npos) s += ".0";
  return s;
}

bool is_table_array(const toml::node& n) {
  const auto* a = n.as_array();
  return a && !a->empty() && a->is_array_of_tables();
}

void write_table(std::string& out, const toml::table& t, const std::string& prefix) {
  for (const auto& [k, v] : t)
    if (!v.is_table() && !is_table_array(v))
      out += key_text(k.str()) + " = " + toml_value_text(v) + "\n";
  for (const auto& [k, v] : t) {
    const std::string name = prefix.empty() ? key_text(k.str()) : prefix + "." + key_text(k.str());
    if (const auto* sub = v.as_table()) {
      out += "\n[" + name + "]\n";
      write_table(out, *sub, name);
    } else if (is_table_array(v)) {
      for (const auto& e : *v.as_array()) {
        out += "\n[[" + name + "]]\n";
        write_table(out, *e.as_table(), name);
      }
    }
  }
}

} // namespace

std::string toml_value_text(const toml::node& n) {
  if (const auto* s = n.as_string()) return quoted(s->get());
  if (const auto* i = n.as_integer()) return std::to_string(i->get());
  if (const auto* f = n.as_floating_point()) return float_text(f->get());
  if (const auto* b = n.as_boolean()) return b->get() ? "true" : "false";
  if (const auto* a = n.as_array()) {
    std::string o = "[";
    for (std::size_t i = 0; i < a->size(); ++i)
      o += (i ? ", " : "") + toml_value_text(*a->get(i));
    return o + "]";
  }
  if (const auto* t = n.as_table()) {
    std::string o = "{";
    bool first = true;
    for (const auto& [k, v] : *t) {
      o += (first ? " " : ", ") + key_text(k.str()) + " = " + toml_value_text(v);
      first = false;
    }
    return o + (first ? "}" : " }");
  }
  throw std::invalid_argument("dates and times are not written (no undertow file uses them)");
}

std::string toml_text(const toml::table& t) {
  std::string out;
  write_table(out, t, "");
  if (!out.empty() && out.front() == '\n') out.erase(0, 1);
  return out;
}

} // namespace undertow::io

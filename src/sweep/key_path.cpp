#include "undertow/sweep/key_path.hpp"

#include <cctype>

namespace undertow::sweep {
namespace {

bool key_char(char c) {
  return std::isalnum(static_cast<unsigned char>(c)) || c == '_' || c == '-';
}

// Walks every step but the last; returns the table holding the last key.
toml::table* walk(toml::table& root, const std::vector<KeyStep>& steps, const std::string& path) {
  toml::table* t = &root;
  std::string done;
  if (steps.back().label || steps.back().index)
    throw KeyPathError("'" + path + "': ends at a whole table; name a value inside it");
  for (std::size_t i = 0; i + 1 < steps.size(); ++i) {
    const KeyStep& s = steps[i];
    done += (done.empty() ? "" : ".") + s.key;
    toml::node* n = t->get(s.key);
    if (!n)
      throw KeyPathError("'" + path + "': the base scenario has no '" + done +
                         "' (a sweep changes values; it does not add tables)");
    if (s.label || s.index) {
      toml::array* a = n->as_array();
      if (!a || !a->is_array_of_tables())
        throw KeyPathError("'" + path + "': '" + done + "' is not an array of tables ([[" + s.key +
                           "]])");
      toml::table* pick = nullptr;
      if (s.index) {
        if (*s.index >= a->size())
          throw KeyPathError("'" + path + "': '" + done + "' has " + std::to_string(a->size()) +
                             " elements, so there is no [" + std::to_string(*s.index) + "]");
        pick = a->get(*s.index)->as_table();
      } else {
        for (auto& e : *a) {
          const auto* l = e.as_table()->get("label");
          if (l && l->is_string() && l->as_string()->get() == *s.label) {
            if (pick)
              throw KeyPathError("'" + path + "': two elements of '" + done + "' are labelled '" +
                                 *s.label + "'");
            pick = e.as_table();
          }
        }
        if (!pick)
          throw KeyPathError("'" + path + "': no element of '" + done + "' is labelled '" +
                             *s.label + "'");
      }
      done += "[" + (s.label ? *s.label : std::to_string(*s.index)) + "]";
      t = pick;
    } else {
      t = n->as_table();
      if (!t) throw KeyPathError("'" + path + "': '" + done + "' is a value, not a table");
    }
  }
  return t;
}

} // namespace

std::vector<KeyStep> parse_key_path(const std::string& path) {
  std::vector<KeyStep> steps;
  std::size_t i = 0;
  const auto bad = [&](const std::string& why) {
    throw KeyPathError("'" + path + "': " + why + " (at character " + std::to_string(i + 1) + ")");
  };
  if (path.empty()) throw KeyPathError("empty key path");
  while (i < path.size()) {
    KeyStep s;
    while (i < path.size() && key_char(path[i]))
      s.key += path[i++];
    if (s.key.empty()) bad("expected a key");
    if (i < path.size() && path[i] == '[') {
      const std::size_t close = path.find(']', i);
      if (close == std::string::npos) bad("'[' without ']'");
      const std::string sel = path.substr(i + 1, close - i - 1);
      if (sel.empty()) bad("empty []");
      bool digits = true;
      for (char c : sel) {
        if (!key_char(c)) bad("a label holds letters, digits, '_' and '-' only");
        digits = digits && std::isdigit(static_cast<unsigned char>(c));
      }
      if (digits) {
        if (sel.size() > 9) bad("index too large");
        s.index = std::stoul(sel);
      } else
        s.label = sel;
      i = close + 1;
    }
    steps.push_back(std::move(s));
    if (i == path.size()) break;
    if (path[i] != '.') bad("expected '.' or '['");
    if (++i == path.size()) bad("ends with '.'");
  }
  return steps;
}

void set_at_key_path(toml::table& root, const std::string& path, const toml::node& value) {
  const auto steps = parse_key_path(path);
  toml::table* t = walk(root, steps, path);
  const std::string& last = steps.back().key;
  if (const toml::node* old = t->get(last)) {
    const auto* a = old->as_array();
    if (old->is_table() || (a && !a->empty() && a->is_array_of_tables()))
      throw KeyPathError("'" + path + "' is a whole table; name a value inside it");
  }
  value.visit([&](const auto& v) { t->insert_or_assign(last, v); });
}

const toml::node* find_at_key_path(const toml::table& root, const std::string& path) {
  const auto steps = parse_key_path(path);
  try {
    return walk(const_cast<toml::table&>(root), steps, path)->get(steps.back().key);
  } catch (const KeyPathError&) {
    return nullptr; // a table on the way is absent
  }
}

} // namespace undertow::sweep

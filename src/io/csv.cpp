#include "undertow/io/input_table.hpp"

#include <sstream>

namespace undertow::io {

namespace {
std::string trim(const std::string& s) {
  const auto b = s.find_first_not_of(" \t\r");
  if (b == std::string::npos) return "";
  const auto e = s.find_last_not_of(" \t\r");
  return s.substr(b, e - b + 1);
}
} // namespace

// Inside quotes the delimiter is text and "" is one quote (RFC 4180). With ' ' as delimiter
// (ECSV's default) runs of spaces separate one pair of fields.
std::vector<std::string> split_fields(const std::string& line, char delimiter) {
  std::vector<std::string> out;
  std::string cur;
  bool quoted = false;
  for (std::size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (c == '"' && quoted && i + 1 < line.size() && line[i + 1] == '"')
      cur += line[++i];
    else if (c == '"')
      quoted = !quoted;
    else if (c == delimiter && !quoted) {
      out.push_back(delimiter == ' ' ? cur : trim(cur));
      cur.clear();
      if (delimiter == ' ')
        while (i + 1 < line.size() && line[i + 1] == ' ')
          ++i;
    } else
      cur += c;
  }
  out.push_back(delimiter == ' ' ? cur : trim(cur));
  return out;
}

void read_delimited(InputTable& t, std::istream& in, int line, char delimiter,
                    const std::function<void(std::vector<std::string>, int)>& on_header) {
  std::string text;
  bool header = false;
  while (std::getline(in, text)) {
    ++line;
    const std::string s = trim(text);
    if (s.empty() || s[0] == '#') continue;
    auto cells = split_fields(s, delimiter);
    if (!header) {
      on_header(std::move(cells), line);
      header = true;
    } else {
      t.add_row(std::move(cells), line);
    }
  }
  t.finish();
}

InputTable parse_csv(const std::string& text, const std::string& source) {
  InputTable t(source, TableFileKind::csv);
  std::istringstream in(text);
  read_delimited(t, in, 0, ',', [&](std::vector<std::string> names, int line) {
    const std::size_t k = names.size();
    t.set_header(std::move(names), std::vector<std::string>(k), line);
  });
  return t;
}

} // namespace undertow::io

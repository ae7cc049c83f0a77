#include <sstream>
#include <yaml-cpp/yaml.h>

#include "undertow/io/input_table.hpp"

namespace undertow::io {

namespace {
const char* const kTypes[] = {"bool",    "int8",    "int16",    "int32",  "int64",
                              "uint8",   "uint16",  "uint32",   "uint64", "float16",
                              "float32", "float64", "float128", "string"};
}

InputTable parse_ecsv(const std::string& text, const std::string& source) {
  InputTable t(source, TableFileKind::ecsv);
  std::istringstream in(text);
  std::string line, yaml;
  int n = 0, yaml_first = 0;
  // The header: "# %ECSV <version>", "# ---", then YAML, each line behind "# ".
  std::getline(in, line);
  ++n;
  const std::string version = line.size() > 8 ? line.substr(8) : "";
  if (version.rfind("1.", 0) != 0 && version.rfind("0.9", 0) != 0)
    throw InputError(SourcePlace{source, 1, 0, {}},
                     "ECSV version '" + version + "': this reader knows 0.9 and 1.x");
  std::streampos body_start = in.tellg();
  while (std::getline(in, line)) {
    ++n;
    if (line.empty() || line[0] != '#') break;
    body_start = in.tellg();
    if (line.rfind("# ---", 0) == 0 && yaml_first == 0) {
      yaml_first = n + 1;
      continue;
    }
    yaml += (line.size() > 2 ? line.substr(2) : "") + "\n";
  }
  const int body_line = n;
  YAML::Node head;
  try {
    head = YAML::Load(yaml);
  } catch (const YAML::Exception& e) {
    throw InputError(SourcePlace{source, yaml_first + e.mark.line, 0, {}}, "ECSV header: " + e.msg);
  }
  const auto fail = [&](const std::string& field, const std::string& what) -> InputError {
    return InputError(SourcePlace{source, yaml_first, 0, field}, "ECSV header: " + what);
  };
  if (!head.IsMap() || !head["datatype"] || !head["datatype"].IsSequence())
    throw fail("datatype", "no list of columns ('datatype')");
  char delimiter = ' ';
  if (const auto d = head["delimiter"]) {
    const std::string ds = d.as<std::string>();
    if (ds != " " && ds != ",") throw fail("delimiter", "must be ' ' or ',', got '" + ds + "'");
    delimiter = ds[0];
  }
  std::vector<std::string> names, units;
  for (const auto& c : head["datatype"]) {
    if (!c.IsMap() || !c["name"]) throw fail("datatype", "a column without a name");
    const std::string name = c["name"].as<std::string>();
    const std::string type = c["datatype"] ? c["datatype"].as<std::string>() : "";
    bool known = false;
    for (const char* k : kTypes)
      known = known || type == k;
    if (!known) throw fail(name, "unknown datatype '" + type + "'");
    if (c["subtype"]) throw fail(name, "a column of arrays (subtype) is not a catalog column");
    names.push_back(name);
    units.push_back(c["unit"] ? c["unit"].as<std::string>() : "");
  }
  // The body: the column names, then the rows; like CSV with the delimiter.
  in.clear();
  in.seekg(body_start);
  read_delimited(t, in, body_line - 1, delimiter, [&](std::vector<std::string> cells, int line) {
    if (cells != names)
      throw InputError(SourcePlace{source, line, 0, {}},
                       "the column names here differ from the ECSV header's");
    t.set_header(names, units, line);
  });
  return t;
}

} // namespace undertow::io

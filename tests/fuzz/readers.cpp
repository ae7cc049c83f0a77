// libFuzzer targets for the readers of user files (docs/developers: fuzzing). Each target takes
// the bytes of one file, checks them as the file reader does (io::checked_text) and parses them
// as one kind of input; a reader may refuse any input, but only with an InputError: any other
// exception, a crash, a hang or a sanitizer report is a finding. One file, compiled once per
// target with UNDERTOW_FUZZ_<READER> defined (tests/fuzz/CMakeLists.txt).
#include <cstddef>
#include <cstdint>
#include <string>

#include "undertow/error.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/io/toml_table.hpp"
#include "undertow/observe/observation_file.hpp"
#include "undertow/potential/model_file.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/scenario/scenario.hpp"
#include "undertow/sweep/sweep_file.hpp"

namespace {

// Files named inside an input (a scenario's model file, a sweep's base) resolve beside it: in
// the demo folder, so that the seed corpus's references are found.
const std::string kPlace = std::string(UNDERTOW_SOURCE_DIR) + "/demo/fuzz-input";

void parse(const std::string& text) {
  using namespace undertow;
#if defined(UNDERTOW_FUZZ_CATALOG)
  residuals::parse_catalog(text, kPlace + ".csv");
#elif defined(UNDERTOW_FUZZ_MODEL)
  potential::parse_model_text(text, kPlace + ".toml");
#elif defined(UNDERTOW_FUZZ_SCENARIO)
  scenario::parse_scenario(text, kPlace + ".toml");
#elif defined(UNDERTOW_FUZZ_OBSERVATION)
  static const auto model = potential::parse_model_text(
      io::read_text_file(std::string(UNDERTOW_SOURCE_DIR) + "/potentials/kestrel.toml"), "m");
  observe::observation_from_table(io::parse_toml_text(text, kPlace + ".toml"), kPlace + ".toml",
                                  "", model);
#elif defined(UNDERTOW_FUZZ_SWEEP)
  sweep::parse_sweep_file(text, kPlace + ".toml");
#else
#error "define one UNDERTOW_FUZZ_<READER>"
#endif
}

} // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  try {
    parse(undertow::io::checked_text(std::string(reinterpret_cast<const char*>(data), size),
                                     "fuzz-input"));
  } catch (const undertow::InputError&) {
    // refused with a message: what a reader should do with bad input
  }
  return 0;
}

// Sweep plans: the TOML writer and digest they rest on, key paths, the grid and Latin-hypercube
// designs, stable ids, and bad sweep files refused before anything is planned.
#include <catch2/catch.hpp>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <set>

#include "support/scratch.hpp"
#include "undertow/io/digest.hpp"
#include "undertow/io/text_file.hpp"
#include "undertow/io/toml_table.hpp"
#include "undertow/io/toml_writer.hpp"
#include "undertow/sweep/design.hpp"
#include "undertow/sweep/key_path.hpp"
#include "undertow/sweep/plan.hpp"

using namespace undertow;
namespace fs = std::filesystem;

namespace {

using test::scratch;

const std::string base_path = std::string(UNDERTOW_SOURCE_DIR) + "/tests/sweep/small-spiral.toml";
const std::string ref_path = std::string(UNDERTOW_SOURCE_DIR) + "/tests/sweep/small-smooth.toml";

// A sweep file in dir, with the given [sweep] extras and [[parameter]] tables.
std::string write_sweep(const fs::path& dir, const std::string& extra, const std::string& params,
                        const std::string& base = base_path) {
  const std::string p = (dir / "sweep.toml").string();
  std::ofstream(p) << "[sweep]\nname = \"t\"\nbase = \"" << base << "\"\n"
                   << extra << "\n"
                   << params;
  return p;
}

const char* two_params = R"(
[[parameter]]
key = "galaxy.pattern[arms].pattern_speed_kms_kpc"
values = [17, 21, 25]
[[parameter]]
key = "galaxy.pattern[arms].force_ratio"
from = 0.02
to = 0.08
count = 4
)";

} // namespace

TEST_CASE("TOML writer: what it writes reads back as the same values", "[sweep][io]") {
  // TOML v1.0.0: a float needs a fraction or an exponent; std::to_chars (C++17 [charconv])
  // gives the shortest text that reads back to the same double.
  const std::string src = R"(a = 0.1
b = 9.0e9
c = 0.041234567891234567
d = 3.0
e = -7
s = "tab\there \"q\" ü"
arr = [1, 2.5, "x", [true, false]]
inl = { p = 1, "odd key" = 2 }
[t]
x = 1e-300
[t.u]
y = 2
[[p]]
label = "arms"
v = 0.3
[[p]]
label = "bar"
)";
  const toml::table t = io::parse_toml_text(src, "src");
  const std::string out = io::toml_text(t);
  const toml::table back = io::parse_toml_text(out, "out");
  CHECK(io::toml_text(back) == out);
  CHECK(back["a"].value<double>() == 0.1);
  CHECK(back["c"].value<double>() == 0.041234567891234567);
  CHECK(back["d"].is_floating_point());
  CHECK(back["e"].value<std::int64_t>() == -7);
  CHECK(back["s"].value<std::string>() == "tab\there \"q\" ü");
  CHECK(back["t"]["x"].value<double>() == 1e-300);
  CHECK(back["p"][1]["label"].value<std::string>() == "bar");
  CHECK(back["inl"]["odd key"].value<std::int64_t>() == 2);
  CHECK(out.find("a = 0.1\n") != std::string::npos);
  CHECK(out.find("d = 3.0\n") != std::string::npos);
}

TEST_CASE("FNV-1a 64: the published test vectors", "[sweep][io]") {
  // Test vectors of the FNV reference code (Fowler, Noll & Vo; IETF draft-eastlake-fnv),
  // quoted from memory.
  CHECK(io::fnv1a64("") == 0xcbf29ce484222325ULL);
  CHECK(io::fnv1a64("a") == 0xaf63dc4c8601ec8cULL);
  CHECK(io::fnv1a64("foobar") == 0x85944171f73967e8ULL);
  CHECK(io::hex64(0xabcULL) == "0000000000000abc");
}

TEST_CASE("Key paths reach values by table key, label and index", "[sweep]") {
  toml::table t = io::parse_toml_text(R"(
[run]
seed = 1
[galaxy]
[[galaxy.pattern]]
label = "arms"
force_ratio = 0.05
[[galaxy.pattern]]
label = "bar"
strength = 0.1
)",
                                      "t");
  sweep::set_at_key_path(t, "galaxy.pattern[arms].force_ratio", toml::value<double>(0.07));
  sweep::set_at_key_path(t, "galaxy.pattern[1].strength", toml::value<double>(0.2));
  sweep::set_at_key_path(t, "run.seed", toml::value<std::int64_t>(9));
  CHECK(t["galaxy"]["pattern"][0]["force_ratio"].value<double>() == 0.07);
  CHECK(t["galaxy"]["pattern"][1]["strength"].value<double>() == 0.2);
  CHECK(t["run"]["seed"].value<std::int64_t>() == 9);
  // A new last key is allowed (the scenario reader judges it); new tables are not.
  sweep::set_at_key_path(t, "run.extra", toml::value<double>(1));
  using Catch::Matchers::Contains;
  const auto v = toml::value<double>(1);
  CHECK_THROWS_WITH(sweep::set_at_key_path(t, "gas.restitution", v), Contains("no 'gas'"));
  CHECK_THROWS_WITH(sweep::set_at_key_path(t, "galaxy.pattern[spokes].x", v),
                    Contains("no element of 'galaxy.pattern' is labelled 'spokes'"));
  CHECK_THROWS_WITH(sweep::set_at_key_path(t, "galaxy.pattern[2].x", v),
                    Contains("has 2 elements"));
  CHECK_THROWS_WITH(sweep::set_at_key_path(t, "galaxy.pattern[arms]", v), Contains("whole table"));
  CHECK_THROWS_WITH(sweep::set_at_key_path(t, "run.seed.x", v), Contains("is a value"));
  CHECK_THROWS_WITH(sweep::parse_key_path("a..b"), Contains("expected a key"));
  CHECK_THROWS_WITH(sweep::parse_key_path("a[b"), Contains("without ']'"));
  CHECK_THROWS_WITH(sweep::parse_key_path("a.b."), Contains("ends with '.'"));
}

TEST_CASE("Grid: every combination, first parameter slowest, ranges", "[sweep]") {
  sweep::Parameter a, b;
  a.values = toml::array{1, 2};
  b.values = toml::array{"x", "y", "z"};
  const auto rows = sweep::grid_rows({a, b});
  REQUIRE(rows.size() == 6);
  CHECK(rows[0].get(0)->value<std::int64_t>() == 1);
  CHECK(rows[0].get(1)->value<std::string>() == "x");
  CHECK(rows[2].get(1)->value<std::string>() == "z");
  CHECK(rows[3].get(0)->value<std::int64_t>() == 2);

  const auto n = [](auto x) { return toml::value<decltype(x)>(x); };
  const auto count = n(std::int64_t(4));
  auto lin = sweep::range_values(n(0.02), n(0.08), &count, nullptr, false);
  REQUIRE(lin.size() == 4);
  CHECK(lin.get(1)->value<double>() == 0.04); // tidied: not 0.039999999999999994
  CHECK(lin.get(3)->value<double>() == 0.08);
  const auto three = n(std::int64_t(3));
  auto lg = sweep::range_values(n(1.0), n(100.0), &three, nullptr, true);
  CHECK(lg.get(1)->value<double>() == Approx(10.0).epsilon(1e-12)); // geometric
  const auto step = n(std::int64_t(2));
  auto ints = sweep::range_values(n(std::int64_t(2)), n(std::int64_t(8)), nullptr, &step, false);
  REQUIRE(ints.size() == 4);
  CHECK(ints.get(3)->is_integer()); // whole numbers stay TOML integers (e.g. arms = 4)
  using Catch::Matchers::Contains;
  const auto neg = n(std::int64_t(-3)), zero = n(std::int64_t(0));
  CHECK_THROWS_WITH(sweep::range_values(n(1.0), n(2.0), &neg, nullptr, false),
                    Contains("at least 1, got -3"));
  CHECK_THROWS_WITH(sweep::range_values(n(1.0), n(2.0), &zero, nullptr, false),
                    Contains("at least 1"));
  const auto st = n(0.5);
  CHECK_THROWS_WITH(sweep::range_values(n(2.0), n(1.0), nullptr, &st, false),
                    Contains("range is empty"));
}

TEST_CASE("Latin hypercube: each stratum of each parameter used exactly once", "[sweep]") {
  // McKay, Beckman & Conover (1979): n points, every one of the n equal strata of every
  // parameter holds exactly one point.
  for (std::size_t n : {1u, 7u, 50u, 333u}) {
    const auto u = sweep::latin_hypercube(n, 4, 42);
    for (std::size_t j = 0; j < 4; ++j) {
      std::set<std::size_t> strata;
      for (std::size_t i = 0; i < n; ++i) {
        REQUIRE(u[i][j] > 0);
        REQUIRE(u[i][j] < 1);
        strata.insert(std::size_t(u[i][j] * double(n)));
      }
      CHECK(strata.size() == n);
      CHECK(*strata.rbegin() == n - 1);
    }
  }
  CHECK(sweep::latin_hypercube(20, 2, 42) == sweep::latin_hypercube(20, 2, 42));
  CHECK(sweep::latin_hypercube(20, 2, 42) != sweep::latin_hypercube(20, 2, 43));

  // Mapped onto ranges, linear and logarithmic, the strata still hold one value each.
  sweep::Parameter a, b;
  a.from = 15, a.to = 30;
  b.from = 0.01, b.to = 0.1, b.log_scale = true;
  const std::size_t n = 64;
  const auto rows = sweep::latin_hypercube_rows({a, b}, n, 7);
  std::set<int> sa, sb;
  for (const auto& r : rows) {
    const double x = *r.get(0)->value<double>(), y = *r.get(1)->value<double>();
    sa.insert(int((x - 15) / 15 * double(n)));
    sb.insert(int(std::log(y / 0.01) / std::log(10.0) * double(n)));
  }
  CHECK(sa.size() == n);
  CHECK(sb.size() == n);
}

TEST_CASE("Plan: numbered points with ids that replanning keeps", "[sweep]") {
  const fs::path dir = scratch("plan-ids");
  const std::string f = write_sweep(dir, "reference = \"" + ref_path + "\"", two_params);
  const auto spec = sweep::load_sweep_file(f);
  const auto plan = sweep::make_plan(spec, (dir / "out").string());
  REQUIRE(plan.points.size() == 1 + 3 * 4);
  CHECK(plan.points[0].reference);
  std::set<std::string> ids;
  for (const auto& q : plan.points) {
    CHECK(q.id.size() == 12);
    ids.insert(q.id);
  }
  CHECK(ids.size() == plan.points.size());
  // The fourth model point (number 4) is pattern speed 17 with force ratio 0.08.
  CHECK(plan.points[4].values.get(0)->value<double>() == 17);
  CHECK(plan.points[4].values.get(1)->value<double>() == 0.08);
  const auto sc = sweep::point_scenario(plan, plan.points[4]);
  REQUIRE(sc.model.patterns.size() == 1);
  CHECK(sc.model.patterns[0].pattern_speed == 17);

  // Planning again, and reading the written plan back, gives the same ids and scenarios.
  const auto again = sweep::make_plan(sweep::load_sweep_file(f), (dir / "out").string());
  sweep::write_plan(plan);
  const auto read = sweep::read_plan((dir / "out").string());
  REQUIRE(again.points.size() == plan.points.size());
  REQUIRE(read.points.size() == plan.points.size());
  for (std::size_t i = 0; i < plan.points.size(); ++i) {
    CHECK(again.points[i].id == plan.points[i].id);
    CHECK(read.points[i].id == plan.points[i].id);
    CHECK(read.points[i].scenario == plan.points[i].scenario);
  }

  // A grown grid keeps the ids of the points it already had.
  std::string grown = two_params;
  grown.replace(grown.find("[17, 21, 25]"), 12, "[17, 19, 21, 25]");
  const auto bigger = sweep::make_plan(
      sweep::load_sweep_file(write_sweep(dir, "reference = \"" + ref_path + "\"", grown)),
      (dir / "out").string());
  std::set<std::string> bigger_ids;
  for (const auto& q : bigger.points)
    bigger_ids.insert(q.id);
  for (const auto& id : ids)
    CHECK(bigger_ids.count(id) == 1);
  CHECK(bigger.points.size() == 1 + 4 * 4);
}

TEST_CASE("Plan: a reference that sees the survey differently is warned about", "[sweep]") {
  const fs::path dir = scratch("plan-reference");
  const std::string src = UNDERTOW_SOURCE_DIR;
  CHECK(sweep::make_plan(sweep::load_sweep_file(
                             write_sweep(dir, "reference = \"" + ref_path + "\"", two_params)),
                         (dir / "out").string())
            .warnings.empty());
  std::string ref = io::read_text_file(ref_path);
  for (const auto& [from, to] : {std::pair<std::string, std::string>{"\"../../", "\"" + src + "/"},
                                 {"draws = 50", "draws = 60"}})
    for (auto at = ref.find(from); at != std::string::npos; at = ref.find(from))
      ref.replace(at, from.size(), to);
  std::ofstream(dir / "other-ref.toml") << ref;
  const auto p = sweep::make_plan(
      sweep::load_sweep_file(write_sweep(
          dir, "reference = \"" + (dir / "other-ref.toml").string() + "\"", two_params)),
      (dir / "out").string());
  REQUIRE(p.warnings.size() == 1);
  CHECK_THAT(p.warnings[0], Catch::Matchers::Contains("[comparison] differs"));
  // Sweeping the Sun changes the measured residuals between points.
  const auto q = sweep::make_plan(
      sweep::load_sweep_file(write_sweep(dir, "reference = \"" + ref_path + "\"", R"(
[[parameter]]
key = "observation.sun.r0_kpc"
values = [8.0, 8.2]
)")),
      (dir / "out").string());
  REQUIRE(q.warnings.size() == 1);
  CHECK_THAT(q.warnings[0], Catch::Matchers::Contains("changes the measured residuals"));
}

TEST_CASE("Plan: replicates get their own seeds, derived reproducibly", "[sweep]") {
  const fs::path dir = scratch("plan-replicates");
  const auto plan = sweep::make_plan(sweep::load_sweep_file(write_sweep(dir, "replicates = 3", R"(
[[parameter]]
key = "galaxy.pattern[arms].force_ratio"
values = [0.05]
)")),
                                     (dir / "out").string());
  REQUIRE(plan.points.size() == 3);
  const auto s0 = sweep::point_scenario(plan, plan.points[0]);
  const auto s1 = sweep::point_scenario(plan, plan.points[1]);
  const auto s2 = sweep::point_scenario(plan, plan.points[2]);
  CHECK(s0.seed == 5); // replicate 0 keeps the base scenario's seeds
  CHECK(s1.seed != s0.seed);
  CHECK(s2.seed != s1.seed);
  CHECK(s1.comparison->seed != s0.comparison->seed);
}

TEST_CASE("Bad sweep files are refused with the place and nothing is planned", "[sweep]") {
  using Catch::Matchers::Contains;
  const fs::path dir = scratch("plan-bad");
  const auto plan_of = [&](const std::string& extra, const std::string& params,
                           const std::string& base = base_path) {
    return sweep::make_plan(sweep::load_sweep_file(write_sweep(dir, extra, params, base)),
                            (dir / "out").string());
  };
  // An unknown key under an existing table: the scenario reader names it.
  CHECK_THROWS_WITH(plan_of("", R"(
[[parameter]]
key = "galaxy.pattern[arms].force_ratoi"
values = [0.05]
)"),
                    Contains("sweep.toml:") && Contains("force_ratoi") &&
                        Contains("parameter 'galaxy.pattern[arms].force_ratoi'"));
  CHECK_THROWS_WITH(plan_of("", R"(
[[parameter]]
key = "galaxy.pattern[spiral].force_ratio"
values = [0.05]
)"),
                    Contains("no element of 'galaxy.pattern' is labelled 'spiral'"));
  CHECK_THROWS_WITH(plan_of("", R"(
[[parameter]]
key = "bar.strength"
values = [0.05]
)"),
                    Contains("the base scenario has no 'bar'"));
  // A value the scenario reader refuses.
  CHECK_THROWS_WITH(plan_of("", R"(
[[parameter]]
key = "integration.step_myr"
values = [0.5, -1]
)"),
                    Contains("point 1") && Contains("step_myr") && Contains("positive"));
  CHECK_THROWS_WITH(plan_of("", R"(
[[parameter]]
key = "galaxy.pattern[arms].force_ratio"
values = []
)"),
                    Contains("sweep.toml:") && Contains("empty"));
  CHECK_THROWS_WITH(plan_of("", R"(
[[parameter]]
key = "galaxy.pattern[arms].force_ratio"
from = 0.02
to = 0.08
count = -2
)"),
                    Contains("at least 1, got -2"));
  CHECK_THROWS_WITH(plan_of("", R"(
[[parameter]]
key = "galaxy.pattern[arms].force_ratio"
values = [0.02]
[[parameter]]
key = "galaxy.pattern[arms].force_ratio"
values = [0.03]
)"),
                    Contains("swept twice"));
  CHECK_THROWS_WITH(plan_of("", R"(
[[parameter]]
key = "galaxy.pattern[arms].force_ratio"
values = [0.02, 0.02]
)"),
                    Contains("repeats value 1"));
  CHECK_THROWS_WITH(plan_of("", two_params, "/nonexistent/base.toml"),
                    Contains("base") && Contains("does not exist"));
  CHECK_THROWS_WITH(plan_of("design = \"latin-hypercube\"\npoints = 5", two_params),
                    Contains("unknown key"));
  CHECK_THROWS_WITH(plan_of("design = \"latin-hypercube\"", R"(
[[parameter]]
key = "galaxy.pattern[arms].force_ratio"
from = 0.02
to = 0.08
)"),
                    Contains("needs points"));
  CHECK_THROWS_WITH(plan_of("desing = \"grid\"", two_params), Contains("desing"));
}

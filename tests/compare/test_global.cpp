// Global comparison tables.
#include <catch2/catch.hpp>
#include <random>

#include "undertow/compare/global.hpp"

using namespace undertow;

namespace {
residuals::ResidualResult sample(std::mt19937_64& rng, std::size_t n, double lag) {
  std::normal_distribution<double> g(0, 8);
  std::uniform_real_distribution<double> R(5, 11), psi(-30, 30);
  residuals::ResidualResult r;
  for (std::size_t i = 0; i < n; ++i) {
    residuals::SourceResidual s;
    s.name = "s" + std::to_string(i);
    s.group = i % 2 ? "a" : "b";
    s.R_kpc = R(rng), s.psi_deg = psi(rng);
    s.uvw = {g(rng), lag + g(rng), g(rng)};
    r.sources.push_back(s);
  }
  return r;
}
} // namespace

TEST_CASE("A measured catalog compared with itself gives zero differences and p-values of 1",
          "[compare]") {
  std::mt19937_64 rng(8);
  const auto m = sample(rng, 200, -5);
  const auto t = compare::global_table(m, m, {{5, 8, 11}, {-30, 0, 30}}, 200, 1);
  REQUIRE(t.rows.size() == (1 + 2 + 2 + 2) * 3);
  for (const auto& row : t.rows) {
    CHECK(row[6] == 0.0);  // difference
    CHECK(row[14] == 1.0); // KS p
    CHECK(row[15] == 1.0); // AD p
  }
}

TEST_CASE("The global table finds a 5 km/s lag between 200 measured and 2000 simulated sources "
          "at a pull beyond 5, and no difference in U_s",
          "[compare]") {
  std::mt19937_64 rng(9);
  const auto m = sample(rng, 200, -5), s = sample(rng, 2000, 0);
  const auto t = compare::global_table(m, s, {}, 500, 2);
  REQUIRE(t.text_headers == std::vector<std::string>{"subset", "component"});
  REQUIRE(t.text_rows[1] == std::vector<std::string>{"all", "V_s"});
  CHECK(t.rows[1][6] == Approx(-5).margin(2.0));
  CHECK(t.columns[7].name == "pull");
  CHECK(t.rows[1][7] < -5);    // the pull, (measured - simulated) / its error
  CHECK(t.rows[1][14] < 1e-3); // KS
  CHECK(std::fabs(t.rows[0][7]) < 3);
}

TEST_CASE("Global comparison as values: all() is the subset of all sources, and the table is a "
          "view of the values, row for row",
          "[compare]") {
  std::mt19937_64 rng(10);
  const auto m = sample(rng, 200, -5), s = sample(rng, 2000, 0);
  const auto g = compare::compare_globally(m, s, {{5, 8, 11}, {}}, 300, 3);
  REQUIRE(g.subsets.size() == 1 + 2 + 2); // all, two radius bins, two groups
  CHECK(g.all().label == "all");
  CHECK(g.all().uvw[1].measured.n == 200);
  CHECK(g.all().uvw[1].pull < -5); // the 5 km/s lag
  CHECK(g.subsets[1].label == "R 5 to 8 kpc"); // a bin's label reads as a range
  const auto t = compare::global_table(g);
  REQUIRE(t.rows.size() == g.subsets.size() * 3);
  for (std::size_t i = 0; i < g.subsets.size(); ++i)
    for (std::size_t c = 0; c < 3; ++c) {
      const auto& v = g.subsets[i].uvw[c];
      const auto& row = t.rows[3 * i + c];
      CHECK(row[2] == v.measured.mean);
      CHECK(row[4] == v.simulated.mean);
      CHECK(row[7] == v.pull);
      CHECK(t.text_rows[3 * i + c][0] == g.subsets[i].label);
      CHECK(t.text_rows[3 * i + c][1] == std::string(1, "UVW"[c]) + "_s");
    }
  compare::GlobalComparison empty;
  CHECK_THROWS_AS(empty.all(), std::logic_error);
}

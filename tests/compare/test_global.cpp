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
          "at high significance, and no difference in U_s",
          "[compare]") {
  std::mt19937_64 rng(9);
  const auto m = sample(rng, 200, -5), s = sample(rng, 2000, 0);
  const auto t = compare::global_table(m, s, {}, 500, 2);
  REQUIRE(t.row_labels[1] == "all V_s");
  CHECK(t.rows[1][6] == Approx(-5).margin(2.0));
  CHECK(t.rows[1][7] < -5);    // significance
  CHECK(t.rows[1][14] < 1e-3); // KS
  CHECK(std::fabs(t.rows[0][7]) < 3);
}

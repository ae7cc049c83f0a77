#pragma once
// Local comparison, a descriptive table: for each measured source, the simulated young sources
// near it in the Galactic plane (a k-d tree) predict its (U_s, V_s, W_s) by the Student-t
// predictive distribution of compare/predictive.hpp, widened by the source's measurement
// covariance. Per source: the pulls (each component by its own univariate predictive t_{k-1}) as
// standard normal deviates of the same probability, the
// quadratic form Q with its tail probability, and ln p. The verdict between models is
// compare/verdict.hpp, in the space of the measurements; this table shows where a model fails.
#include <array>
#include <string>
#include <vector>

namespace undertow::compare {

struct PlanePoint {
  double x = 0, y = 0;         // Galactocentric, kpc
  std::array<double, 3> uvw{}; // km/s
  std::array<double, 9> cov{}; // measurement covariance (zero for simulated sources), (km/s)^2
  std::string name;
};

struct Neighbourhood {
  enum class Kind { radius, nearest } kind = Kind::nearest;
  double radius_kpc = 1.0;
  std::size_t k = 30;
  std::size_t min_count = 5; // fewer simulated neighbours than this is an error (at least 4)
};

struct LocalSource {
  std::string name;
  std::size_t neighbours = 0;
  std::array<double, 3> predicted{}, pull{};
  std::array<double, 9> predicted_cov{}; // the predictive scale, without measurement errors
  double dof = 0;                        // of the predictive t (Satterthwaite, with errors)
  double chi2 = 0, p_value = 1, log_likelihood = 0;
};

struct LocalResult {
  std::vector<LocalSource> sources;
  double chi2 = 0, log_likelihood = 0;
  std::vector<std::string> outliers; // sources whose Q has p < 0.0027 (3 sigma)
};

// Throws InputError naming the first source with too few simulated neighbours.
LocalResult compare_locally(const std::vector<PlanePoint>& measured,
                            const std::vector<PlanePoint>& simulated, const Neighbourhood& n);

// The two-sided tail probability of a 3-sigma deviation of a normal variable (common practice).
inline constexpr double kThreeSigmaTail = 0.0026998;

} // namespace undertow::compare

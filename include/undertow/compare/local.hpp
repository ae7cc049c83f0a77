#pragma once
// Local comparison: for each measured source, the simulated young sources near it in the
// Galactic plane predict a mean and an intrinsic covariance of (U_s, V_s, W_s); the measured
// value is judged against the sum of that covariance and the source's measurement covariance:
// pull per component, chi^2 (3 degrees of freedom) and a Gaussian log-likelihood summed over
// sources.
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
  std::size_t min_count = 5; // fewer simulated neighbours than this is an error
};

struct LocalSource {
  std::string name;
  std::size_t neighbours = 0;
  std::array<double, 3> predicted{}, pull{};
  std::array<double, 9> predicted_cov{};
  double chi2 = 0, log_likelihood = 0;
};

struct LocalResult {
  std::vector<LocalSource> sources;
  double chi2 = 0, log_likelihood = 0;
  std::vector<std::string> outliers; // sources with chi^2 beyond the 3-sigma point of chi^2_3
};

// Throws InputError naming the first source with too few simulated neighbours.
LocalResult compare_locally(const std::vector<PlanePoint>& measured,
                            const std::vector<PlanePoint>& simulated, const Neighbourhood& n);

// chi^2 with 3 degrees of freedom beyond which a source is more than 3 sigma off (p = 0.0027):
// 14.16 (common practice).
inline constexpr double kChi2ThreeSigma3Dof = 14.156;

} // namespace undertow::compare

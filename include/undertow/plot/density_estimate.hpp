#pragma once
// Histograms with Poisson errors and a Gaussian kernel density estimate (Silverman 1986, "Density
// Estimation for Statistics and Data Analysis", ch. 3), for the residual distributions. The
// bandwidth is Silverman's rule of thumb h = (4/3)^(1/5) sigma n^(-1/5) (his eq. 3.28, rounded
// there to 1.06 sigma n^(-1/5)); the tests compare both with scipy's implementation.
#include <vector>

namespace undertow::plot {

struct Histogram {
  std::vector<double> edges;   // bins + 1
  std::vector<double> density; // counts / (n width): integrates to the fraction inside
  std::vector<double> error;   // sqrt(counts) / (n width), the Poisson error
  std::size_t n = 0;           // all values, inside the edges or not
};
Histogram histogram(const std::vector<double>& v, double lo, double hi, int bins);

double silverman_bandwidth(const std::vector<double>& v);
// The estimate at each x, normalised to unit integral over the real line.
std::vector<double> kernel_density(const std::vector<double>& v, const std::vector<double>& x,
                                   double bandwidth);

} // namespace undertow::plot

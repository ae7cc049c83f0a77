#pragma once
// Statistics for comparing a measured and a simulated distribution of one velocity component:
// location and scale (with the robust dispersion 1.4826 MAD, common practice for Gaussian
// consistency), the two-sample Kolmogorov-Smirnov test, and the k-sample Anderson-Darling
// test of Scholz & Stephens (1987, JASA 82, 918) in its form for ties.
#include <vector>

namespace undertow::compare {

double median(std::vector<double> v);
double robust_dispersion(const std::vector<double>& v); // 1.4826 * median |x - median|

struct TestResult {
  double statistic = 0; // D for KS; the standardised T = (A^2 - (k-1)) / sigma for AD
  double p_value = 1;
};

// Kolmogorov's limiting distribution Q(lambda) = 2 sum (-1)^(k-1) exp(-2 k^2 lambda^2).
double kolmogorov_q(double lambda);
// D = max |F1 - F2| over the pooled values; p from Q((sqrt(Ne) + 0.12 + 0.11/sqrt(Ne)) D),
// Ne = n1 n2/(n1 + n2) (Stephens 1970, JRSS B 32, 115; common practice).
TestResult ks_two_sample(const std::vector<double>& a, const std::vector<double>& b);

// A^2_akN of Scholz & Stephens (1987, eq. 7, midranks for ties), its null mean k - 1 and
// variance (eq. 4) and the p-value of T by interpolation of ln(p / (1 - p)) in the
// critical values t(p) = b0 + b1/sqrt(m) + b2/m, m = k - 1 (their Table 1 fit; coefficients
// from memory of the paper). p is clipped to [0.001, 0.25]: reported as 0.25 when larger, and
// as 1 when the samples have identical empirical distributions (A^2 = 0).
double anderson_darling_a2(const std::vector<std::vector<double>>& samples);
double anderson_darling_variance(const std::vector<std::vector<double>>& samples);
TestResult anderson_darling(const std::vector<std::vector<double>>& samples);

} // namespace undertow::compare

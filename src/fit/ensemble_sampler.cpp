#include "undertow/fit/ensemble_sampler.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "undertow/tracers/random.hpp"

namespace undertow::fit {

EnsembleSampler::EnsembleSampler(int ndim, int walkers, std::uint64_t seed, LogProb f,
                                 double stretch, double de_fraction)
    : ndim_(ndim), walkers_(walkers), seed_(seed), f_(std::move(f)), a_(stretch), de_(de_fraction) {
  if (de_fraction > 0 && walkers < 4)
    throw std::invalid_argument("sampler: differential-evolution moves need at least 4 walkers");
  if (!(de_fraction >= 0 && de_fraction <= 1))
    throw std::invalid_argument("sampler: the differential-evolution share must lie in [0, 1]");
  if (ndim < 1) throw std::invalid_argument("sampler: at least one parameter");
  if (walkers < 2 * ndim || walkers % 2)
    throw std::invalid_argument("sampler: an even number of walkers, at least twice the "
                                "number of parameters");
  if (!(stretch > 1)) throw std::invalid_argument("sampler: the stretch scale must exceed 1");
}

void EnsembleSampler::start(const std::vector<double>& pos) {
  if (pos.size() != std::size_t(walkers_ * ndim_))
    throw std::invalid_argument("sampler: walkers x ndim starting values needed");
  x_ = pos;
  lp_.assign(std::size_t(walkers_), 0.0);
#pragma omp parallel for schedule(static)
  for (int w = 0; w < walkers_; ++w)
    lp_[std::size_t(w)] = f_(x_.data() + std::size_t(w * ndim_));
  for (double v : lp_)
    if (!std::isfinite(v))
      throw std::invalid_argument("sampler: a starting position has zero probability");
}

bool EnsembleSampler::run(int steps, const std::atomic<bool>* stop,
                          const std::function<void(long)>& progress) {
  const int half = walkers_ / 2;
  const std::size_t nd = std::size_t(ndim_);
  std::vector<double> y(std::size_t(half) * nd);
  std::vector<double> ly(std::size_t(half), 0.0);
  std::vector<char> acc(std::size_t(half), 0);
  for (int s = 0; s < steps; ++s) {
    if (stop && stop->load()) return false;
    const long step = this->steps();
    for (int h = 0; h < 2; ++h) {
      const int first = h * half, other = (1 - h) * half;
#pragma omp parallel for schedule(static)
      for (int k = 0; k < half; ++k) {
        const int w = first + k;
        tracers::TracerStream rng(
            seed_, std::uint64_t(step) * std::uint64_t(walkers_) + std::uint64_t(w), 0xe45e);
        const double u1 = rng.uniform(), u2 = rng.uniform(), u3 = rng.uniform();
        const double u4 = rng.uniform(), u5 = rng.uniform();
        const double* xw = x_.data() + std::size_t(w) * nd;
        double* yk = y.data() + std::size_t(k) * nd;
        double ln_jacobian = 0;
        if (u4 < de_) {
          // differential evolution: two distinct partners from the other half
          const int j = other + std::min(half - 1, int(u1 * half));
          int i2 = std::min(half - 2, int(u2 * (half - 1)));
          if (other + i2 >= j) ++i2;
          const double gamma = u5 < 0.1 ? 1.0 : 2.38 / std::sqrt(2.0 * ndim_);
          const double* xj = x_.data() + std::size_t(j) * nd;
          const double* xi = x_.data() + std::size_t(other + i2) * nd;
          for (std::size_t d = 0; d < nd; ++d)
            yk[d] = xw[d] + gamma * (xj[d] - xi[d]);
        } else {
          // z from g(z) ∝ 1/sqrt(z) on [1/a, a] by inverse transform (Goodman & Weare eq. 10)
          const double sq = 1 + (a_ - 1) * u1;
          const double z = sq * sq / a_;
          const int j = other + std::min(half - 1, int(u2 * half));
          const double* xj = x_.data() + std::size_t(j) * nd;
          for (std::size_t d = 0; d < nd; ++d)
            yk[d] = xj[d] + z * (xw[d] - xj[d]);
          ln_jacobian = (ndim_ - 1) * std::log(z);
        }
        const double lpy = f_(yk);
        ly[std::size_t(k)] = lpy;
        const double lnq = ln_jacobian + lpy - lp_[std::size_t(w)];
        acc[std::size_t(k)] = std::isfinite(lpy) && std::log(u3) < lnq;
      }
      for (int k = 0; k < half; ++k)
        if (acc[std::size_t(k)]) {
          const int w = first + k;
          std::copy(y.begin() + long(std::size_t(k) * nd),
                    y.begin() + long(std::size_t(k + 1) * nd),
                    x_.begin() + long(std::size_t(w) * nd));
          lp_[std::size_t(w)] = ly[std::size_t(k)];
          ++accepted_;
        }
    }
    chain_.insert(chain_.end(), x_.begin(), x_.end());
    lnp_.insert(lnp_.end(), lp_.begin(), lp_.end());
    if (progress) progress(this->steps());
  }
  return true;
}

} // namespace undertow::fit

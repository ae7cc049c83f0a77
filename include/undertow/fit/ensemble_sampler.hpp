#pragma once
// The affine-invariant ensemble sampler of Goodman & Weare (2010, CAMCoS 5, 65) with the
// stretch move, updating the ensemble in two halves so that the walkers of one half move in
// parallel (OpenMP) against the other half's fixed positions (Foreman-Mackey et al. 2013, PASP
// 125, 306, §3). Each walker's random numbers at each step come from a stream derived from
// (seed, step, walker) alone, so the chain has the same bits for any thread count.
#include <atomic>
#include <cstdint>
#include <functional>
#include <vector>

namespace undertow::fit {

class EnsembleSampler {
public:
  // log_prob(x) must be safe to call from several threads at once; -inf rejects a point.
  using LogProb = std::function<double(const double* x)>;
  // de_fraction: the share of proposals made by the differential-evolution move of ter Braak
  // (2006, Stat. Comput. 16, 239) in its ensemble form (Nelson, Ford & Payne 2014, ApJS 210, 11):
  // y = x + γ (x_j − x_k) with x_j, x_k from the other half, γ = 2.38/sqrt(2 ndim) (and γ = 1
  // one time in ten, to jump between modes); the rest are stretch moves. 0 is Goodman & Weare's
  // sampler as published. Both moves satisfy detailed balance, so any mixture does too.
  EnsembleSampler(int ndim, int walkers, std::uint64_t seed, LogProb log_prob, double stretch = 2.0,
                  double de_fraction = 0.0);

  // Starting positions (walkers × ndim, row-major); every one must have a finite log_prob.
  void start(const std::vector<double>& positions);
  // Advances the ensemble by `steps`, appending to the chain; returns early (false) when *stop
  // becomes true. progress(step) is called after each step from the calling thread.
  bool run(int steps, const std::atomic<bool>* stop = nullptr,
           const std::function<void(long)>& progress = {});

  int ndim() const { return ndim_; }
  int walkers() const { return walkers_; }
  long steps() const { return long(lnp_.size()) / walkers_; }
  // chain(step, walker, k) and ln p(step, walker)
  double chain(long s, int w, int k) const {
    return chain_[(std::size_t(s) * std::size_t(walkers_) + std::size_t(w)) * std::size_t(ndim_) +
                  std::size_t(k)];
  }
  double lnp(long s, int w) const {
    return lnp_[std::size_t(s) * std::size_t(walkers_) + std::size_t(w)];
  }
  const std::vector<double>& chain_data() const { return chain_; }
  const std::vector<double>& lnp_data() const { return lnp_; }
  double acceptance_fraction() const {
    return steps() ? double(accepted_) / double(steps() * walkers_) : 0;
  }

private:
  int ndim_, walkers_;
  std::uint64_t seed_;
  LogProb f_;
  double a_, de_;
  std::vector<double> x_, lp_; // current positions and ln p
  std::vector<double> chain_, lnp_;
  long accepted_ = 0;
};

} // namespace undertow::fit

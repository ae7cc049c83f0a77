#!/usr/bin/python3
"""Reference run of emcee (Foreman-Mackey et al. 2013, PASP 125, 306; Debian's python3-emcee)
for tests/fit/test_sampler.cpp: the affine-invariant stretch move of Goodman & Weare (2010,
CAMCoS 5, 65) with emcee's default scale a = 2, on the posterior of the linear-Gaussian model
y = A x + noise (noise precision beta, prior N(0, I / alpha)):

    ln p(x) = -beta/2 |y - A x|^2 - alpha/2 |x|^2 + const.

Run it with /usr/bin/python3 (Debian's numpy and emcee); the problem comes on the command line
so that it is stated once, in the C++ test. Prints plain numbers, one quantity a line:

    mean m_1 ... m_n                 sample mean after burn-in
    cov c_11 c_12 ... c_nn           sample covariance (row-major)
    tau_mean t_1 ... t_n             emcee's integrated autocorrelation time of each parameter
    tau_cov t_11 ... t_nn            the same for the products (x_i - m_i)(x_j - m_j)
    samples N                        steps kept times walkers
    acceptance f                     accepted share of proposals after burn-in
    tau_acceptance t                 autocorrelation time of the accept indicator
"""
import argparse
import sys

import emcee
import numpy as np


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--walkers", type=int, required=True)
    ap.add_argument("--steps", type=int, required=True, help="steps kept after burn-in")
    ap.add_argument("--burn", type=int, required=True)
    ap.add_argument("--seed", type=int, required=True)
    ap.add_argument("--alpha", type=float, required=True, help="prior precision")
    ap.add_argument("--beta", type=float, required=True, help="noise precision")
    ap.add_argument("--A", type=float, nargs="+", required=True, help="design matrix, row-major")
    ap.add_argument("--y", type=float, nargs="+", required=True, help="data")
    ap.add_argument("--start", type=float, nargs="+", required=True, help="centre of the ball")
    ap.add_argument("--scale", type=float, required=True, help="radius of the starting ball")
    a = ap.parse_args()

    y = np.array(a.y)
    ndim = len(a.start)
    A = np.array(a.A).reshape(len(y), ndim)
    np.random.seed(a.seed)  # emcee 3 copies numpy's global state into its own generator

    def log_prob(x):  # vectorised: x has shape (walkers, ndim)
        r = y[None, :] - x @ A.T
        return -0.5 * a.beta * np.sum(r * r, axis=1) - 0.5 * a.alpha * np.sum(x * x, axis=1)

    p0 = np.array(a.start)[None, :] + a.scale * np.random.randn(a.walkers, ndim)
    s = emcee.EnsembleSampler(a.walkers, ndim, log_prob, vectorize=True,
                              moves=emcee.moves.StretchMove(a=2.0))
    s.run_mcmc(p0, a.burn + a.steps, progress=False)
    full = s.get_chain()  # (steps, walkers, ndim)
    chain = full[a.burn:]
    flat = chain.reshape(-1, ndim)
    mean = flat.mean(axis=0)
    d = chain - mean
    prod = d[:, :, :, None] * d[:, :, None, :]  # (steps, walkers, ndim, ndim)
    cov = prod.reshape(-1, ndim, ndim).mean(axis=0)
    tau_mean = emcee.autocorr.integrated_time(chain, c=5, quiet=True)
    tau_cov = emcee.autocorr.integrated_time(
        prod.reshape(chain.shape[0], a.walkers, ndim * ndim), c=5, quiet=True)
    moved = np.any(full[a.burn:] != full[a.burn - 1:-1], axis=2).astype(float)
    tau_acc = emcee.autocorr.integrated_time(moved[:, :, None], c=5, quiet=True)[0]

    def line(key, values):
        print(key, " ".join(repr(float(v)) for v in np.ravel(values)))

    line("mean", mean)
    line("cov", cov)
    line("tau_mean", tau_mean)
    line("tau_cov", tau_cov)
    line("samples", [flat.shape[0]])
    line("acceptance", [moved.mean()])
    line("tau_acceptance", [tau_acc])
    return 0


if __name__ == "__main__":
    sys.exit(main())

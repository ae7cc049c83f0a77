#pragma once
// One Monte Carlo draw of a source's true distance and true motions given its measurements: the
// distance from its distance posterior p(d | ϖ, prior), then the proper motions from their
// Gaussian errors conditioned on the parallax error that distance implies (e_ϖ = ϖ − ϖ_0 − 1/d;
// the conditional of a multivariate Gaussian, e.g. Bishop 2006, Pattern Recognition and Machine
// Learning, eqs. 2.81–2.82), and v_LSR from its own error. Where the catalog gives no
// parallax–proper-motion correlation this reduces to independent draws.
#include "undertow/fit/distance_posterior.hpp"
#include "undertow/residuals/catalog.hpp"
#include "undertow/tracers/random.hpp"

namespace undertow::fit {

struct TrueDraw {
  double distance_kpc, pmra_masyr, pmdec_masyr, vlsr_kms;
};

// offset_mas: the global parallax zero point (the catalog's per-source offset is added).
TrueDraw draw_true(const residuals::Source& s, const DistancePosterior& post, double offset_mas,
                   tracers::TracerStream& rng);

} // namespace undertow::fit

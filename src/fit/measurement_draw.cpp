#include "undertow/fit/measurement_draw.hpp"

#include <cmath>

namespace undertow::fit {

TrueDraw draw_true(const residuals::Source& s, const DistancePosterior& post, double offset,
                   tracers::TracerStream& rng) {
  TrueDraw t{};
  t.distance_kpc = post.draw(rng.uniform());
  const double sw = s.parallax_err_mas, sa = s.pmra_err_masyr, sd = s.pmdec_err_masyr;
  // conditional mean and covariance of the proper-motion errors given e_w (a distance given
  // instead of a parallax has no correlation with the proper motions: no shift)
  const double ew = s.parallax_mas - s.parallax_offset_mas - offset - 1 / t.distance_kpc;
  const double ma = s.has_distance() ? 0.0 : s.corr_w_pa * sa / sw * ew,
               md = s.has_distance() ? 0.0 : s.corr_w_pd * sd / sw * ew;
  const double caa = sa * sa * (1 - s.corr_w_pa * s.corr_w_pa);
  const double cdd = sd * sd * (1 - s.corr_w_pd * s.corr_w_pd);
  const double cad = sa * sd * (s.corr_pm - s.corr_w_pa * s.corr_w_pd);
  const double l00 = std::sqrt(caa), l10 = cad / l00;
  const double l11 = std::sqrt(std::fmax(0.0, cdd - l10 * l10));
  const double n1 = rng.normal(), n2 = rng.normal(), n3 = rng.normal();
  t.pmra_masyr = s.pmra_masyr - (ma + l00 * n1);
  t.pmdec_masyr = s.pmdec_masyr - (md + l10 * n1 + l11 * n2);
  t.vlsr_kms = s.vlsr_kms - s.vlsr_err_kms * n3;
  return t;
}

} // namespace undertow::fit

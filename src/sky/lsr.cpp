#include "undertow/sky/lsr.hpp"

#include "undertow/units.hpp"

namespace undertow::sky {

double lsr_correction_kms(double ra_deg, double dec_deg, LsrForm form) {
  const double ra = ra_deg * units::deg, dec = dec_deg * units::deg;
  const Vec3 n = unit_vector(ra, dec);
  if (form == LsrForm::apex) {
    const double ra_a = (18 + 3 / 60.0 + 50.29 / 3600.0) * 15 * units::deg;
    const double dec_a = (30 + 0 / 60.0 + 16.8 / 3600.0) * units::deg;
    const Vec3 a = unit_vector(ra_a, dec_a);
    return 20.0 * (a[0] * n[0] + a[1] * n[1] + a[2] * n[2]);
  }
  const Vec3 g = mul(icrs_to_galactic_matrix(), n);
  return 10.3 * g[0] + 15.3 * g[1] + 7.7 * g[2];
}

} // namespace undertow::sky

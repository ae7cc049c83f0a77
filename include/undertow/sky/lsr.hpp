#pragma once
// Radio astronomers' local standard of rest: the Standard Solar Motion, 20 km/s toward
// RA 18h, Dec +30 deg (B1900) (common practice). Two forms:
//  - apex: the exact direction, precessed to J2000 (RA 18h03m50.29s, Dec +30d00m16.8s,
//    common practice; from memory), the form radio observatories apply (the default);
//  - components: (U, V, W) = (10.3, 15.3, 7.7) km/s along the Galactic axes, the rounded
//    form often quoted in papers. The two differ by up to about 0.06 km/s (the rounded
//    components point 0.1 deg away from the apex and sum to 19.98 km/s).
// v_LSR = v_helio + v_ssm . n, with n the unit vector toward the source.
#include <string>

#include "undertow/sky/galactic.hpp"

namespace undertow::sky {

enum class LsrForm { apex, components };

// "apex" or "components"; throws InputError otherwise.
LsrForm lsr_form_from_name(const std::string& name);

double lsr_correction_kms(double ra_deg, double dec_deg, LsrForm form = LsrForm::apex);
inline double helio_to_lsr(double vhelio, double ra, double dec, LsrForm f = LsrForm::apex) {
  return vhelio + lsr_correction_kms(ra, dec, f);
}
inline double lsr_to_helio(double vlsr, double ra, double dec, LsrForm f = LsrForm::apex) {
  return vlsr - lsr_correction_kms(ra, dec, f);
}

} // namespace undertow::sky

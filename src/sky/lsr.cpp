#include "undertow/sky/lsr.hpp"

#include "undertow/error.hpp"
#include "undertow/units.hpp"

namespace undertow::sky {

LsrForm lsr_form_from_name(const std::string& name) {
  if (name == "apex") return LsrForm::apex;
  if (name == "components") return LsrForm::components;
  throw InputError("must be \"apex\" or \"components\"");
}

double lsr_correction_kms(double ra_deg, double dec_deg, LsrForm form) {
  const double ra = ra_deg * units::deg, dec = dec_deg * units::deg;
  const Vec3 n = unit_vector(ra, dec);
  if (form == LsrForm::apex) {
    static const Vec3 a = unit_vector((18 + 3 / 60.0 + 50.29 / 3600.0) * 15 * units::deg,
                                      (30 + 0 / 60.0 + 16.8 / 3600.0) * units::deg);
    return 20.0 * dot(a, n);
  }
  const Vec3 g = mul(icrs_to_galactic_matrix(), n);
  return 10.3 * g[0] + 15.3 * g[1] + 7.7 * g[2];
}

} // namespace undertow::sky

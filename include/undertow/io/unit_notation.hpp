#pragma once
// Our unit strings ("km/s/kpc", "Msun/pc^3", "(km/s)^2") in the FITS standard's notation (Pence
// et al. 2010, A&A 524, A42, §4.3: factors separated by spaces, signed integer powers, "solMass"
// for the Sun's mass): "km s-1 kpc-1", "solMass pc-3", "km2 s-2". FITS readers and astropy's
// ECSV reader parse it alike. It also reads the FITS notation itself and astropy's generic
// format ("km / (kpc s)", "solMass / pc3"), as files from elsewhere spell units.
#include <string>

namespace undertow::io {

// Throws std::invalid_argument for a string it cannot parse or a name that is not a FITS unit
// (a programming error: every unit a table carries is written in the code).
std::string fits_unit(const std::string& unit);
// Whether two unit strings in any of the notations fits_unit reads are the same unit (the same
// powers of the same named units: "mas/yr", "mas yr-1" and "mas / yr" are; "arcsec" and "mas"
// are not). Throws std::invalid_argument like fits_unit.
bool same_unit(const std::string& a, const std::string& b);
// The unit a key or column name of ours states by its suffix (docs/conventions.md): "_kms_kpc"
// "km/s/kpc", "_km2_s2" "(km/s)^2", "_kms" "km/s", ...; empty for a name without one.
std::string unit_of_name(const std::string& name);
// The name without that suffix and the unit: "amplitude_km2_s2" -> {"amplitude", "(km/s)^2"};
// {name, ""} without one.
struct NamedUnit {
  std::string stem, unit;
};
NamedUnit split_unit_suffix(const std::string& name);

} // namespace undertow::io

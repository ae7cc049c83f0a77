#pragma once
// Fit files (TOML, docs/fit.md): the catalog, the rotation-curve form, the distance prior, the
// velocity model, the sampler's settings and, under [parameters], each parameter fixed (a bare
// number, or { fixed = x }) or free with a prior ({ start, min, max } uniform; { start, mean,
// sigma } Gaussian, optionally with min/max as hard limits; { start } alone a flat improper
// prior). Strict like every other file: unknown keys, a parameter the model does not use, a
// negative width or a start outside its bounds stop the reading at the key's line.
#include <string>

#include "undertow/fit/kinematic_fit.hpp"

namespace undertow::fit {

struct FitFile {
  FitSpec spec;
  std::string text; // the file verbatim, for provenance
  // Sources seen within this angle of the Galactic centre's direction are left out: a cut on
  // direction alone, so the distances of the sources kept still follow the prior, and no line of
  // sight passes closer to the centre than R0 sin(angle), where circular rotation is no model.
  double longitude_min_deg = 15;
  std::string model_file; // for the model rotation form
};

FitFile load_fit_file(const std::string& path);
FitFile parse_fit_file(const std::string& text, const std::string& name);

// The value a parameter takes when the fit file does not name it (docs/fit.md).
double default_value(Param p);

} // namespace undertow::fit

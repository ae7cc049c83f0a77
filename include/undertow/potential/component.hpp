#pragma once
// The axisymmetric components a model can hold, by value: dispatch happens once per batch.
#include <string>
#include <variant>

#include "undertow/potential/allen_santillan_halo.hpp"
#include "undertow/potential/burkert.hpp"
#include "undertow/potential/hernquist.hpp"
#include "undertow/potential/isochrone.hpp"
#include "undertow/potential/logarithmic.hpp"
#include "undertow/potential/miyamoto_nagai.hpp"
#include "undertow/potential/nfw.hpp"
#include "undertow/potential/plummer.hpp"
#include "undertow/potential/point_mass.hpp"
#include "undertow/potential/tapered_cusp.hpp"

namespace undertow::potential {

using ComponentShape = std::variant<PointMass, Plummer, Hernquist, Isochrone, MiyamotoNagai, Nfw,
                                    Logarithmic, Burkert, TaperedCusp, AllenSantillanHalo>;

struct Component {
  std::string label; // the user's name for it ("bulge", "disk", ...), unique in a model
  ComponentShape shape;

  const char* kind() const {
    return std::visit([](const auto& c) { return c.kind; }, shape);
  }
  bool vanishes_at_infinity() const {
    return std::visit([](const auto& c) { return c.vanishes_at_infinity; }, shape);
  }
};

} // namespace undertow::potential

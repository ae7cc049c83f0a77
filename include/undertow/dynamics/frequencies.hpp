#pragma once
// Orbital frequencies of the axisymmetric part of a model in its midplane (z = 0), from the
// analytic forces; second derivatives by Richardson-extrapolated central differences of the
// force (Binney & Tremaine 2008, §3.2.3). Radii in kpc, speeds in km/s, frequencies in km/s/kpc.
#include <cstddef>

#include "undertow/potential/model.hpp"

namespace undertow::dynamics {

using potential::Model;

double circular_speed(const Model& m, double R);
// One component's contribution: v_c^2 = sum of the components' v_i^2.
double circular_speed_component(const Model& m, std::size_t i, double R);
double omega(const Model& m, double R);
double kappa(const Model& m, double R); // epicyclic frequency
double nu(const Model& m, double R);    // vertical frequency
double oort_a(const Model& m, double R);
double oort_b(const Model& m, double R);
// d v_c / dR, (km/s)/kpc
double circular_speed_slope(const Model& m, double R);

} // namespace undertow::dynamics

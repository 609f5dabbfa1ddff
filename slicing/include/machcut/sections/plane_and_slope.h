// Small pure helpers the viewer (and anyone) needs on top of the section engine: points on a
// Mach plane and the slope of a sampled area curve.
#pragma once

#include <cstddef>
#include <span>
#include <vector>

#include "machcut/common/geometry.h"
#include "machcut/sections/section.h"

namespace machcut {

// The point of the Mach plane at `station` (m) with in-plane coordinates (u, v) (m, true
// shape): the inverse of plane_coordinates (section.h). u runs along e_u = (β, cos θ, sin θ)/M,
// v along e_v = (0, −sin θ, cos θ); (u, v) = (0, 0) is where the plane meets y = z = 0.
Vec3 plane_point(const MachPlanes& planes, double station, double u, double v);

// dS/dX of a sampled curve (m²/m), one value per station: central differences inside, one-sided
// at the ends (second-order on uneven spacing). x strictly increasing, x.size() == s.size().
// Fewer than 2 stations give zeros. A step in S shows as a spike of height ≈ ΔS/Δx: the slope
// of sampled data, not a smoothed derivative.
std::vector<double> area_slope(std::span<const double> x, std::span<const double> s);

}  // namespace machcut

// Where a model leaves linear theory: the surface that faces the flow more steeply than the
// Mach angle, found per triangle and grouped into features a designer can act on
// (docs/method.md §9.1).
//
// Small-disturbance theory needs surface slopes well inside the Mach angle μ = asin(1/M). A
// face inclined to the flow by δ > μ (|n_x| > 1/M for its unit normal n) — a blunt nose, a
// flat intake face, a box fin's square leading edge, a coarse facet — makes the Mach-plane area
// curve rise within a short distance (where a face is tangent to the Mach cone, δ = μ, within
// none), and the drag of that curve is then a property of the tessellation and of the cell
// size rather than of the aircraft. At M = 1 (μ = 90°) the limit is capped: faces inclined by
// more than 60° to the flow count (the Mach angle of M = 2/√3), this project's choice.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "machcut/common/mesh.h"

namespace machcut {

struct ValidityFeature {
  std::string part;            // the shell it lies on (its name in the parts mesh when given)
  double x_from = 0.0;         // m: station range of its triangles along the flow (model x)
  double x_to = 0.0;           // m
  double frontal_area = 0.0;   // m²: its triangles' areas projected on the y–z plane, summed
  double drag_share = 0.0;     // fraction of D/q from the slope-grid cells its Mach-plane
                               // station range covers, roll-averaged (wave_drag.h); NaN when
                               // the Mach number has no D/q
  double growth = 0.0;         // m²: the same cells' part of growth_per_halving (D(h) − D(2h))
  double steepest_deg = 0.0;   // largest inclination of its faces to the flow, degrees
  double mean_deg = 0.0;       // asin(frontal area / surface area): its mean inclination; near
                               // 90° for a flat face across the flow, degrees
  bool faces_upstream = true;  // most of its frontal area faces upstream (n_x < 0)
  std::vector<std::uint32_t> triangles;  // indices into the analysed mesh (for painting)
};

// The inclination (degrees) above which a face counts as steeper than the Mach angle at
// `mach` >= 1: min(asin(1/M), 60°).
double steep_limit_deg(double mach);

// Which part each triangle of `mesh` lies on, as indices into `parts.shell_names`: for a
// united mesh whose shells are unions ("A + B"), the part whose surface passes through the
// triangle's centroid (nearest triangle of `parts`). `parts` empty: the mesh's own shells.
std::vector<std::uint32_t> triangle_parts(const Mesh& mesh, const Mesh& parts);

// The connected groups of triangles of `mesh` steeper than steep_limit_deg(mach), per part
// (`part_of[t]` indexes `part_names`), groups of one part facing the same way (up- or
// downstream) whose x ranges overlap merged; the
// triangles with skip[t] (faces closed by a wake or a capture tube) left out. Shares and
// growth 0; features sorted by frontal area, largest first.
std::vector<ValidityFeature> steep_features(const Mesh& mesh, double mach,
                                            const std::vector<std::uint32_t>& part_of,
                                            const std::vector<std::string>& part_names,
                                            const std::vector<bool>& skip);

// One sentence a designer acts on, about the feature with the largest share of D/q (or, with
// no D/q, the largest flat face across the flow, else the largest frontal area): which part, where,
// how much of D/q and what to do — model an intake as flow-through, fair the shape, or expect a
// blunt-body drag that linear theory does not give. Empty when there are no features.
std::string validity_advice(const std::vector<ValidityFeature>& features, double mach,
                            bool resolution_limited);

}  // namespace machcut

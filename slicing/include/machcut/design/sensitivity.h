// Surface sensitivity of the zero-lift wave drag: for every vertex of the analysis mesh, the
// change of the roll-averaged D/q at one Mach number per unit volume added there by an outward
// normal displacement, in 1/m (docs/method.md §8.7).
//
// Why: by the area rule a small volume δV added at a surface point p raises each roll's
// Mach-plane area curve S_θ by δV·δ(X − X_θ(p)), X_θ(p) the station of p's Mach plane. The first
// variation of von Kármán's integral (von Kármán & Moore 1932) is then
//     δ(D_θ/q) = δV g_θ(X_θ(p)),  g_θ(X) = −(1/π) d²/dX² ∫ S_θ″(ξ) ln|X − ξ| dξ,
// and the roll average (Jones 1956) gives ∂(D/q)/∂V = (1/2π)∮ g_θ(X_θ(p)) dθ. g_θ is computed on
// the drag's own slope grids (slope_grid.h: drag_gradient), the ends closed as the drag closes
// them (wakes, capture tubes). For a displacement δn_v of each vertex v along its normal,
//     δ(D/q) ≈ Σ_v s_v δn_v A_v,
// s_v the value here and A_v the vertex's area share (a third of its triangles' areas).
#pragma once

#include <string>
#include <vector>

#include "machcut/common/mesh.h"
#include "machcut/drag/roll_integral.h"
#include "machcut/drag/wave_drag.h"

namespace machcut {

struct SensitivityOptions {
  int cells = 4096;  // slope-grid cells per roll over the station range (a power of two >= 64)
  int rolls = 64;    // roll angles over the whole turn above M = 1 (midpoints of equal
                     // intervals; a multiple of 4); mirror images are computed once
  bool use_symmetry = true;  // false: every roll's grid computed (a check of the mirror mapping)
};

// The result: plain arrays aligned with the vertices of the mesh passed in; from
// Study::sensitivity, those of Study::engine().mesh() — the analysis mesh with its vertices
// renumbered in order of first use by the SectionEngine, NOT PreparedModel::analysis's own
// numbering (the two agree only when every vertex is used in order).
struct SurfaceSensitivity {
  double mach = 1.0;
  std::vector<double> per_volume;  // s_v: ∂(D/q)/∂V at each vertex, 1/m (0 for an unused vertex)
  std::vector<double> vertex_area;  // A_v: a third of the areas of the vertex's triangles, m²
  std::vector<Vec3> normal;         // unit outward vertex normal (area-weighted), {0,0,0} if none
  double drag_area = 0.0;           // roll-averaged D/q on the same grids and rolls, m²
  int rolls = 1;                    // roll angles averaged (1 at M = 1)
  int grids = 1;                    // slope grids computed (fewer with mirror symmetry)
  int cells = 0;                    // cells per roll
  RollSymmetry symmetry = RollSymmetry::none;
  std::string how;  // one line
};

// The sensitivity of `model`'s D/q at `mach` (1 … 20) on the vertices of `mesh`, the mesh the
// model's engine analyses. Per roll θ_i = −90° + 360°(i + ½)/rolls (one roll at M = 1) the
// slope grid over the model's station range (1/64 of the length beyond each end, as the drag)
// gives g_θ at its nodes (linear in between); each vertex's value is the hat-weighted mean of
// g_θ over its triangles, each triangle sampled at the centroids of k² sub-triangles, k its
// station extent in cells (1 … 12), weighted by n_v · n_T (the normal share of a displacement
// along the vertex normal). Throws UnusableModel when the model's D/q comes from sampled areas
// (a capture given as an area) or a face lies in a Mach plane with nothing to close it (no
// finite drag, hence no derivative).
SurfaceSensitivity surface_sensitivity(const WaveDragModel& model, const Mesh& mesh, double mach,
                                       const SensitivityOptions& options = {});

// Σ_v s_v δn_v A_v: the predicted change of D/q (m²) for normal displacements `dn` (m, one per
// vertex, outward positive).
double predicted_drag_change(const SurfaceSensitivity& s, const std::vector<double>& dn);

}  // namespace machcut

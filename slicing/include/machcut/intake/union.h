// Overlapping shells: which shells cross or contain each other, and their union.
// Implemented with CGAL Polygon_mesh_processing in union_cgal.cpp, and the self-intersection
// test with CGAL's box intersection and predicates in self_intersect_cgal.cpp (the only CGAL
// translation units for this); the interface is plain data.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "machcut/intake/health.h"
#include "machcut/common/mesh.h"

namespace machcut {

struct OverlapReport {
  std::vector<ShellPair> intersecting;            // surfaces cross or touch (PMP::do_intersect)
  std::vector<ShellPair> contained;               // a inside b (side_of_triangle_mesh)
  std::size_t pairs_tested = 0;                   // pairs whose bounding boxes overlap
  std::size_t pairs_total = 0;                    // all pairs
  std::vector<std::uint32_t> untested;            // shells CGAL cannot hold (non-manifold)
};

// Tests every pair of shells whose bounding boxes overlap (others cannot meet). `closed[s]`
// says whether shell s is closed (health.h); containment is only tested between closed shells.
// Open shells are tested for surface intersection only. O(F log F) per tested pair.
OverlapReport find_overlaps(const Mesh& mesh, const std::vector<bool>& closed);

struct UnionResult {
  Mesh mesh;                                      // untouched shells + one shell per united group
  std::vector<std::vector<std::uint32_t>> groups; // groups of ≥ 2 input shells that were united
  std::vector<std::string> refused;               // one line per group that could not be united
  std::vector<std::uint32_t> self_intersecting;   // input shells found self-intersecting
  double seconds = 0.0;                           // wall time spent in the union
  std::size_t triangles_in = 0;                   // triangles of the shells that were united
};

// Unites each group of shells connected by `overlaps` (intersecting or contained pairs) with
// PMP::corefine_and_compute_union; shells in no overlap are copied unchanged. A group is left
// as it is (and named in `refused` with the reason) when one of its shells is open,
// self-intersecting or has degenerate triangles, or when CGAL cannot produce a closed manifold result. United shells are
// named "A + B + …". `closed` as for find_overlaps.
UnionResult unite_overlapping(const Mesh& mesh, const std::vector<bool>& closed,
                              const OverlapReport& overlaps);

// The closed shells (closed[s]) whose surfaces intersect themselves, by the rules of
// PMP::does_self_intersect (a degenerate triangle counts) but on the triangle arrays, without a
// CGAL surface mesh (self_intersect_cgal.cpp: memory). The closed shells that are not a
// manifold surface (a vertex used twice by a triangle, an edge used twice in one direction, or
// a vertex where sheets meet at a point) go into `not_manifold` when it is given and are not
// tested for self-intersection.
std::vector<std::uint32_t> self_intersecting_shells(const Mesh& mesh, const std::vector<bool>& closed,
                                                    std::vector<std::uint32_t>* not_manifold = nullptr);

// CGAL's 3D alpha wrapping (Portaneri, Rouxel-Labbé, Hemmer, Cohen-Steiner, Alliez, "Alpha
// Wrapping with an Offset", ACM Trans. Graph. 41(4), 2022) of shell `shell`'s triangles: a
// closed, 2-manifold surface without self-intersections that encloses them at distance
// `offset` (m), concavities narrower than `alpha` (m) filled. The result is one shell, outward.
// Empty when the wrap fails.
Mesh alpha_wrap_shell(const Mesh& mesh, std::uint32_t shell, double alpha, double offset);

}  // namespace machcut

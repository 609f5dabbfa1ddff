// Reshaping named parts of a model to lower its roll-averaged wave drag at a design Mach number
// (docs/method.md §8.8).
//
// Why this way: D/q of each roll is a quadratic form in the slope steps of its area curve
// (slope_grid.h), and the steps change linearly with small normal displacements of the surface.
// A displacement field δn(x) = Σ_k c_k sin(kπu), u the station along the part's length, moved
// along the vertex normals, keeps the mesh's topology, leaves the part's ends in place and is
// smooth; the drag is then a quadratic in the coefficients c, minimised exactly under linear
// equality constraints (the part's volume, the kept stations' areas, the area limits found
// active). The step is limited (a trust region), applied, the model re-analysed (union, end
// treatment, drag) and the process repeated: a sequential quadratic programme (common
// practice).
#pragma once

#include <functional>
#include <string>
#include <vector>

#include "machcut/common/mesh.h"
#include "machcut/study/study.h"

namespace machcut {

struct ReshapeRequest {
  double mach = 1.0;               // design Mach number (1 … 20)
  std::vector<std::string> parts;  // a file name (every shell of that file) or a shell "FILE#k"
  std::vector<std::string> keep;   // "X" (keep the model's M = 1 area at station X, m) or "X:AREA"
  double min_area = 0.0;           // m²: the model's M = 1 area over the parts' stations does not
                                   // fall below this where it reaches it (0: no limit)
  double max_area = 0.0;           // m²: … at or below this (0: no limit)
  bool keep_volume = true;         // keep the parts' volume (false: free)
  int modes = 64;                  // sine modes of δn along each part
  int iterations = 8;              // most re-analyses
  int rolls = 32;                  // roll angles of the quadratic model above M = 1
  int cells = 4096;                // slope-grid cells per roll of the quadratic model
  std::function<void(double)> progress;  // fraction done; may be empty
};

struct ReshapeResult {
  Mesh mesh;                          // the model's shells as in the files (model axes, m), the
                                      // parts' vertices moved
  std::vector<std::uint32_t> shells;  // the shells moved
  double drag_before = 0.0;           // D/q at the design Mach, m² (Study::drag_at, defaults)
  double drag_after = 0.0;            // m², on the reshaped model
  double volume_before = 0.0;         // the parts' volume, m³
  double volume_after = 0.0;          // m³
  double max_displacement = 0.0;      // largest vertex move, m
  int iterations = 0;                 // steps accepted
  bool self_intersecting = false;     // the reshaped parts intersect themselves (CGAL check)
  std::vector<std::string> notes;     // one line per iteration
  std::vector<std::string> unmet;     // constraints that could not be met, one line each
};

// Reshapes `request.parts` of `study`'s model. InputError naming the option for an unknown part,
// a bad --keep, a Mach number out of range; UnusableModel when the model has no drag.
ReshapeResult reshape(const Study& study, const ReshapeRequest& request);

// The shells of `mesh` named by `parts` (as ReshapeRequest::parts). InputError naming --part.
std::vector<std::uint32_t> part_shells(const Mesh& mesh, const std::vector<std::string>& parts);

}  // namespace machcut

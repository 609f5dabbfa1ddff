// From files to an analysable model: import, health check, orientation fix, hole closing and
// the union of overlapping closed shells — the one call the CLI and the viewer make.
#pragma once

#include <functional>
#include <span>
#include <string>
#include <vector>

#include "machcut/intake/health.h"
#include "machcut/intake/import.h"
#include "machcut/common/mesh.h"
#include "machcut/sections/section.h"

namespace machcut {

struct ModelSetup {
  ImportOptions import;
  bool unite = true;  // unite overlapping closed shells (false: plain sum, like --sum)
  bool strict = false;     // refuse a shell that needs wrapping instead of wrapping it
  double wrap_alpha = 0.0;   // alpha of the alpha wrap, m (0: 1/100 of the box diagonal of what
                             // is wrapped, at least 1/200 of the model's)
  double wrap_offset = 0.0;  // offset of the alpha wrap, m (0: alpha/10)
  // Parts left out (--skip) and the only parts used (--only; empty: all), each a selector
  // as mesh.h's shell_selected takes: a shell, a part ("FILE:PART" or "PART") or a file.
  std::vector<std::string> skip;
  std::vector<std::string> only;
  bool use_cache = false;  // read and write the prepared-model cache (model_cache.h)
  std::string cache_dir;   // empty: the default cache folder
  std::function<void(const std::string& stage, double fraction)> progress;  // may be empty
};

// A gap in an open mesh, closed by a fan for the analysis; it bounds the area error.
struct Hole {
  std::vector<std::uint32_t> loop;  // boundary vertex loop (indices into PreparedModel::mesh)
  double projected_area = 0.0;      // area of the closing patch projected on the y-z plane, m²
  std::uint32_t shell = 0;
};

// A shell whose surface could not be used as it was (it intersects itself, or has
// non-manifold edges, or is non-orientable) and was replaced by its alpha wrap
// (union.h: alpha_wrap_shell): closed, manifold, free of self-intersections, slightly larger.
struct WrappedShell {
  std::uint32_t shell = 0;
  std::string why;              // what was wrong with it
  double alpha = 0.0, offset = 0.0;  // m
  double volume_before = 0.0, volume_after = 0.0;  // m³ (before: signed, as the mesh was)
  double area_bound = 0.0;      // largest change of its own normal-cut area, m² (201
                                // stations): the error bound at the stations it spans
};

// A shell left out of the analysis: not selected (--skip/--only), flat (no volume to cut),
// or one whose alpha wrap failed. Its triangles are kept in PreparedModel::set_aside.
struct LeftOut {
  std::string name;        // the shell's name (import.h)
  std::string why;         // "flat part (all its vertices lie in one plane)", "--skip", ...
  std::size_t triangles = 0;
};

struct PreparedModel {
  std::vector<std::string> files;
  Mesh mesh;          // as imported; orientation fixed, holes closed; shells as in the files
  Mesh analysis;      // what areas are computed on: overlapping closed shells united (or = mesh)
  HealthReport health;
  std::vector<Hole> holes;            // empty when every shell was closed
  std::vector<WrappedShell> wraps;    // shells replaced by their alpha wrap
  std::vector<LeftOut> left_out;      // shells not analysed, with the reason
  Mesh set_aside;                     // their triangles (shell names as in left_out), for display
  std::vector<std::string> notes;     // e.g. the axis mapping, "3 shells united in 0.8 s"
  std::vector<std::string> warnings;  // one line each, naming the file
  bool usable = false;                // false: `reason` says why no analysis is possible
  std::string reason;
  bool united = false;                // true when `analysis` is a union of overlapping shells
};

// The triage of docs/method.md §2.4, shell by shell: parts not selected and flat parts are
// left out (left_out); exact duplicate triangles are removed (a back-to-back pair both); the
// orientation is made consistent and outward; holes whose boundary is a set of simple loops
// are closed by fans with their projected area as error bound; a shell that is open in any
// other way (boundary edges meeting at a vertex, holes over kMaxHoleAreaFraction of its own
// largest section), non-manifold, non-orientable or self-intersecting is replaced by its alpha
// wrap with the change of its areas as error bound (setup.strict: refused instead); overlapping
// closed shells are united. Throws InputError for unreadable files (see import.h) and for a
// --skip/--only selector that names no shell. A model that reads but cannot be analysed (no
// usable shell remains) comes back with usable = false and a reason (never an exception).
PreparedModel prepare_model(const std::vector<std::string>& files, const ModelSetup& setup);

// Upper bound of the area error per station caused by closed holes and by wrapped shells (0
// where the planes cut neither), m². No holes and no wraps give all zeros.
std::vector<double> hole_error_bounds(const PreparedModel& model, const MachPlanes& planes,
                                      std::span<const double> stations);

}  // namespace machcut

// Mesh import: files → one welded Mesh in SI units and model axes.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "machcut/mesh.h"

namespace machcut {

enum class LengthUnit { m, mm, cm, in, ft };

std::optional<LengthUnit> parse_length_unit(std::string_view name);  // "m", "mm", ...
double metres_per_unit(LengthUnit unit);                              // exact factors
const char* unit_name(LengthUnit unit);

// A signed model axis: "+x", "-y", ... (file axes).
struct SignedAxis {
  int axis = 0;   // 0 = x, 1 = y, 2 = z
  int sign = 1;   // +1 or −1
};
std::optional<SignedAxis> parse_axis(std::string_view text);

// Which file axes become the flow (model +x, nose to tail) and up (model +z) directions;
// model +y (starboard) completes a right-handed frame. flow and up must be different axes.
struct AxisMapping {
  SignedAxis flow{0, 1};
  SignedAxis up{2, 1};
};
// "model x = +file x, model y = +file y, model z = +file z" — for printing.
std::string describe(const AxisMapping& mapping);

struct ImportOptions {
  LengthUnit unit = LengthUnit::m;
  AxisMapping axes;
  // Files larger than this are refused before reading (bytes). Default 2 GiB: a 1M-triangle
  // binary STL is 50 MB, so this admits ~40M triangles while bounding memory (~3 GB peak).
  std::uint64_t max_file_bytes = 2ull << 30;
};

struct ImportReport {
  std::vector<std::string> warnings;  // one line each, already naming the file
  std::size_t input_triangles = 0;    // as read, before welding and cleaning
  std::size_t input_corners = 0;      // vertices as read (3 per STL face)
};

// Reads every file (STL ASCII/binary, OBJ, PLY, OFF, glTF/GLB through Assimp), converts units,
// maps axes, welds coincident vertices (bitwise-equal coordinates after conversion) and splits
// the triangles into shells (edge-connected components), named "FILE#k".
// Throws InputError naming the file for: missing/unreadable file, unknown extension, empty or
// truncated file, wrong triangle counts, NaN/infinite coordinates, bad indices, no triangles,
// size over the limit.
Mesh import_meshes(const std::vector<std::string>& paths, const ImportOptions& options,
                   ImportReport* report = nullptr);

// Welds vertices with bitwise-identical coordinates (after −0 → +0) of a triangle soup given as
// 3 corners per triangle; drops triangles whose corners weld together. Pure function.
Mesh weld_soup(const std::vector<Vec3>& corners);

// Shell id per triangle: edge-connected components (triangles sharing an edge, either
// orientation). Returns the number of shells in `count`.
std::vector<std::uint32_t> edge_connected_shells(const Mesh& mesh, std::uint32_t* count);

}  // namespace machcut

// Mesh import: files → one welded Mesh in SI units and model axes.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "machcut/common/mesh.h"

namespace machcut {

enum class LengthUnit { m, mm, cm, in, ft };

// "m", "mm", "cm", "in", "ft" (exactly these, lower case); nullopt for anything else.
std::optional<LengthUnit> parse_length_unit(std::string_view name);

// Metres per unit, exact by definition: mm 0.001, cm 0.01, in 0.0254, ft 0.3048 (the
// international yard and pound, 1959; NIST SP 811, 2008, appendix B). The double nearest each.
double metres_per_unit(LengthUnit unit);

// The short name parse_length_unit accepts: "m", "mm", "cm", "in", "ft".
const char* unit_name(LengthUnit unit);

// Plausibility of the model's size (common practice: aircraft are ~1–100 m long — the
// largest flying ~84 m long and ~117 m in span; wind-tunnel models ~0.1–3 m). A longest
// bounding-box extent (m, after conversion from `unit`) outside [0.05 m, 200 m] returns one
// line such as "longest extent 15240 m looks like millimetres (15.2 m); use --units mm",
// naming the unit that brings it closest to 10 m (log scale) within the range; "" when the
// size is plausible. extent <= 0 or not finite: "" (flat or empty models are the health
// check's business).
std::string unit_warning(double longest_extent_m, LengthUnit unit);

// A signed model axis: "+x", "-y", ... (file axes).
struct SignedAxis {
  int axis = 0;   // 0 = x, 1 = y, 2 = z
  int sign = 1;   // +1 or −1
};
// "+x", "-y", "z" (sign optional, '+' assumed), letters in either case; nullopt otherwise.
std::optional<SignedAxis> parse_axis(std::string_view text);

// Which file axes become the flow (model +x, nose to tail) and up (model +z) directions;
// model +y (starboard) completes a right-handed frame. flow and up must be different axes.
struct AxisMapping {
  SignedAxis flow{0, 1};
  SignedAxis up{2, 1};
};
// "model x = +file x, model y = +file y, model z = +file z" — for printing.
// Requires a valid mapping (check_axes).
std::string describe(const AxisMapping& mapping);

// Throws InputError (source "axes") when flow and up use the same file axis or an axis/sign
// is out of range.
void check_axes(const AxisMapping& mapping);

// The model axis made from flow and up: y = z × x (right-handed), as a signed file axis.
SignedAxis model_y_axis(const AxisMapping& mapping);

// A point in file axes → model axes (same length unit). A proper rotation (det +1): each
// model coordinate is ± one file coordinate, so it is exact and volumes keep their sign.
// Requires a valid mapping (check_axes).
Vec3 apply_axes(const AxisMapping& mapping, Vec3 file_point);

struct ImportOptions {
  LengthUnit unit = LengthUnit::m;
  AxisMapping axes;
  // Files larger than this are refused before reading (bytes). Default 2 GiB: a 1M-triangle
  // binary STL is 50 MB, so this admits ~43M binary-STL triangles. Memory: binary STL ~85 bytes
  // per triangle (measured: 85 MB peak RSS for 1M); formats read by Assimp ~4× that.
  std::uint64_t max_file_bytes = 2ull << 30;
  // Binary STL through machcut's own reader (true) or through Assimp like every other format
  // (false: slower, for comparison in tests and benchmarks). Same result either way.
  bool fast_binary_stl = true;
  // Every file Assimp reads (all but binary STL with fast_binary_stl) is parsed in a child
  // process with limits on memory and time, so that a reader crash, abort, hang or runaway
  // allocation becomes an InputError ("FILE: the PLY reader failed (signal 11, SIGSEGV)")
  // instead of taking this process down. false: parse in this process (for fuzzers and
  // debuggers, which must see the crash themselves). The child's limits follow from the file
  // size: 4 GiB + 16 × size of address space beyond what this process has, 30 s + 1 s per MB of
  // processor time, 3× that + 10 s of wall-clock time. Does not change what a readable file
  // gives, so the prepared-model cache key does not include it.
  bool isolate_reader = true;
};

struct ImportReport {
  std::vector<std::string> warnings;  // one line each, already naming the file
  std::size_t input_triangles = 0;    // as read, before welding and cleaning
  std::size_t input_corners = 0;      // vertices as read (3 per STL face)
  std::size_t degenerate_triangles = 0;  // dropped: two or three corners welded together
};

// Reads every file (STL ASCII/binary, OBJ, PLY, OFF, glTF/GLB through Assimp; binary STL
// directly, see fast_binary_stl), converts units to metres, maps axes, welds coincident
// vertices (bitwise-equal coordinates after conversion, per file: files are never welded to
// each other) and splits the triangles into shells (edge-connected components). Shells are
// named by the parts the file gives — OBJ objects and groups, glTF/COLLADA/X3D nodes and
// meshes (a node's name, else its mesh's, else the nearest named ancestor's), ASCII STL
// solids — as "FILE:PART" (FILE the basename), "FILE:PART#k" when the part holds several
// shells (k = 1, 2, ... in order of first triangle), "FILE:A+B" for a shell whose triangles
// the file puts in several parts; a file with one part only (or none named) gives "FILE" and
// "FILE#k". Polygons are triangulated (Assimp); points and lines are ignored with a count in
// the warnings (also the one- and two-vertex facets of an ASCII STL, read without them);
// glTF node transforms are applied. The result's triangles keep the files' orientation.
// Warnings (degenerate triangles dropped, implausible size for the unit) go to `report`.
// Throws InputError naming the file for: missing file, directory, unreadable file, unknown
// extension, empty file, size over max_file_bytes (checked before reading), truncated binary
// STL, binary STL header count larger than the file, PLY/OFF files that break their format
// (header grammar, declared counts larger than the file, list counts, number syntax such as a
// decimal comma, coordinates beyond single precision, faces without corners), NaN/infinite
// coordinates, out-of-range indices, text that is no mesh, no triangles (also when every
// triangle is degenerate), a reader that crashed, ran out of memory or took too long (see
// isolate_reader); and for an invalid axis mapping (source "axes").
Mesh import_meshes(const std::vector<std::string>& paths, const ImportOptions& options,
                   ImportReport* report = nullptr);

// Welds vertices with bitwise-identical coordinates (after −0 → +0) of a triangle soup given as
// 3 corners per triangle (corners.size() a multiple of 3, < 2³² corners; units unchanged);
// drops triangles whose corners weld together (count them as corners.size()/3 −
// result.triangles.size()). Nearly equal coordinates are not welded: no tolerance is guessed.
// Vertices are numbered in order of first use; triangles keep their order and orientation.
// Result: one shell (all shell ids 0, shell_names {""}); see edge_connected_shells.
// Expected O(n) time (hash table), memory ~ the welded vertex count. Pure function.
Mesh weld_soup(const std::vector<Vec3>& corners);

// Shell id per triangle (#F entries): edge-connected components — triangles sharing an edge
// (the same two vertex indices, either orientation) are in one shell; triangles meeting only
// at a vertex are not. Shells are numbered 0, 1, ... in order of their first triangle. Stores
// the number of shells in `*count` when count is not null. Uses the mesh's vertex indices only
// (weld first). O(F log d) with d the largest vertex degree; union–find (Tarjan & van
// Leeuwen, J. ACM 31(2), 1984).
std::vector<std::uint32_t> edge_connected_shells(const Mesh& mesh, std::uint32_t* count);

}  // namespace machcut

// Private to the core: the file checks and the direct binary-STL reader behind import_meshes.
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "machcut/common/mesh.h"

namespace machcut::detail {

enum class StlKind { ascii, binary };

// Decides how an .stl file of `size` bytes is stored, from its first bytes, and refuses a
// binary file whose size does not match its header: size must be 84 + 50·count exactly.
// A file is ASCII only when it starts with "solid" and its first 512 bytes are plain text
// (a binary header may also start with "solid"; Assimp 5.2 then reads it as ASCII and finds
// zero triangles — measured here). Throws InputError naming `path`.
StlKind classify_stl(const std::string& path, std::uint64_t size);

// Calls `triangle` with the 3 corners (file units, file axes, float → double) of each record
// of a binary STL already accepted by classify_stl, in file order. Streams in 3.2 MB chunks:
// no soup is held. Throws InputError on read failure or a NaN/infinite coordinate.
void read_binary_stl(const std::string& path, std::uint64_t size,
                     const std::function<void(const Vec3* corners)>& triangle);

// Incremental weld (the engine of weld_soup): triangles go in one at a time, vertices with
// bitwise-equal coordinates (after −0 → +0) are shared, triangles whose corners weld together
// are dropped and counted. The hash table starts at a size for `expected_triangles` of a
// closed mesh (V ≈ F/2) and doubles when half full, so memory follows the welded vertex count,
// not the corner count.
class Welder {
 public:
  explicit Welder(std::size_t expected_triangles);
  void add(Vec3 a, Vec3 b, Vec3 c);
  std::size_t added() const { return added_; }
  std::size_t dropped() const { return added_ - mesh_.triangles.size(); }
  // The welded mesh, one shell named "" (all shell ids 0). Leaves the Welder empty.
  Mesh take();

 private:
  std::uint32_t find_or_add(Vec3 p);
  void grow();
  std::vector<std::uint64_t> slots_;  // upper 32 bits: hash tag; lower 32: vertex id
  std::size_t mask_ = 0;
  Mesh mesh_;
  std::size_t added_ = 0;
};

// Refuses PLY and OFF files whose declared element counts need more bytes than the file
// holds (Assimp 5.2 allocates from the header: a forged count is a memory blow-up or, for
// OFF, a hang — measured here), and OFF faces that index past the vertex list (Assimp 5.2
// silently clamps them). Other extensions: no-op. Throws InputError naming `path`.
void check_declared_counts(const std::string& path, const std::string& ext, std::uint64_t size);

}  // namespace machcut::detail

// Writing a triangle mesh in one of the formats machcut reads, as bytes (the caller writes them
// with write_output, the one atomic writer).
#pragma once

#include <string>

#include "machcut/common/mesh.h"

namespace machcut {

struct MeshExportOptions {
  // PLY and STL: binary instead of ASCII (other formats have one kind, or are chosen by the
  // extension: .gltf is text with its buffer embedded as a data URI, .glb is binary).
  bool binary = false;
  // AMF only: the value of the `unit` attribute ("millimeter", "inch", "feet", "meter",
  // "micron"); empty: no attribute (AMF then means millimetres).
  std::string amf_unit;
};

// `mesh` (all its triangles as one mesh, positions as they are: the caller converts them to
// the file's axes and unit) in the format of `extension` (".stl", ".obj", ".ply", ".off",
// ".gltf", ".glb", ".dae", ".amf", ".x3d"; any case), its mesh/solid/object named `name`.
// STL (ASCII) and OBJ: machcut's own writers (15 significant digits); OFF and AMF: written
// here (15 digits); binary STL, PLY, glTF/GLB, COLLADA and X3D: Assimp's exporters, which store
// single-precision floats (a relative rounding of 6e-8). Throws InputError(name, …) for another
// extension or when Assimp fails to export.
std::string export_mesh(const Mesh& mesh, const std::string& extension, const std::string& name,
                        const MeshExportOptions& options = {});

}  // namespace machcut

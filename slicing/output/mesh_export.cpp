// Mesh export: machcut's STL/OBJ writers, small OFF and AMF writers, Assimp's exporters for the
// rest (mesh_export.h).
#include "machcut/output/mesh_export.h"

#include <assimp/scene.h>
#include <assimp/Exporter.hpp>
#include <nlohmann/json.hpp>

#include <algorithm>
#include <cctype>
#include <memory>
#include <sstream>

#include "machcut/common/errors.h"
#include "machcut/design/equivalent_body.h"
#include "machcut/output/writers.h"

namespace machcut {

namespace {

// One mesh under one root node with one (default) material: the least scene every exporter
// accepts. Positions are stored as Assimp's single-precision floats.
std::unique_ptr<aiScene> scene_of(const Mesh& mesh, const std::string& name) {
  auto scene = std::make_unique<aiScene>();
  scene->mRootNode = new aiNode(name);
  scene->mRootNode->mMeshes = new unsigned[1]{0};
  scene->mRootNode->mNumMeshes = 1;
  scene->mMaterials = new aiMaterial* [1] { new aiMaterial() };
  scene->mNumMaterials = 1;
  auto* m = new aiMesh();
  scene->mMeshes = new aiMesh* [1] { m };
  scene->mNumMeshes = 1;
  m->mName = aiString(name);
  m->mMaterialIndex = 0;
  m->mPrimitiveTypes = aiPrimitiveType_TRIANGLE;
  m->mNumVertices = static_cast<unsigned>(mesh.positions.size());
  m->mVertices = new aiVector3D[mesh.positions.size()];
  for (std::size_t i = 0; i < mesh.positions.size(); ++i) {
    const Vec3 p = mesh.positions[i];
    m->mVertices[i] =
        aiVector3D(static_cast<ai_real>(p.x), static_cast<ai_real>(p.y), static_cast<ai_real>(p.z));
  }
  m->mNumFaces = static_cast<unsigned>(mesh.triangles.size());
  m->mFaces = new aiFace[mesh.triangles.size()];
  for (std::size_t i = 0; i < mesh.triangles.size(); ++i) {
    aiFace& f = m->mFaces[i];
    f.mNumIndices = 3;
    f.mIndices = new unsigned[3]{mesh.triangles[i][0], mesh.triangles[i][1], mesh.triangles[i][2]};
  }
  return scene;
}

std::string base64(const std::string& bytes) {
  static constexpr char kDigits[] =
      "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
  std::string out;
  out.reserve((bytes.size() + 2) / 3 * 4);
  for (std::size_t i = 0; i < bytes.size(); i += 3) {
    const std::size_t n = std::min<std::size_t>(3, bytes.size() - i);
    std::uint32_t v = 0;
    for (std::size_t k = 0; k < 3; ++k)
      v = (v << 8) | (k < n ? static_cast<unsigned char>(bytes[i + k]) : 0u);
    for (std::size_t k = 0; k < 4; ++k) out += k <= n ? kDigits[(v >> (18 - 6 * k)) & 63] : '=';
  }
  return out;
}

// Assimp's exporter `format_id` ("plyb", "gltf2", …) applied to the mesh: the main file's bytes
// and, for a text glTF, its buffer (the blob Assimp names for a separate .bin file) embedded as a
// data URI so that the result is one file.
std::string assimp_export(const Mesh& mesh, const std::string& format_id, const std::string& name) {
  const std::unique_ptr<aiScene> scene = scene_of(mesh, name);
  Assimp::Exporter exporter;
  const aiExportDataBlob* blob = exporter.ExportToBlob(scene.get(), format_id.c_str());
  if (!blob)
    throw InputError(name, "cannot write it as " + format_id + ": " + exporter.GetErrorString());
  std::string main(static_cast<const char*>(blob->data), blob->size);
  if (format_id != "gltf2") return main;
  if (!blob->next) throw InputError(name, "cannot write it as glTF: the exporter gave no buffer");
  const std::string buffer(static_cast<const char*>(blob->next->data), blob->next->size);
  nlohmann::json j = nlohmann::json::parse(main);
  if (!j.contains("buffers") || j["buffers"].size() != 1)
    throw InputError(name, "cannot write it as glTF: the exporter gave other than one buffer");
  j["buffers"][0]["uri"] = "data:application/octet-stream;base64," + base64(buffer);
  return j.dump(2) + "\n";
}

std::string mesh_to_off(const Mesh& mesh) {
  std::ostringstream s;
  s << "OFF\n" << mesh.positions.size() << " " << mesh.triangles.size() << " 0\n";
  for (const Vec3& p : mesh.positions)
    s << format_number(p.x) << " " << format_number(p.y) << " " << format_number(p.z) << "\n";
  for (const Tri& t : mesh.triangles) s << "3 " << t[0] << " " << t[1] << " " << t[2] << "\n";
  return s.str();
}

std::string xml_escaped(const std::string& text) {
  std::string out;
  for (char c : text) {
    switch (c) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      default:
        out += c;
    }
  }
  return out;
}

// AMF (ISO/ASTM 52915): one object, one mesh, one volume of triangles.
std::string mesh_to_amf(const Mesh& mesh, const std::string& name, const std::string& unit) {
  std::ostringstream s;
  s << "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<amf"
    << (unit.empty() ? "" : " unit=\"" + unit + "\"") << " version=\"1.1\">\n"
    << " <object id=\"0\">\n  <metadata type=\"name\">" << xml_escaped(name)
    << "</metadata>\n  <mesh>\n   <vertices>\n";
  for (const Vec3& p : mesh.positions)
    s << "    <vertex><coordinates><x>" << format_number(p.x) << "</x><y>" << format_number(p.y)
      << "</y><z>" << format_number(p.z) << "</z></coordinates></vertex>\n";
  s << "   </vertices>\n   <volume>\n";
  for (const Tri& t : mesh.triangles)
    s << "    <triangle><v1>" << t[0] << "</v1><v2>" << t[1] << "</v2><v3>" << t[2]
      << "</v3></triangle>\n";
  s << "   </volume>\n  </mesh>\n </object>\n</amf>\n";
  return s.str();
}

}  // namespace

std::string export_mesh(const Mesh& mesh, const std::string& extension, const std::string& name,
                        const MeshExportOptions& options) {
  std::string ext = extension;
  for (char& c : ext) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  if (ext == ".stl")
    return options.binary ? assimp_export(mesh, "stlb", name) : mesh_to_stl(mesh, name);
  if (ext == ".obj") return mesh_to_obj(mesh, name + " (machcut; preliminary design estimate)");
  if (ext == ".off") return mesh_to_off(mesh);
  if (ext == ".amf") return mesh_to_amf(mesh, name, options.amf_unit);
  if (ext == ".ply") return assimp_export(mesh, options.binary ? "plyb" : "ply", name);
  if (ext == ".gltf") return assimp_export(mesh, "gltf2", name);
  if (ext == ".glb") return assimp_export(mesh, "glb2", name);
  if (ext == ".dae") return assimp_export(mesh, "collada", name);
  if (ext == ".x3d") return assimp_export(mesh, "x3d", name);
  throw InputError(name, "cannot write a mesh as '" + extension +
                             "' (formats: .stl .obj .ply .off .gltf .glb .dae .amf .x3d)");
}

}  // namespace machcut

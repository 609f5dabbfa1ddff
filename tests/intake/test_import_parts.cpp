// Tests for slicing/intake/import.cpp: parts named by the file (OBJ objects and groups, glTF
// nodes and meshes, ASCII STL solids), points and lines counted, and mesh.cpp's shell_selected.
#include <catch2/catch.hpp>

#include <cstdint>
#include <cstring>
#include <fstream>
#include <sstream>

#include "machcut/common/mesh.h"
#include "machcut/common/shell_names.h"
#include "machcut/intake/import.h"
#include "test_support.h"

using namespace machcut;
using Catch::Matchers::Contains;
using machcut::test::make_box;
using machcut::test::temp_path;

namespace {

std::string write_text(const std::string& name, const std::string& text) {
  const std::string path = temp_path(name);
  std::ofstream(path, std::ios::binary) << text;
  return path;
}

// OBJ lines of a box [lo, hi] whose vertices are numbered from `base` + 1 (OBJ indices).
std::string obj_box(Vec3 lo, Vec3 hi, std::size_t base) {
  const Mesh b = make_box(lo, hi);
  std::ostringstream s;
  for (const Vec3& p : b.positions) s << "v " << p.x << " " << p.y << " " << p.z << "\n";
  for (const Tri& t : b.triangles)
    s << "f " << t[0] + base + 1 << " " << t[1] + base + 1 << " " << t[2] + base + 1 << "\n";
  return s.str();
}

std::string stl_solid(const std::string& name, const Mesh& m) {
  std::ostringstream f;
  f.precision(17);
  f << "solid " << name << "\n";
  for (const Tri& t : m.triangles) {
    f << " facet normal 0 0 0\n  outer loop\n";
    for (std::uint32_t v : t)
      f << "   vertex " << m.positions[v].x << " " << m.positions[v].y << " " << m.positions[v].z << "\n";
    f << "  endloop\n endfacet\n";
  }
  f << "endsolid " << name << "\n";
  return f.str();
}

// Base64 (RFC 4648) of `bytes`, for a glTF data URI.
std::string base64(const std::string& bytes) {
  static const char* k = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
  std::string out;
  std::size_t i = 0;
  for (; i + 2 < bytes.size(); i += 3) {
    const std::uint32_t v = (std::uint8_t(bytes[i]) << 16) | (std::uint8_t(bytes[i + 1]) << 8) | std::uint8_t(bytes[i + 2]);
    for (int j = 18; j >= 0; j -= 6) out += k[(v >> j) & 63];
  }
  if (i < bytes.size()) {
    std::uint32_t v = std::uint8_t(bytes[i]) << 16;
    if (i + 1 < bytes.size()) v |= std::uint8_t(bytes[i + 1]) << 8;
    out += k[(v >> 18) & 63];
    out += k[(v >> 12) & 63];
    out += i + 1 < bytes.size() ? k[(v >> 6) & 63] : '=';
    out += '=';
  }
  return out;
}

// A glTF 2.0 file (Khronos glTF 2.0 specification: buffers, bufferViews, accessors, meshes,
// nodes) with two nodes, each placing its own box mesh; node names as given ("" = no name),
// mesh names "mesh_a" and "mesh_b".
std::string gltf_two_boxes(const std::string& node_a, const std::string& node_b) {
  const Mesh boxes[2] = {make_box({0, 0, 0}, {1, 1, 1}), make_box({3, 0, 0}, {4, 1, 1})};
  std::string bin;
  std::ostringstream views, accessors, meshes;
  for (int b = 0; b < 2; ++b) {
    const std::size_t pos_at = bin.size();
    for (const Vec3& p : boxes[b].positions)
      for (double c : {p.x, p.y, p.z}) {
        const float f = static_cast<float>(c);
        char raw[4];
        std::memcpy(raw, &f, 4);
        bin.append(raw, 4);
      }
    const std::size_t idx_at = bin.size();
    for (const Tri& t : boxes[b].triangles)
      for (std::uint32_t v : t) {
        char raw[4];
        std::memcpy(raw, &v, 4);
        bin.append(raw, 4);
      }
    views << (b ? "," : "") << "{\"buffer\":0,\"byteOffset\":" << pos_at << ",\"byteLength\":" << idx_at - pos_at
          << "},{\"buffer\":0,\"byteOffset\":" << idx_at << ",\"byteLength\":" << bin.size() - idx_at << "}";
    accessors << (b ? "," : "") << "{\"bufferView\":" << 2 * b << ",\"componentType\":5126,\"count\":"
              << boxes[b].positions.size() << ",\"type\":\"VEC3\",\"min\":[" << 3 * b << ",0,0],\"max\":["
              << 3 * b + 1 << ",1,1]},{\"bufferView\":" << 2 * b + 1 << ",\"componentType\":5125,\"count\":"
              << 3 * boxes[b].triangles.size() << ",\"type\":\"SCALAR\"}";
    meshes << (b ? "," : "") << "{\"name\":\"mesh_" << char('a' + b) << "\",\"primitives\":[{\"attributes\":{\"POSITION\":"
           << 2 * b << "},\"indices\":" << 2 * b + 1 << "}]}";
  }
  const auto node = [](const std::string& name, int mesh) {
    return "{" + (name.empty() ? std::string() : "\"name\":\"" + name + "\",") + "\"mesh\":" + std::to_string(mesh) + "}";
  };
  std::ostringstream g;
  g << "{\"asset\":{\"version\":\"2.0\"},\"scene\":0,\"scenes\":[{\"nodes\":[0,1]}],\"nodes\":[" << node(node_a, 0)
    << "," << node(node_b, 1) << "],\"meshes\":[" << meshes.str() << "],\"accessors\":[" << accessors.str()
    << "],\"bufferViews\":[" << views.str() << "],\"buffers\":[{\"byteLength\":" << bin.size()
    << ",\"uri\":\"data:application/octet-stream;base64," << base64(bin) << "\"}]}";
  return g.str();
}

}  // namespace

TEST_CASE("OBJ objects name the parts: FILE:PART, #k only for a part of several shells", "[import][parts]") {
  // Source: the OBJ format's 'o' statement (Wavefront OBJ specification, "o object_name").
  const std::string text = "o wing\n" + obj_box({0, 0, 0}, {1, 1, 1}, 0) + obj_box({2, 0, 0}, {3, 1, 1}, 8) +
                           "o fuselage\n" + obj_box({5, 0, 0}, {6, 1, 1}, 16);
  const Mesh m = import_meshes({write_text("parts_o.obj", text)}, {});
  REQUIRE(m.shell_names.size() == 3);
  CHECK(m.shell_names[0] == "parts_o.obj:wing#1");
  CHECK(m.shell_names[1] == "parts_o.obj:wing#2");
  CHECK(m.shell_names[2] == "parts_o.obj:fuselage");
  CHECK(shell_selected(m.shell_names[0], "wing"));
  CHECK(shell_selected(m.shell_names[1], "parts_o.obj:wing"));
  CHECK(shell_selected(m.shell_names[2], "parts_o.obj"));
  CHECK_FALSE(shell_selected(m.shell_names[2], "wing"));
}

TEST_CASE("OBJ groups name the parts", "[import][parts]") {
  // Source: the OBJ format's 'g' statement (Wavefront OBJ specification, "g group_name").
  const std::string text = "g left\n" + obj_box({0, 0, 0}, {1, 1, 1}, 0) + "g right\n" +
                           obj_box({2, 0, 0}, {3, 1, 1}, 8);
  const Mesh m = import_meshes({write_text("parts_g.obj", text)}, {});
  REQUIRE(m.shell_names.size() == 2);
  CHECK(m.shell_names[0] == "parts_g.obj:left");
  CHECK(m.shell_names[1] == "parts_g.obj:right");
}

TEST_CASE("a file of one part is named by the file alone", "[import][parts]") {
  const std::string text = "o only\n" + obj_box({0, 0, 0}, {1, 1, 1}, 0) + obj_box({2, 0, 0}, {3, 1, 1}, 8);
  const Mesh m = import_meshes({write_text("one_part.obj", text)}, {});
  CHECK(m.shell_names == std::vector<std::string>{"one_part.obj#1", "one_part.obj#2"});
}

TEST_CASE("a shell that the file puts in two groups is named by both", "[import][parts]") {
  // One closed box whose faces are split between two groups (an export by material).
  const Mesh b = make_box({0, 0, 0}, {1, 1, 1});
  std::ostringstream s;
  for (const Vec3& p : b.positions) s << "v " << p.x << " " << p.y << " " << p.z << "\n";
  for (std::size_t i = 0; i < b.triangles.size(); ++i) {
    if (i == 0) s << "g top\n";
    if (i == 6) s << "g bottom\n";
    s << "f " << b.triangles[i][0] + 1 << " " << b.triangles[i][1] + 1 << " " << b.triangles[i][2] + 1 << "\n";
  }
  const Mesh m = import_meshes({write_text("split_box.obj", s.str())}, {});
  REQUIRE(m.shell_names.size() == 1);
  CHECK(m.shell_names[0] == "split_box.obj:top+bottom");
  CHECK(shell_selected(m.shell_names[0], "bottom"));
}

TEST_CASE("glTF node names name the parts, else the mesh names", "[import][parts]") {
  const Mesh named = import_meshes({write_text("nodes.gltf", gltf_two_boxes("fin", "body"))}, {});
  CHECK(named.shell_names == std::vector<std::string>{"nodes.gltf:fin", "nodes.gltf:body"});
  const Mesh unnamed = import_meshes({write_text("meshes.gltf", gltf_two_boxes("", ""))}, {});
  CHECK(unnamed.shell_names == std::vector<std::string>{"meshes.gltf:mesh_a", "meshes.gltf:mesh_b"});
  // Source: divergence theorem — two unit cubes, 1 m³ each.
  CHECK(signed_volume(named) == Approx(2.0).epsilon(1e-6));
}

TEST_CASE("ASCII STL solid names name the parts", "[import][parts]") {
  const std::string text = stl_solid("nose", make_box({0, 0, 0}, {1, 1, 1})) +
                           stl_solid("tail", make_box({2, 0, 0}, {3, 1, 1}));
  const Mesh m = import_meshes({write_text("solids.stl", text)}, {});
  CHECK(m.shell_names == std::vector<std::string>{"solids.stl:nose", "solids.stl:tail"});
}

TEST_CASE("ASCII STL facets of one or two vertices (points, lines) are counted, not read", "[import][parts]") {
  // Assimp's STL writer stores a line as a facet with two vertices (common practice of that
  // exporter); the triangles around it must be read as they are.
  const Mesh box = make_box({0, 0, 0}, {1, 1, 1});
  std::string text = stl_solid("box", box);
  const std::string line = " facet normal 0 0 0\n  outer loop\n   vertex 0 0 0\n   vertex 5 5 5\n  endloop\n endfacet\n";
  const std::string point = " facet normal 0 0 0\n  outer loop\n   vertex 7 7 7\n  endloop\n endfacet\n";
  text.insert(text.find(" facet"), line + line + point);  // 5 stray vertices: Assimp 5.2 refuses
  ImportReport report;
  const Mesh m = import_meshes({write_text("lines.stl", text)}, {}, &report);
  CHECK(m.triangles.size() == 12);
  // Source: divergence theorem — the unit cube, 1 m³ (no triangle made of stray vertices).
  CHECK(signed_volume(m) == Approx(1.0).epsilon(1e-12));
  bool counted = false;
  for (const std::string& w : report.warnings) counted = counted || w.find("3 points or lines ignored") != std::string::npos;
  CHECK(counted);
  // Six stray vertices (three lines): a multiple of three, which would make two triangles of
  // unrelated vertices if they were read.
  std::string six = stl_solid("box", box);
  six.insert(six.find(" facet"), line + line + line);
  const Mesh m6 = import_meshes({write_text("lines6.stl", six)}, {});
  CHECK(m6.triangles.size() == 12);
}

TEST_CASE("OBJ points and lines are counted in the warnings", "[import][parts]") {
  const std::string text = obj_box({0, 0, 0}, {1, 1, 1}, 0) + "v 5 5 5\nv 6 6 6\nl 9 10\np 9\n";
  ImportReport report;
  const Mesh m = import_meshes({write_text("with_lines.obj", text)}, {}, &report);
  CHECK(m.triangles.size() == 12);
  bool counted = false;
  for (const std::string& w : report.warnings) counted = counted || w.find("points or lines ignored") != std::string::npos;
  CHECK(counted);
}

TEST_CASE("shell_selected: shells, parts, files and paths", "[mesh][parts]") {
  CHECK(shell_selected("a.obj:flap#2", "a.obj:flap#2"));
  CHECK(shell_selected("a.obj:flap#2", "a.obj:flap"));
  CHECK(shell_selected("a.obj:flap#2", "flap"));
  CHECK(shell_selected("a.obj:flap#2", "a.obj"));
  CHECK(shell_selected("a.obj:flap#2", "some/dir/a.obj"));
  CHECK(shell_selected("a.obj#3", "a.obj"));
  CHECK(shell_selected("a.obj:x+y", "y"));
  CHECK_FALSE(shell_selected("a.obj:flap#2", "fla"));
  CHECK_FALSE(shell_selected("a.obj:flap#2", "a.obj:flap#1"));
  CHECK_FALSE(shell_selected("a.obj:x+y", "x+"));
  CHECK_FALSE(shell_selected("a.obj", ""));
  CHECK_FALSE(shell_selected("ab.obj", "b.obj"));
  CHECK(shell_part("a.obj:flap#2") == "a.obj:flap");
  CHECK(shell_part("pod#2.stl") == "pod#2.stl");
}

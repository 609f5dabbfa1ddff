// Tests for slicing/intake/import.cpp, weld.cpp, stl_reader.cpp, import_guard.cpp.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdint>
#include <cstring>
#include <filesystem>
#include <fstream>

#include "machcut/common/errors.h"
#include "machcut/intake/import.h"
#include "test_support.h"

using namespace machcut;
using machcut::test::make_box;
using machcut::test::make_sphere;
using machcut::test::temp_path;

namespace {

std::string write_text(const std::string& name, const std::string& text) {
  const std::string path = temp_path(name);
  std::ofstream(path, std::ios::binary) << text;
  return path;
}

void put_u32(std::string& s, std::uint32_t v) {
  for (int i = 0; i < 4; ++i) s.push_back(static_cast<char>((v >> (8 * i)) & 0xFF));
}
void put_f32(std::string& s, float f) {
  std::uint32_t v;
  std::memcpy(&v, &f, 4);
  put_u32(s, v);
}

// Binary STL bytes (80-byte header starting with `header`, count, 50-byte records).
std::string binary_stl_bytes(const Mesh& m, const std::string& header = "binary") {
  std::string s(80, ' ');
  s.replace(0, header.size(), header);
  put_u32(s, static_cast<std::uint32_t>(m.triangles.size()));
  for (const Tri& t : m.triangles) {
    for (int k = 0; k < 3; ++k) put_f32(s, 0.0f);
    for (std::uint32_t v : t) {
      put_f32(s, static_cast<float>(m.positions[v].x));
      put_f32(s, static_cast<float>(m.positions[v].y));
      put_f32(s, static_cast<float>(m.positions[v].z));
    }
    s += std::string(2, '\0');
  }
  return s;
}

std::string off_text(const Mesh& m) {
  std::string s = "OFF\n" + std::to_string(m.positions.size()) + " " +
                  std::to_string(m.triangles.size()) + " 0\n";
  for (const Vec3& p : m.positions)
    s += std::to_string(p.x) + " " + std::to_string(p.y) + " " + std::to_string(p.z) + "\n";
  for (const Tri& t : m.triangles)
    s += "3 " + std::to_string(t[0]) + " " + std::to_string(t[1]) + " " + std::to_string(t[2]) + "\n";
  return s;
}

std::string ply_text(const Mesh& m) {
  std::string s = "ply\nformat ascii 1.0\nelement vertex " + std::to_string(m.positions.size()) +
                  "\nproperty float x\nproperty float y\nproperty float z\nelement face " +
                  std::to_string(m.triangles.size()) +
                  "\nproperty list uchar int vertex_indices\nend_header\n";
  for (const Vec3& p : m.positions)
    s += std::to_string(p.x) + " " + std::to_string(p.y) + " " + std::to_string(p.z) + "\n";
  for (const Tri& t : m.triangles)
    s += "3 " + std::to_string(t[0]) + " " + std::to_string(t[1]) + " " + std::to_string(t[2]) + "\n";
  return s;
}

std::vector<Vec3> soup_of(const Mesh& m) {
  std::vector<Vec3> c;
  for (const Tri& t : m.triangles)
    for (std::uint32_t v : t) c.push_back(m.positions[v]);
  return c;
}

// The InputError message for importing `paths` ("" when nothing is thrown).
std::string import_error(const std::vector<std::string>& paths, ImportOptions o = {}) {
  try {
    import_meshes(paths, o);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

bool contains(const std::string& s, const std::string& part) {
  return s.find(part) != std::string::npos;
}

const Mesh kUnitBox = make_box({0, 0, 0}, {1, 1, 1});

}  // namespace

// ------------------------------------------------------------------------------- units --

TEST_CASE("length units use the exact definitions", "[import][units]") {
  // NIST SP 811 (2008), appendix B.8: 1 in = 0.0254 m and 1 ft = 0.3048 m exactly (the
  // international yard and pound agreement, 1959); mm and cm by the SI prefixes.
  CHECK(metres_per_unit(LengthUnit::m) == 1.0);
  CHECK(metres_per_unit(LengthUnit::mm) == 0.001);
  CHECK(metres_per_unit(LengthUnit::cm) == 0.01);
  CHECK(metres_per_unit(LengthUnit::in) == 0.0254);
  CHECK(metres_per_unit(LengthUnit::ft) == 0.3048);
  // 1 ft = 12 in (same source), within double rounding.
  CHECK(metres_per_unit(LengthUnit::ft) / metres_per_unit(LengthUnit::in) ==
        Approx(12.0).epsilon(1e-15));
  for (const char* name : {"m", "mm", "cm", "in", "ft"}) {
    const auto u = parse_length_unit(name);
    REQUIRE(u);
    CHECK(std::string(unit_name(*u)) == name);
  }
  CHECK_FALSE(parse_length_unit("inch"));
  CHECK_FALSE(parse_length_unit(""));
  CHECK_FALSE(parse_length_unit("km"));
}

TEST_CASE("import converts a box in inches to metres", "[import][units]") {
  const std::string path = test::write_obj(make_box({0, 0, 0}, {100, 20, 10}), "box_in.obj");
  ImportOptions o;
  o.unit = LengthUnit::in;
  const Mesh m = import_meshes({path}, o);
  const Box3 b = bounding_box(m);
  // 100 in = 2.54 m, 20 in = 0.508 m, 10 in = 0.254 m (NIST SP 811 B.8).
  CHECK(b.hi.x == Approx(2.54).epsilon(1e-15));
  CHECK(b.hi.y == Approx(0.508).epsilon(1e-15));
  // Volume 20 000 in³ = 20 000 × 0.0254³ m³ = 0.32774128 m³.
  CHECK(signed_volume(m) == Approx(0.32774128).epsilon(1e-12));
}

TEST_CASE("implausible model sizes suggest another unit", "[import][units]") {
  // A 15 m aircraft drawn in millimetres but read as metres (thresholds 0.05–200 m: aircraft
  // are ~1–100 m long, common practice).
  const std::string w = unit_warning(15000.0, LengthUnit::m);
  CHECK(contains(w, "millimetres"));
  CHECK(contains(w, "--units mm"));
  CHECK(unit_warning(15.0, LengthUnit::m).empty());
  CHECK(unit_warning(0.3, LengthUnit::m).empty());  // a wind-tunnel model
  // A 12 m model in metres read with --units mm: 0.012 m → suggests metres.
  const std::string back = unit_warning(0.012, LengthUnit::mm);
  REQUIRE(back.size() > 9);
  CHECK(back.substr(back.size() - 9) == "--units m");
  // 600 in read as metres: inches give 15.24 m, the closest to 10 m on a log scale.
  CHECK(contains(unit_warning(600.0, LengthUnit::m), "--units in"));
  CHECK(unit_warning(0.0, LengthUnit::m).empty());  // flat or empty: health check's job

  ImportReport r;
  const std::string path = test::write_obj(make_box({0, 0, 0}, {12000, 3000, 2000}), "big.obj");
  import_meshes({path}, {}, &r);
  REQUIRE(r.warnings.size() == 1);
  CHECK(contains(r.warnings[0], "big.obj"));
  CHECK(contains(r.warnings[0], "--units mm"));
}

// -------------------------------------------------------------------------------- axes --

TEST_CASE("parse_axis accepts signed axis letters", "[import][axes]") {
  CHECK(parse_axis("+x")->axis == 0);
  CHECK(parse_axis("-y")->sign == -1);
  CHECK(parse_axis("Z")->axis == 2);
  CHECK(parse_axis("z")->sign == 1);
  CHECK_FALSE(parse_axis("w"));
  CHECK_FALSE(parse_axis("+"));
  CHECK_FALSE(parse_axis("xy"));
  CHECK_FALSE(parse_axis(""));
}

TEST_CASE("flow and up must be different axes", "[import][axes]") {
  AxisMapping m;
  m.flow = {2, 1};
  m.up = {2, -1};
  CHECK_THROWS_AS(check_axes(m), InputError);
  CHECK(contains(import_error({test::write_obj(kUnitBox, "axes.obj")}, {LengthUnit::m, m}),
                 "different axes"));
}

TEST_CASE("every axis mapping is a proper rotation", "[import][axes]") {
  // Independent construction: model y = z × x with the cross product of geometry.h, the
  // determinant of the rows (x, y, z) must be +1 (right-handed; volumes keep their sign).
  const Vec3 p{1.0, 2.0, 3.0};
  const double file_volume = signed_volume(make_box({0, 0, 0}, {1, 2, 3}));
  int tested = 0;
  for (int fa = 0; fa < 3; ++fa)
    for (int ua = 0; ua < 3; ++ua)
      for (int fs : {-1, 1})
        for (int us : {-1, 1}) {
          if (fa == ua) continue;
          const AxisMapping m{{fa, fs}, {ua, us}};
          Vec3 ex{}, ez{};
          (&ex.x)[fa] = fs;
          (&ez.x)[ua] = us;
          const Vec3 ey = cross(ez, ex);
          CHECK(dot(cross(ex, ey), ez) == 1.0);  // det [ex; ey; ez] = +1
          const Vec3 q = apply_axes(m, p);
          CHECK(q.x == dot(ex, p));
          CHECK(q.y == dot(ey, p));
          CHECK(q.z == dot(ez, p));
          Mesh box = make_box({0, 0, 0}, {1, 2, 3});
          for (Vec3& v : box.positions) v = apply_axes(m, v);
          CHECK(signed_volume(box) == Approx(file_volume).epsilon(1e-14));
          ++tested;
        }
  CHECK(tested == 24);  // the 24 proper rotations that permute axes (the cube's rotation group)
}

TEST_CASE("a y-up file maps its nose where expected", "[import][axes]") {
  // File: flow along −z, up along +y. Model x = −file z, model z = +file y,
  // model y = z × x = (+y) × (−z) = −(y × z) = −file x.
  AxisMapping m;
  m.flow = *parse_axis("-z");
  m.up = *parse_axis("+y");
  const Vec3 q = apply_axes(m, {1.0, 2.0, 3.0});
  CHECK(q.x == -3.0);
  CHECK(q.y == -1.0);
  CHECK(q.z == 2.0);
  CHECK(describe(m) == "model x = -file z, model y = -file x, model z = +file y");
  CHECK(describe(AxisMapping{}) == "model x = +file x, model y = +file y, model z = +file z");
}

// ------------------------------------------------------------------------- weld, shells --

TEST_CASE("a cube as a 12-triangle soup welds to 8 vertices and 1 shell", "[import][weld]") {
  const Mesh m = weld_soup(soup_of(kUnitBox));
  CHECK(m.positions.size() == 8);
  CHECK(m.triangles.size() == 12);
  std::uint32_t n = 0;
  const auto shell = edge_connected_shells(m, &n);
  CHECK(n == 1);
  CHECK(shell.size() == 12);
  // Closed form: unit cube volume 1.
  CHECK(signed_volume(m) == Approx(1.0).epsilon(1e-15));
}

TEST_CASE("weld joins -0 and +0 and drops degenerate triangles", "[import][weld]") {
  const std::vector<Vec3> soup = {{0.0, 0, 0}, {1, 0, 0}, {0, 1, 0},
                                  {-0.0, -0.0, 0}, {0, 1, 0}, {-1, 0, 0},
                                  {1, 0, 0}, {1, 0, 0}, {0, 1, 0}};  // degenerate
  const Mesh m = weld_soup(soup);
  CHECK(m.positions.size() == 4);
  CHECK(m.triangles.size() == 2);
  CHECK(m.triangles[1][0] == m.triangles[0][0]);
  // Nearly equal is not equal: bitwise welding only.
  const Mesh n = weld_soup({{0, 0, 0}, {1, 0, 0}, {0, 1, 0}, {1e-300, 0, 0}, {0, 1, 0}, {-1, 0, 0}});
  CHECK(n.positions.size() == 5);
}

TEST_CASE("two disjoint boxes are two shells; touching at a vertex too", "[import][shells]") {
  Mesh two = concatenate({make_box({0, 0, 0}, {1, 1, 1}), make_box({3, 0, 0}, {4, 1, 1})});
  std::uint32_t n = 0;
  auto shell = edge_connected_shells(weld_soup(soup_of(two)), &n);
  CHECK(n == 2);
  // Sharing only the corner (1,1,1): edge-connected shells stay separate.
  two = concatenate({make_box({0, 0, 0}, {1, 1, 1}), make_box({1, 1, 1}, {2, 2, 2})});
  const Mesh w = weld_soup(soup_of(two));
  CHECK(w.positions.size() == 15);
  shell = edge_connected_shells(w, &n);
  CHECK(n == 2);
  CHECK(shell.front() == 0);
  CHECK(shell.back() == 1);
}

TEST_CASE("shells are named FILE#k, or FILE alone", "[import][shells]") {
  const Mesh two = concatenate({make_box({0, 0, 0}, {1, 1, 1}), make_box({3, 0, 0}, {4, 1, 1})});
  const Mesh m = import_meshes({test::write_obj(two, "two_boxes.obj")}, {});
  REQUIRE(shell_count(m) == 2);
  CHECK(m.shell_names[0] == "two_boxes.obj#1");
  CHECK(m.shell_names[1] == "two_boxes.obj#2");
  CHECK(signed_volume(m, 0) == Approx(1.0));
  const Mesh one = import_meshes({test::write_obj(kUnitBox, "one_box.obj")}, {});
  REQUIRE(shell_count(one) == 1);
  CHECK(one.shell_names[0] == "one_box.obj");
}

// ------------------------------------------------------------------------------ formats --

TEST_CASE("OBJ quads and negative indices", "[import][formats]") {
  // Unit cube, six outward quads, the second half with relative (negative) indices
  // (Wavefront OBJ: -1 is the most recent vertex).
  const std::string path = write_text("quads.obj",
                                      "v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\n"
                                      "v 0 0 1\nv 1 0 1\nv 1 1 1\nv 0 1 1\n"
                                      "f 1 4 3 2\nf 5 6 7 8\nf 1 2 6 5\n"
                                      "f -5 -1 -2 -6\nf -7 -6 -2 -3\nf -8 -4 -1 -5\n");
  ImportReport r;
  const Mesh m = import_meshes({path}, {}, &r);
  CHECK(r.input_triangles == 12);
  CHECK(m.positions.size() == 8);
  CHECK(m.triangles.size() == 12);
  CHECK(shell_count(m) == 1);
  CHECK(signed_volume(m) == Approx(1.0).epsilon(1e-15));  // closed form, outward quads
  CHECK(surface_area(m) == Approx(6.0).epsilon(1e-15));
}

TEST_CASE("binary STL: own reader and Assimp give the same mesh", "[import][formats]") {
  const Mesh sphere = make_sphere({0.5, 0.25, -1}, 2.0, 24, 48);
  const std::string path = write_text("sphere_bin.stl", binary_stl_bytes(sphere, "solid but binary"));
  ImportOptions direct, via_assimp;
  via_assimp.fast_binary_stl = false;
  ImportReport r;
  const Mesh a = import_meshes({path}, direct, &r);
  const Mesh b = import_meshes({path}, via_assimp);
  CHECK(r.input_corners == 3 * sphere.triangles.size());
  CHECK(a.positions.size() == sphere.positions.size());
  CHECK(a.triangles.size() == sphere.triangles.size());
  REQUIRE(a.positions.size() == b.positions.size());
  REQUIRE(a.triangles == b.triangles);
  for (std::size_t i = 0; i < a.positions.size(); ++i) {
    CHECK(a.positions[i].x == b.positions[i].x);
    CHECK(a.positions[i].y == b.positions[i].y);
    CHECK(a.positions[i].z == b.positions[i].z);
  }
  CHECK(shell_count(a) == 1);
  // Float storage: volume within float rounding of the double mesh's.
  CHECK(signed_volume(a) == Approx(signed_volume(sphere)).epsilon(1e-6));
}

TEST_CASE("ASCII STL, PLY and OFF read the same box", "[import][formats]") {
  const Mesh box = make_box({-1, 0, 2}, {3, 1, 2.5});  // volume 4 × 1 × 0.5 = 2
  const std::vector<std::string> paths = {
      test::write_stl_ascii(box, "box_ascii.stl"), write_text("box.ply", ply_text(box)),
      write_text("box.off", off_text(box)), write_text("box_bin.stl", binary_stl_bytes(box))};
  for (const std::string& p : paths) {
    INFO(p);
    const Mesh m = import_meshes({p}, {});
    CHECK(m.positions.size() == 8);
    CHECK(m.triangles.size() == 12);
    CHECK(shell_count(m) == 1);
    CHECK(signed_volume(m) == Approx(2.0).epsilon(1e-12));
  }
}

TEST_CASE("ASCII STL with a UTF-8 solid name is not taken for binary", "[import][formats]") {
  // A binary STL header may start with "solid" too; text bytes (UTF-8 included) decide.
  const std::string path = write_text("utf8.stl",
                                      "solid Fl\xc3\xbcgel\n facet normal 0 0 1\n  outer loop\n"
                                      "   vertex 0 0 0\n   vertex 1 0 0\n   vertex 0 1 0\n"
                                      "  endloop\n endfacet\nendsolid Fl\xc3\xbcgel\n");
  const Mesh m = import_meshes({path}, {});
  CHECK(m.triangles.size() == 1);
  CHECK(surface_area(m) == Approx(0.5).epsilon(1e-15));
}

TEST_CASE("glTF: node transforms are applied", "[import][formats]") {
  // One triangle (0,0,0) (1,0,0) (0,1,0) as float32 little-endian, base64 in a data URI,
  // placed by a node translated by (10, 0, 0) (glTF 2.0 specification, Khronos, 2017).
  std::string bin;
  for (float f : {0.f, 0.f, 0.f, 1.f, 0.f, 0.f, 0.f, 1.f, 0.f}) put_f32(bin, f);
  static const char* k = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
  std::string b64;
  for (std::size_t i = 0; i < bin.size(); i += 3) {  // 36 bytes: a multiple of 3, no padding
    const auto v = static_cast<std::uint32_t>(static_cast<unsigned char>(bin[i]) << 16 |
                                              static_cast<unsigned char>(bin[i + 1]) << 8 |
                                              static_cast<unsigned char>(bin[i + 2]));
    for (int s = 18; s >= 0; s -= 6) b64 += k[(v >> s) & 63];
  }
  const std::string json =
      R"({"asset":{"version":"2.0"},"scene":0,"scenes":[{"nodes":[0]}],)"
      R"("nodes":[{"mesh":0,"translation":[10,0,0]}],)"
      R"("meshes":[{"primitives":[{"attributes":{"POSITION":0}}]}],)"
      R"("buffers":[{"byteLength":36,"uri":"data:application/octet-stream;base64,)" + b64 +
      R"("}],"bufferViews":[{"buffer":0,"byteLength":36}],)"
      R"("accessors":[{"bufferView":0,"componentType":5126,"count":3,"type":"VEC3",)"
      R"("min":[0,0,0],"max":[1,1,0]}]})";
  const Mesh m = import_meshes({write_text("tri.gltf", json)}, {});
  REQUIRE(m.triangles.size() == 1);
  const Box3 b = bounding_box(m);
  CHECK(b.lo.x == 10.0);
  CHECK(b.hi.x == 11.0);
  CHECK(b.hi.y == 1.0);
}

TEST_CASE("several files form one configuration", "[import][formats]") {
  const std::string a = test::write_obj(make_box({0, 0, 0}, {1, 1, 1}), "fuselage.obj");
  const std::string b = write_text("wing.stl", binary_stl_bytes(make_box({0, -2, 0}, {0.5, 2, 0.1})));
  // The wing overlaps the fuselage: files are not welded to each other, shells stay apart.
  ImportReport r;
  const Mesh m = import_meshes({a, b}, {}, &r);
  REQUIRE(shell_count(m) == 2);
  CHECK(m.shell_names[0] == "fuselage.obj");
  CHECK(m.shell_names[1] == "wing.stl");
  CHECK(m.positions.size() == 16);
  CHECK(signed_volume(m, 1) == Approx(0.5 * 4 * 0.1).epsilon(1e-6));  // float storage
  CHECK(r.input_triangles == 24);
  CHECK(r.warnings.empty());
}

// ---------------------------------------------------------------------------- bad input --

TEST_CASE("bad files: one message naming the file and the problem", "[import][errors]") {
  const std::string box_bin = binary_stl_bytes(kUnitBox, "solid trap");  // 684 bytes, 12 tris
  struct Case {
    std::string name, content, expect;
  };
  std::string over_count = box_bin;
  over_count[80] = 13;  // header says 13, file holds 12
  const std::vector<Case> cases = {
      {"empty.stl", "", "empty file"},
      {"empty.obj", "", "empty file"},
      {"truncated.stl", box_bin.substr(0, box_bin.size() - 7), "truncated binary STL"},
      {"short_header.stl", std::string(40, '\x01'), "truncated binary STL"},
      {"over_count.stl", over_count, "larger than the file"},
      {"trailing.stl", box_bin + std::string(50, '\0'), "after the 12 triangles"},
      {"nan.stl", "solid n\nfacet normal 0 0 0\nouter loop\nvertex 0 0 nan\nvertex 1 0 0\n"
                  "vertex 0 1 0\nendloop\nendfacet\nendsolid n\n", "NaN or infinite"},
      {"inf.obj", "v 0 0 0\nv 1 0 inf\nv 0 1 0\nf 1 2 3\n", "NaN or infinite"},
      {"range.obj", "v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 7\n", "out of range"},
      {"range_neg.obj", "v 0 0 0\nv 1 0 0\nv 0 1 0\nf -1 -2 -9\n", "out of range"},
      {"range.ply", "ply\nformat ascii 1.0\nelement vertex 3\nproperty float x\nproperty float y\n"
                    "property float z\nelement face 1\nproperty list uchar int vertex_indices\n"
                    "end_header\n0 0 0\n1 0 0\n0 1 0\n3 0 1 7\n", "outside"},
      {"range.off", "OFF\n3 1 0\n0 0 0\n1 0 0\n0 1 0\n3 0 1 9\n", "outside 0..2"},
      {"short.off", "OFF\n3 2 0\n0 0 0\n1 0 0\n0 1 0\n3 0 1 2\n", "ends after 1 of its 2"},
      {"huge.off", "OFF\n300000000 100000000 0\n0 0 0\n1 0 0\n0 1 0\n3 0 1 2\n", "more than the file"},
      {"huge.ply", "ply\nformat binary_little_endian 1.0\nelement vertex 300000000\n"
                   "property float x\nproperty float y\nproperty float z\nend_header\n", "more than the file"},
      {"text.obj", "this is a shopping list, not a mesh\n", "no mesh found"},
      {"text.stl", "this is a shopping list, not a mesh, and it is not 84 bytes long.......\n"
                   "second line of the shopping list\n", "not an STL file"},
      {"text.ply", "this is a shopping list\n", "not a readable mesh"},
      {"text.off", "this is a shopping list\n", "not a readable mesh"},
      {"lines.obj", "v 0 0 0\nv 1 0 0\nv 0 1 0\nl 1 2\nl 2 3\n", "no triangles"},
      {"nofacets.stl", "solid x\nendsolid x\n", "no mesh found"},
      {"zero.stl", std::string(84, '\0'), "no triangles"},
      {"degenerate.obj", "v 0 0 0\nv 1 0 0\nf 1 2 2\nf 1 1 1\n", "degenerate"},
      {"model.xyz", "1 2 3\n", "unknown file extension '.xyz'"},
      // 3MF is not read (README "Formats"): Assimp 5.2's reader aborts the process on a
      // package without its root part, found by fuzz/fuzz_import.cpp. A zip's local-header
      // signature (PKWARE APPNOTE.TXT 4.3.7) never reaches a reader.
      {"part.3mf", std::string("PK\x03\x04", 4) + std::string(40, '\0'), "unknown file extension '.3mf'"},
  };
  for (const Case& c : cases) {
    const std::string path = write_text(c.name, c.content);
    const std::string msg = import_error({path});
    INFO(c.name << " -> " << msg);
    CHECK(contains(msg, path));
    CHECK(contains(msg, c.expect));
    CHECK(msg.find('\n') == std::string::npos);
  }
}

TEST_CASE("missing files, directories and size limits", "[import][errors]") {
  const std::string missing = temp_path("no_such_file.stl");
  std::filesystem::remove(missing);
  CHECK(import_error({missing}) == missing + ": file not found");
  const std::string dir = temp_path("a_folder.stl");
  std::filesystem::create_directories(dir);
  CHECK(contains(import_error({dir}), dir + ": is a directory"));
  const std::string box = test::write_obj(kUnitBox, "limit.obj");
  ImportOptions small;
  small.max_file_bytes = 100;
  const std::string msg = import_error({box}, small);
  CHECK(contains(msg, box));
  CHECK(contains(msg, "over the limit of 100 bytes"));
  CHECK(contains(import_error({}), "no input files"));
  // The second file is the bad one: the message names it, not the first.
  const std::string good = test::write_obj(kUnitBox, "good.obj");
  CHECK(contains(import_error({good, missing}), missing));
}

TEST_CASE("degenerate triangles are counted and reported", "[import][weld]") {
  const std::string path = write_text("with_sliver.obj",
                                      "v 0 0 0\nv 1 0 0\nv 0 1 0\nv 0 0 1\n"
                                      "f 1 3 2\nf 1 2 4\nf 1 4 3\nf 2 3 4\nf 1 1 2\n");
  ImportReport r;
  const Mesh m = import_meshes({path}, {}, &r);
  CHECK(m.triangles.size() == 4);
  CHECK(r.degenerate_triangles == 1);
  REQUIRE_FALSE(r.warnings.empty());
  CHECK(contains(r.warnings[0], path));
  CHECK(signed_volume(m) == Approx(1.0 / 6.0).epsilon(1e-15));  // closed form: unit tetrahedron
}

TEST_CASE("COLLADA files are read in their own axes with their declared unit", "[import][formats]") {
  // COLLADA 1.4.1 (Khronos): <unit meter="0.001"/> declares millimetres and <up_axis>Z_UP
  // the file's up axis. A 2000 × 1000 × 1000 mm box: volume 2 m³, bounds in file axes
  // (closed form of a box).
  const std::string dae = write_text("box_mm.dae", R"(<?xml version="1.0" encoding="utf-8"?>
<COLLADA xmlns="http://www.collada.org/2005/11/COLLADASchema" version="1.4.1">
  <asset><unit name="millimeter" meter="0.001"/><up_axis>Z_UP</up_axis></asset>
  <library_geometries><geometry id="box" name="box"><mesh>
    <source id="p"><float_array id="pa" count="24">0 0 0 2000 0 0 2000 1000 0 0 1000 0 0 0 1000 2000 0 1000 2000 1000 1000 0 1000 1000</float_array>
      <technique_common><accessor source="#pa" count="8" stride="3"><param name="X" type="float"/><param name="Y" type="float"/><param name="Z" type="float"/></accessor></technique_common></source>
    <vertices id="v"><input semantic="POSITION" source="#p"/></vertices>
    <triangles count="12"><input semantic="VERTEX" source="#v" offset="0"/>
      <p>0 2 1 0 3 2 4 5 6 4 6 7 0 1 5 0 5 4 1 2 6 1 6 5 2 3 7 2 7 6 3 0 4 3 4 7</p></triangles>
  </mesh></geometry></library_geometries>
  <library_visual_scenes><visual_scene id="s"><node id="n" name="box"><instance_geometry url="#box"/></node></visual_scene></library_visual_scenes>
  <scene><instance_visual_scene url="#s"/></scene>
</COLLADA>
)");
  const Mesh m = import_meshes({dae}, ImportOptions{});
  REQUIRE(m.triangles.size() == 12);
  const Box3 b = bounding_box(m);
  CHECK(b.lo.z == Approx(0.0).margin(1e-9));
  CHECK(b.hi.z == Approx(1.0));  // up stays +z: the file's axes, not Assimp's Y-up turn
  CHECK(b.hi.x == Approx(2.0));
  CHECK(std::fabs(signed_volume(m)) == Approx(2.0));
}

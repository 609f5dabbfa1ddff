// Tests for slicing/intake/import_guard.cpp: the strict PLY/OFF checks before Assimp, the
// reader's child process, and message trimming. The reproducers of issue 13 (mutation fuzzing:
// crashes, aborts, a hang and a runaway allocation inside Assimp 5.2) are rebuilt here as tiny
// files in the test's temp folder.
#include <catch2/catch.hpp>

#include <signal.h>
#include <unistd.h>

#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <numbers>
#include <stdexcept>

// The private interface of the intake stage (the reader isolation is tested directly).
#include "../../slicing/intake/import_detail.h"
#include "machcut/common/errors.h"
#include "machcut/intake/import.h"
#include "test_support.h"

#if defined(__SANITIZE_ADDRESS__)
#define UNDER_ASAN 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#define UNDER_ASAN 1
#endif
#endif
#ifndef UNDER_ASAN
#define UNDER_ASAN 0
#endif

using namespace machcut;
using machcut::test::temp_path;

namespace {

std::string write_bytes(const std::string& name, const std::string& bytes) {
  const std::string path = temp_path(name);
  std::ofstream(path, std::ios::binary) << bytes;
  return path;
}

std::string import_error(const std::string& path, ImportOptions o = {}) {
  try {
    import_meshes({path}, o);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

bool contains(const std::string& s, const std::string& part) {
  return s.find(part) != std::string::npos;
}

// A good error: names the file, one line, short.
void check_one_line(const std::string& msg, const std::string& path) {
  INFO(msg);
  CHECK(msg.rfind(path + ": ", 0) == 0);
  CHECK(msg.find('\n') == std::string::npos);
  CHECK(msg.size() < path.size() + 320);
}

void put(std::string& s, const void* p, std::size_t n) { s.append(static_cast<const char*>(p), n); }
void put_i32(std::string& s, std::int32_t v) { put(s, &v, 4); }  // little-endian host
void put_f32(std::string& s, float v) { put(s, &v, 4); }

// The unit cube's 8 corners and 12 outward triangles.
const float kCube[8][3] = {{0, 0, 0}, {1, 0, 0}, {1, 1, 0}, {0, 1, 0},
                           {0, 0, 1}, {1, 0, 1}, {1, 1, 1}, {0, 1, 1}};
const int kCubeFaces[12][3] = {{0, 2, 1}, {0, 3, 2}, {4, 5, 6}, {4, 6, 7}, {0, 1, 5}, {0, 5, 4},
                               {1, 2, 6}, {1, 6, 5}, {2, 3, 7}, {2, 7, 6}, {3, 0, 4}, {3, 4, 7}};

std::string ply_header(const std::string& format, int vertices, int faces) {
  return "ply\nformat " + format + " 1.0\nelement vertex " + std::to_string(vertices) +
         "\nproperty float x\nproperty float y\nproperty float z\nelement face " +
         std::to_string(faces) + "\nproperty list uchar int vertex_indices\nend_header\n";
}

// Binary little-endian PLY of the cube; `first_count` replaces the list count of face 1
// (its data then holds that many indices when `consistent`, else the 3 it had).
std::string binary_cube_ply(int first_count, bool consistent) {
  std::string s = ply_header("binary_little_endian", 8, 12);
  for (const auto& v : kCube)
    for (float c : v) put_f32(s, c);
  for (int f = 0; f < 12; ++f) {
    const int n = f == 0 ? first_count : 3;
    s.push_back(static_cast<char>(n));
    const int stored = f == 0 && consistent ? n : 3;
    for (int k = 0; k < stored; ++k) put_i32(s, kCubeFaces[f][k % 3]);
  }
  return s;
}

std::string ascii_cube_ply(const std::string& vertex_2 = "1 0 0",
                           const std::string& face_1 = "3 0 2 1") {
  std::string s = ply_header("ascii", 8, 12);
  for (int i = 0; i < 8; ++i)
    s += i == 1 ? vertex_2 + "\n"
                : std::to_string(int(kCube[i][0])) + " " + std::to_string(int(kCube[i][1])) + " " +
                      std::to_string(int(kCube[i][2])) + "\n";
  for (int f = 0; f < 12; ++f)
    s += f == 0 ? face_1 + "\n"
                : "3 " + std::to_string(kCubeFaces[f][0]) + " " + std::to_string(kCubeFaces[f][1]) +
                      " " + std::to_string(kCubeFaces[f][2]) + "\n";
  return s;
}

std::string cube_off(const std::string& vertex_2 = "1.0 0.0 0.0") {
  std::string s = "OFF\n8 12 0\n";
  for (int i = 0; i < 8; ++i)
    s += i == 1 ? vertex_2 + "\n"
                : std::to_string(kCube[i][0]) + " " + std::to_string(kCube[i][1]) + " " +
                      std::to_string(kCube[i][2]) + "\n";
  for (const auto& f : kCubeFaces)
    s += "3 " + std::to_string(f[0]) + " " + std::to_string(f[1]) + " " + std::to_string(f[2]) + "\n";
  return s;
}

// A regular n-gon of circumradius 1 in the plane z = 0 as one PLY face (binary).
std::string polygon_ply(int n) {
  std::string s = ply_header("binary_little_endian", n, 1);
  for (int i = 0; i < n; ++i) {
    const double a = 2 * std::numbers::pi * i / n;
    put_f32(s, static_cast<float>(std::cos(a)));
    put_f32(s, static_cast<float>(std::sin(a)));
    put_f32(s, 0.0f);
  }
  s.push_back(static_cast<char>(n));
  for (int i = 0; i < n; ++i) put_i32(s, i);
  return s;
}

}  // namespace

// ------------------------------------------------------------------ issue 13 reproducers --

TEST_CASE("binary PLY face list counts other than 3", "[import][guard]") {
  // Reproducer: one list count changed, its data not (a mutant; Assimp 5.2 read past the data:
  // SIGSEGV). Now every count is refused with a line naming the file.
  for (int n : {0, 1, 2, 4, 5, 255}) {
    const std::string path = write_bytes("mutant_count_" + std::to_string(n) + ".ply",
                                         binary_cube_ply(n, false));
    const std::string msg = import_error(path);
    INFO("count " << n << ": " << msg);
    check_one_line(msg, path);
  }
  // Consistent files: a count of 0 is refused (Assimp's triangulation aborts on it) …
  const std::string zero = write_bytes("count_0.ply", binary_cube_ply(0, true));
  CHECK(contains(import_error(zero), "PLY face 1 has no corners"));
  // … 1 and 2 are a point and a line: ignored with a warning, the other 11 triangles kept.
  for (int n : {1, 2}) {
    ImportReport r;
    const std::string path = write_bytes("count_" + std::to_string(n) + ".ply", binary_cube_ply(n, true));
    const Mesh m = import_meshes({path}, {}, &r);
    CHECK(m.triangles.size() == 11);
    REQUIRE_FALSE(r.warnings.empty());
    CHECK(contains(r.warnings.front(), "points or lines ignored"));
  }
  // … and polygons are triangulated: n − 2 triangles enclosing the polygon's area
  // (n/2) r² sin(2π/n) (closed form for a regular n-gon of circumradius r).
  for (int n : {4, 5, 255}) {
    const std::string path = write_bytes("polygon_" + std::to_string(n) + ".ply", polygon_ply(n));
    const Mesh m = import_meshes({path}, {});
    CHECK(m.triangles.size() == static_cast<std::size_t>(n - 2));
    // Float storage of the corners: relative error ~1e-7.
    CHECK(surface_area(m) == Approx(0.5 * n * std::sin(2 * std::numbers::pi / n)).epsilon(1e-6));
  }
}

TEST_CASE("ASCII PLY face line '0', header 'vertex end_header', coordinate 1e39", "[import][guard]") {
  // Reproducers: Assimp 5.2 aborted (ai_assert in TriangulateProcess.cpp), looped forever, and
  // (issue 13) tried a 33 GB allocation.
  const std::string face0 = write_bytes("face0.ply", ascii_cube_ply("1 0 0", "0"));
  std::string msg = import_error(face0);
  check_one_line(msg, face0);
  CHECK(contains(msg, "PLY face 1 has no corners"));

  std::string header = ascii_cube_ply();
  header.replace(header.find("end_header"), 10, "vertex end_header");
  const std::string hang = write_bytes("vertex_end_header.ply", header);
  msg = import_error(hang);
  check_one_line(msg, hang);
  CHECK(contains(msg, "PLY header line 9 is not understood: 'vertex end_header'"));

  const std::string big = write_bytes("e39.ply", ascii_cube_ply("1e39 0 0"));
  msg = import_error(big);
  check_one_line(msg, big);
  // IEEE 754 single precision: largest finite value (2 − 2⁻²³)·2¹²⁷ ≈ 3.4028e38.
  CHECK(contains(msg, "'1e39' is beyond the single-precision range"));
  // The largest float itself is accepted (as a number; the model is then implausible).
  CHECK_FALSE(contains(import_error(write_bytes("e38.ply", ascii_cube_ply("3.4e38 0 0"))),
                       "single-precision"));
}

TEST_CASE("OFF with a decimal comma, faces without corners or with too many", "[import][guard]") {
  const std::string comma = write_bytes("comma.off", cube_off("1,5 0 0"));
  std::string msg = import_error(comma);
  check_one_line(msg, comma);
  CHECK(contains(msg, "'1,5' is not a number (a decimal comma? write a point)"));

  std::string s = cube_off();
  s.replace(s.find("3 0 2 1"), 7, "0");
  const std::string zero = write_bytes("zero_corners.off", s);
  CHECK(contains(import_error(zero), "(face 1) has no corners"));  // Assimp dropped it silently

  s = cube_off();
  s.replace(s.find("3 0 2 1"), 7, "10 0 1 2 3 4 5 6 7 0 1");
  CHECK(contains(import_error(write_bytes("ten_corners.off", s)), "has 10 corners"));

  s = cube_off();
  s.replace(s.find("3 0 2 1"), 7, "3 0,2 1");
  CHECK(contains(import_error(write_bytes("comma_index.off", s)), "vertex index '0,2' is not an integer"));

  s = cube_off();
  s.insert(s.find("1.0 0.0 0.0"), "# a comment\n");  // Assimp cannot skip it inside the body
  CHECK(contains(import_error(write_bytes("comment.off", s)), "a comment line inside"));

  // A good OFF with blank lines, a comment before the counts and a trailing comment still reads:
  // the unit cube's volume is 1 (closed form).
  s = cube_off();
  s.replace(0, 4, "OFF\n# made by hand\n\n");
  s.replace(s.find("1.0 0.0 0.0"), 11, "1.0 0.0 0.0  # vertex 2\n");
  CHECK(signed_volume(import_meshes({write_bytes("fine.off", s)}, {})) == Approx(1.0).epsilon(1e-12));
}

TEST_CASE("PLY structure: truncated data, wrong value counts, big-endian", "[import][guard]") {
  std::string bin = binary_cube_ply(3, true);
  const std::string cut = write_bytes("cut.ply", bin.substr(0, bin.size() - 5));
  CHECK(contains(import_error(cut), "PLY file ends inside face 12 of its 12"));

  std::string s = ascii_cube_ply("1 0");
  CHECK(contains(import_error(write_bytes("few.ply", s)), "(vertex 2) holds fewer values"));
  s = ascii_cube_ply("1 0 0 1 1 0");
  CHECK(contains(import_error(write_bytes("two_on_a_line.ply", s)), "(vertex 2) holds more values"));
  s = ascii_cube_ply("1 0 0", "3 0 2 1.5");
  CHECK(contains(import_error(write_bytes("float_index.ply", s)), "'1.5' is not an integer"));
  s = ascii_cube_ply("1 0 0", "3 0 2 8");
  CHECK(contains(import_error(write_bytes("index_8.ply", s)), "uses vertex index 8, outside 0..7"));
  s = ascii_cube_ply("1 0 0", "256 0 2 1");
  CHECK(contains(import_error(write_bytes("uchar_256.ply", s)), "outside the range of its type (0 to 255)"));

  // Big-endian binary PLY of the cube reads like the ASCII one: volume 1 (closed form).
  std::string be = ply_header("binary_big_endian", 8, 12);
  const auto put_be = [&](std::uint32_t v) {
    for (int k = 3; k >= 0; --k) be.push_back(static_cast<char>((v >> (8 * k)) & 0xFF));
  };
  for (const auto& v : kCube)
    for (float c : v) {
      std::uint32_t bits;
      std::memcpy(&bits, &c, 4);
      put_be(bits);
    }
  for (const auto& f : kCubeFaces) {
    be.push_back(3);
    for (int k = 0; k < 3; ++k) put_be(static_cast<std::uint32_t>(f[k]));
  }
  const Mesh big = import_meshes({write_bytes("cube_be.ply", be)}, {});
  CHECK(big.triangles.size() == 12);
  CHECK(signed_volume(big) == Approx(1.0).epsilon(1e-12));
  CHECK(signed_volume(import_meshes({write_bytes("cube_ascii.ply", ascii_cube_ply())}, {})) ==
        Approx(1.0).epsilon(1e-12));
}

TEST_CASE("control characters in a PLY header are refused", "[import][guard]") {
  // Found by fuzz/fuzz_import.cpp: "vertex_indices" followed by NUL bytes on its header line.
  // Assimp 5.2 reads the name up to the NUL (its index list) and aborted on a face of 0 corners
  // that the checks had not looked at (for them it was some other list).
  std::string bin = binary_cube_ply(0, true);
  bin.insert(bin.find("vertex_indices") + 14, std::string(8, '\0'));
  const std::string nul = write_bytes("nul_in_header.ply", bin);
  std::string msg = import_error(nul);
  check_one_line(msg, nul);
  CHECK(contains(msg, "PLY header line 8 holds a control character: 'property list uchar int vertex_indices?"));
  // A form feed ends a line for Assimp; inside an ASCII element it is refused, not a separator.
  const std::string ff = write_bytes("form_feed.ply", ascii_cube_ply("1\f0 0"));
  CHECK(contains(import_error(ff), "is not a number"));
}

TEST_CASE("a file is read only by the reader of its extension", "[import][guard]") {
  // Found by fuzz/fuzz_import.cpp: Assimp 5.2 gave a ".gltf" file its glTF reader declined to
  // the reader that recognised the content — here a PLY header the PLY reader hangs on, which
  // the PLY checks never saw (they go by extension).
  std::string ply = ascii_cube_ply();
  ply.replace(ply.find("end_header"), 10, "vertex end_header");
  for (const char* name : {"ply_inside.gltf", "ply_inside.obj", "ply_inside.off"}) {
    const std::string path = write_bytes(name, ply);
    const std::string msg = import_error(path);
    INFO(msg);
    check_one_line(msg, path);
  }
  const std::string gltf = write_bytes("ply_inside.gltf", ply);
  CHECK(contains(import_error(gltf), "not a readable mesh"));
}

// The unit cube as binary glTF (Khronos, glTF 2.0 specification, "GLB File Format
// Specification": 12-byte header "glTF", version, total length; a JSON chunk, then a BIN chunk;
// chunk = uint32 length, uint32 type, data padded to 4 bytes; little-endian).
std::string cube_glb() {
  std::string bin;
  for (const auto& v : kCube)
    for (float c : v) put_f32(bin, c);
  for (const auto& f : kCubeFaces)
    for (int i : f) put_i32(bin, i);
  std::string json =
      R"({"asset":{"version":"2.0"},"scene":0,"scenes":[{"nodes":[0]}],"nodes":[{"mesh":0}],)"
      R"("meshes":[{"primitives":[{"attributes":{"POSITION":0},"indices":1}]}],)"
      R"("buffers":[{"byteLength":240}],"bufferViews":[{"buffer":0,"byteOffset":0,"byteLength":96},)"
      R"({"buffer":0,"byteOffset":96,"byteLength":144}],"accessors":[{"bufferView":0,)"
      R"("componentType":5126,"count":8,"type":"VEC3","min":[0,0,0],"max":[1,1,1]},)"
      R"({"bufferView":1,"componentType":5125,"count":36,"type":"SCALAR"}]})";
  while (json.size() % 4) json += ' ';
  std::string s = "glTF";
  put_i32(s, 2);
  put_i32(s, static_cast<std::int32_t>(12 + 8 + json.size() + 8 + bin.size()));
  put_i32(s, static_cast<std::int32_t>(json.size()));
  s += "JSON";
  s += json;
  put_i32(s, static_cast<std::int32_t>(bin.size()));
  s += std::string("BIN\0", 4);
  return s + bin;
}

TEST_CASE("GLB lengths are checked against the file before Assimp", "[import][guard]") {
  // Found by fuzz/fuzz_import.cpp (this session's hour-long run): a 273-byte GLB whose JSON
  // chunk declares 0xf5fffde0 bytes; Assimp 5.2 zero-fills a buffer of that size first and
  // spent over 10 s (and 4 GB) in memset. Its header bytes are rebuilt here.
  ImportOptions in_process;
  in_process.isolate_reader = false;  // as in the fuzz target: no child to contain it
  const std::string good = cube_glb();
  const std::string ok = write_bytes("cube.glb", good);
  ImportReport report;
  const Mesh cube = import_meshes({ok}, in_process, &report);
  CHECK(cube.triangles.size() == 12);  // the 12 triangles written above
  CHECK(report.input_triangles == 12);

  std::string forged = good.substr(0, 273);
  forged.replace(8, 4, std::string("\xe4\x02\x00\x00", 4));  // total 740 bytes
  forged.replace(12, 4, std::string("\xe0\xfd\xff\xf5", 4)); // JSON chunk of ~4.1 GB
  const std::string fuzz = write_bytes("fuzz_timeout.glb", forged);
  std::string msg = import_error(fuzz, in_process);
  check_one_line(msg, fuzz);
  CHECK(contains(msg, "GLB header declares 740 bytes, more than the file's 273"));

  std::string chunk = good;
  chunk.replace(12, 4, std::string("\xe0\xfd\xff\xf5", 4));  // total length right, chunk not
  const std::string big = write_bytes("big_chunk.glb", chunk);
  msg = import_error(big, in_process);
  check_one_line(msg, big);
  CHECK(contains(msg, "GLB chunk 1 declares 4127194592 bytes, more than the"));  // 0xf5fffde0

  std::string bin_first = good;
  bin_first.replace(16, 4, std::string("BIN\0", 4));
  msg = import_error(write_bytes("bin_first.glb", bin_first), in_process);
  CHECK(contains(msg, "its first chunk is not the JSON chunk"));

  std::string cut = good.substr(0, good.size() - 4);  // BIN chunk 4 bytes short
  const auto total = static_cast<std::uint32_t>(cut.size());  // the header's length made right
  std::memcpy(cut.data() + 8, &total, 4);                      // little-endian host
  msg = import_error(write_bytes("cut.glb", cut), in_process);
  CHECK(contains(msg, "GLB chunk 2 declares 240 bytes, more than the 236 left"));
}

TEST_CASE("OFF line ends that only Assimp's reader sees are refused", "[import][guard]") {
  // Found by fuzz/fuzz_import.cpp (this session's run): a comment line ending in a lone '\r'
  // before the counts. Assimp 5.2 ends a line at '\r' and read "4 4 0" as the counts; the
  // checks skipped the whole comment, took "0 0 0" for them, and a face of 1 corner reached
  // Assimp's triangulation, which aborted (ai_assert TriangulateProcess.cpp(238)). The
  // reproducer's bytes, the mutated comment shortened:
  const std::string bytes = "OFF\n# seed\r4 4 0\n0 0 0\n1 1 0 4 0\n0 0 0\n1 0 0\n\n13\n3 0 3 2\n1 1 2 3\n";
  ImportOptions in_process;
  in_process.isolate_reader = false;  // as in the fuzz target: an abort would end this test
  const std::string path = write_bytes("lone_cr.off", bytes);
  const std::string msg = import_error(path, in_process);
  check_one_line(msg, path);
  CHECK(contains(msg, "OFF line 2 holds a carriage return not followed by a line feed"));
  // A form feed likewise; "\r\n" line ends stay accepted (the cube reads as 12 triangles).
  CHECK(contains(import_error(write_bytes("ff.off", "OFF\n# a\fb\n" + cube_off().substr(4)), in_process),
                 "OFF line 2 holds a form feed"));
  std::string crlf;
  for (char c : cube_off()) crlf += c == '\n' ? std::string("\r\n") : std::string(1, c);
  CHECK(import_meshes({write_bytes("crlf.off", crlf)}, in_process).triangles.size() == 12);
}

TEST_CASE("a one-bit flip in an ASCII STL gives a short one-line message", "[import][guard]") {
  const Mesh sphere = test::make_sphere({0, 0, 0}, 1.0, 30, 60);
  const std::string good = test::write_stl_ascii(sphere, "flip_source.stl");
  std::string text = test::read_file(good);
  const std::size_t at = text.find("vertex ", text.size() / 2) + 7;
  text[at] = static_cast<char>(text[at] ^ 0x40);  // one bit: '0'..'9' → 'p'..'y', '-' → 'm'
  const std::string path = write_bytes("flipped.stl", text);
  const std::string msg = import_error(path);
  check_one_line(msg, path);
  CHECK(contains(msg, "not a readable mesh"));
}

TEST_CASE("Assimp's messages are trimmed to one short line", "[import][guard]") {
  // Issue 13: a 63,342-character quote of the file on one line.
  const std::string quote(63342, 'x');
  const std::string msg = detail::tidy_message("Cannot parse string \"" + quote +
                                               "\" as a real number.\nsecond line\n");
  CHECK(msg.find('\n') == std::string::npos);
  CHECK(msg.size() <= 203);
  CHECK(msg.rfind("Cannot parse string \"" + std::string(60, 'x') + "...\"", 0) == 0);
  CHECK(detail::tidy_message("a\tb\r\n  c") == "a b c");
  CHECK(detail::tidy_message("short \"quoted\" part") == "short \"quoted\" part");
}

// ------------------------------------------------------------------ reader isolation --

namespace {

struct IsolatedResult {
  std::string error;  // "" when it succeeded
  std::vector<std::byte> result;
  detail::ReadCounts counts;
};

IsolatedResult run_isolated(const detail::IsolatedReader& reader, detail::ReaderLimits limits = {}) {
  if (limits.seconds == 0) {
    const bool pipe = limits.through_pipe;
    limits = detail::default_reader_limits(1000);
    limits.through_pipe = pipe;
  }
  IsolatedResult r;
  try {
    detail::read_isolated("model.test", "TEST", limits, reader,
                          [&](const detail::ResultSource& result, const detail::ReadCounts& counts) {
                            // in three pieces of uneven size: the reads need not follow the parts
                            r.result.resize(result.size);
                            const std::size_t a = result.size / 3, b = result.size - a - 5;
                            if (result.size >= 5) {
                              result.read(r.result.data(), a);
                              result.read(r.result.data() + a, b);
                              result.read(r.result.data() + a + b, 5);
                            } else {
                              result.read(r.result.data(), result.size);
                            }
                            r.counts = counts;
                          });
  } catch (const InputError& e) {
    r.error = e.what();
  }
  return r;
}

double pattern(std::size_t i) { return 0.1 * static_cast<double>(i) - 1.0 / (1.0 + static_cast<double>(i)); }

}  // namespace

TEST_CASE("isolated reader: the result comes back exactly", "[import][guard][isolation]") {
  const std::size_t n = 900000;  // 7.2 MB of doubles
  const auto reader = [&](const detail::ResultStore& store) {
    // Kept for the child's exit, as the readers do: the parent copies from here after this returns.
    auto* out = new std::vector<double>(n);
    for (std::size_t i = 0; i < n; ++i) (*out)[i] = pattern(i);
    static const std::string tail = "end";  // a second part follows the first
    store({std::as_bytes(std::span(*out)), std::as_bytes(std::span(tail))});
    return detail::ReadCounts{n, 7};
  };
  // Straight from the child's memory, and through the pipe (where the system refuses that).
  for (const bool pipe : {false, true}) {
    detail::ReaderLimits limits;
    limits.through_pipe = pipe;
    const IsolatedResult r = run_isolated(reader, limits);
    REQUIRE(r.error.empty());
    REQUIRE(r.result.size() == n * sizeof(double) + 3);
    CHECK(std::memcmp(r.result.data() + n * sizeof(double), "end", 3) == 0);
    bool same = true;  // bitwise: raw bytes through the pipe, no text conversion
    for (std::size_t i = 0; i < n; ++i) {
      const double want = pattern(i);
      same = same && std::memcmp(r.result.data() + i * sizeof(double), &want, sizeof want) == 0;
    }
    CHECK(same);
    CHECK(r.counts.vertices_read == n);
    CHECK(r.counts.ignored_primitives == 7);
  }
  const IsolatedResult none = run_isolated([](const detail::ResultStore& store) {
    store({});
    return detail::ReadCounts{5, 0};
  });
  CHECK(none.error.empty());
  CHECK(none.result.empty());
  CHECK(none.counts.vertices_read == 5);
}

TEST_CASE("isolated reader: crash, abort, hang and runaway allocation become one line",
          "[import][guard][isolation]") {
  const IsolatedResult segv = run_isolated([](const detail::ResultStore&) -> detail::ReadCounts {
    ::raise(SIGSEGV);
    return {};
  });
  CHECK(segv.error == "model.test: the TEST reader failed (signal 11, SIGSEGV)");

  const IsolatedResult abrt = run_isolated([](const detail::ResultStore&) -> detail::ReadCounts {
    std::fprintf(stderr, "ai_assert failure in TriangulateProcess.cpp(238): numOut != mNumFaces\n");
    std::abort();
  });
  CHECK(contains(abrt.error, "model.test: the TEST reader failed (signal 6, SIGABRT"));
  if (!UNDER_ASAN)  // a sanitizer build leaves the child's stderr alone
    CHECK(contains(abrt.error, "SIGABRT: ai_assert failure in TriangulateProcess.cpp(238)"));

  detail::ReaderLimits one_second{1ull << 30, 1.0};
  const IsolatedResult hang = run_isolated(
      [](const detail::ResultStore&) -> detail::ReadCounts {
        volatile unsigned long spins = 0;
        for (;;) spins = spins + 1;
      },
      one_second);
  CHECK(hang.error == "model.test: the TEST reader failed (took longer than 1 s of processor time)");

  const IsolatedResult sleepy = run_isolated(
      [](const detail::ResultStore&) -> detail::ReadCounts {
        for (;;) ::pause();  // no processor time used: the parent's wall clock ends it
      },
      detail::ReaderLimits{1ull << 30, 30.0, 0.5});
  CHECK(sleepy.error == "model.test: the TEST reader failed (took longer than 0.5 s)");

  const IsolatedResult oom = run_isolated(
      [](const detail::ResultStore&) -> detail::ReadCounts {
        std::vector<char> huge(std::size_t{64} << 30, 1);  // 64 GiB, over the 0.5 GiB limit
        return {huge.size(), 0};
      },
      detail::ReaderLimits{512ull << 20, 30.0});
  CHECK(contains(oom.error, "model.test: the TEST reader failed ("));
  if (!UNDER_ASAN)  // ASan's allocator reports and aborts instead of throwing std::bad_alloc
    CHECK(oom.error == "model.test: the TEST reader failed (out of memory: over the 0.537 GB limit)");
}

TEST_CASE("isolated reader: its own errors come back as they were", "[import][guard][isolation]") {
  const IsolatedResult input = run_isolated([](const detail::ResultStore&) -> detail::ReadCounts {
    throw InputError("model.test", "face 3 uses vertex index 9, outside the 8 vertices");
  });
  CHECK(input.error == "model.test: face 3 uses vertex index 9, outside the 8 vertices");
  const IsolatedResult other = run_isolated([](const detail::ResultStore&) -> detail::ReadCounts {
    throw std::runtime_error("unexpected\nthing");
  });
  CHECK(other.error == "model.test: the TEST reader failed (unexpected thing)");
}

TEST_CASE("isolated and in-process reading give the same mesh", "[import][guard][isolation]") {
  const Mesh torus = test::make_torus(0.0, 2.0, 0.5, 24, 12);
  for (const std::string& path : {test::write_obj(torus, "iso_torus.obj"),
                                  test::write_stl_ascii(torus, "iso_torus.stl")}) {
    ImportOptions inside;
    inside.isolate_reader = false;
    const Mesh a = import_meshes({path}, {});
    const Mesh b = import_meshes({path}, inside);
    CHECK(a.positions.size() == torus.positions.size());
    CHECK(a.triangles == b.triangles);
    CHECK(std::memcmp(a.positions.data(), b.positions.data(), a.positions.size() * sizeof(Vec3)) == 0);
    CHECK(a.shell_names == b.shell_names);
  }
}

TEST_CASE("isolated reader: the child is reaped, no zombie stays", "[import][guard][isolation]") {
  // The children of this process's threads, as the kernel lists them (a zombie stays listed
  // until it is reaped).
  const auto children = [] {
    std::string all;
    for (const auto& task : std::filesystem::directory_iterator("/proc/self/task")) {
      std::ifstream in(task.path() / "children");
      all += std::string(std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>());
    }
    return all;
  };
  const std::string before = children();
  const Mesh torus = test::make_torus(0.0, 2.0, 0.5, 24, 12);
  const std::string path = test::write_obj(torus, "reaped_torus.obj");
  for (int i = 0; i < 3; ++i) CHECK(import_meshes({path}, {}).triangles.size() == torus.triangles.size());
  CHECK(run_isolated([](const detail::ResultStore&) -> detail::ReadCounts {
          throw InputError("model.test", "refused");
        }).error == "model.test: refused");
  CHECK(children() == before);  // reaped before import_meshes and read_isolated return
}

// Tests of STL storage detection and the direct binary-STL reader
// (slicing/intake/stl_reader.cpp) against the binary STL layout: an 80-byte header, a
// little-endian uint32 triangle count, then 50 bytes per triangle — 12 little-endian float32
// (normal, three corners) and a uint16 attribute word (3D Systems, StereoLithography Interface
// Specification, 1989 (from memory); common practice). Files are written byte by byte here.
#include <catch2/catch.hpp>

#include <array>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "../../slicing/intake/import_detail.h"
#include "machcut/common/errors.h"
#include "machcut/intake/import.h"
#include "test_support.h"

using namespace machcut;
using Catch::Matchers::Contains;
using machcut::detail::StlKind;
using machcut::test::temp_path;

namespace {

// IEEE 754 binary32 bit patterns (IEEE 754-2008, §3.4), written as bytes so the test does not
// depend on the host's float encoding.
constexpr std::uint32_t kOne = 0x3F800000;           // 1.0f
constexpr std::uint32_t kOneAndHalf = 0x3FC00000;    // 1.5f
constexpr std::uint32_t kMinusQuarter = 0xBE800000;  // −0.25f
constexpr std::uint32_t kThree = 0x40400000;         // 3.0f
constexpr std::uint32_t kFloatMax = 0x7F7FFFFF;      // 3.4028235e38f, the largest finite float
constexpr std::uint32_t kDenormMin = 0x00000001;     // 2⁻¹⁴⁹, the smallest subnormal float
constexpr std::uint32_t kQuietNaN = 0x7FC00000;
constexpr std::uint32_t kPlusInf = 0x7F800000;
constexpr std::uint32_t kZero = 0x00000000;

void put_u32_le(std::string& s, std::uint32_t v) {
  for (int i = 0; i < 4; ++i) s.push_back(static_cast<char>((v >> (8 * i)) & 0xFF));
}

// One 50-byte record: normal (3 words), corners (9 words), attribute word.
std::string record(const std::array<std::uint32_t, 3>& normal,
                   const std::array<std::uint32_t, 9>& corners, std::uint16_t attribute = 0) {
  std::string s;
  for (std::uint32_t w : normal) put_u32_le(s, w);
  for (std::uint32_t w : corners) put_u32_le(s, w);
  s.push_back(static_cast<char>(attribute & 0xFF));
  s.push_back(static_cast<char>(attribute >> 8));
  return s;
}

std::string header(const std::string& text, std::uint32_t count) {
  std::string s(80, '\0');
  s.replace(0, text.size(), text);
  put_u32_le(s, count);
  return s;
}

// A plain triangle (0,0,0) (1,0,0) (0,1,0) with a zero normal.
std::string plain_record() {
  return record({kZero, kZero, kZero},
                {kZero, kZero, kZero, kOne, kZero, kZero, kZero, kOne, kZero});
}

std::string write_bytes(const std::string& name, const std::string& bytes) {
  const std::string path = temp_path(name);
  std::ofstream(path, std::ios::binary) << bytes;
  return path;
}

std::uint64_t file_size(const std::string& path) {
  return std::filesystem::file_size(path);
}

// classify_stl's InputError message ("" when it does not throw).
std::string classify_error(const std::string& path) {
  try {
    detail::classify_stl(path, file_size(path));
  } catch (const InputError& e) {
    CHECK(e.source() == path);
    return e.what();
  }
  return "";
}

std::vector<std::array<Vec3, 3>> read_all(const std::string& path, std::uint64_t size) {
  std::vector<std::array<Vec3, 3>> out;
  detail::read_binary_stl(path, size, [&](const Vec3* c) { out.push_back({c[0], c[1], c[2]}); });
  return out;
}

std::string read_error(const std::string& path, std::uint64_t size) {
  try {
    read_all(path, size);
  } catch (const InputError& e) {
    CHECK(e.source() == path);
    return e.what();
  }
  return "";
}

}  // namespace

// ----------------------------------------------------------------------- classify_stl --

TEST_CASE("binary STL is recognised by its size, whatever its header says", "[stl]") {
  // 84 + 50 n bytes with n in the header is binary — also a header starting with "solid",
  // which many exporters write (common practice).
  for (const std::string text : {"binary", "solid cube exported by a CAD tool", ""}) {
    const std::string bytes = header(text, 2) + plain_record() + plain_record();
    REQUIRE(bytes.size() == 84 + 2 * 50);
    const std::string path = write_bytes("cls_bin.stl", bytes);
    INFO("header '" << text << "'");
    CHECK(detail::classify_stl(path, file_size(path)) == StlKind::binary);
  }
  // No triangles: the 84-byte header alone is a (binary) STL of 0 triangles.
  const std::string empty = write_bytes("cls_zero.stl", header("solid nothing", 0));
  CHECK(detail::classify_stl(empty, 84) == StlKind::binary);
}

TEST_CASE("ASCII STL: \"solid\" first, plain text", "[stl]") {
  // ASCII STL begins with the keyword "solid" (common practice); leading white space and a
  // UTF-8 name are still text.
  const std::string facet =
      "facet normal 0 0 1\n outer loop\n  vertex 0 0 0\n  vertex 1 0 0\n  vertex 0 1 0\n"
      " endloop\nendfacet\n";
  for (const std::string start :
       {"solid a\n", "  \r\n\tsolid indented\n", "solid Flügel\n", "solid\n"}) {
    const std::string path = write_bytes("cls_ascii.stl", start + facet + "endsolid\n");
    INFO(start);
    CHECK(detail::classify_stl(path, file_size(path)) == StlKind::ascii);
  }
}

TEST_CASE("bad STL sizes and contents: one line naming the file", "[stl][errors]") {
  const std::string two = header("solid but binary", 2) + plain_record() + plain_record();
  struct Case {
    std::string name, bytes, expect;
  };
  std::string nul_text = "solid x\nfacet normal 0 0 0\n";
  nul_text += std::string(1, '\0') + "outer loop\n";  // a NUL byte: not ASCII STL
  const std::vector<Case> cases = {
      {"bad_trunc.stl", two.substr(0, two.size() - 1),
       "truncated binary STL: 183 bytes is not 84 + 50 x a whole number of triangles (header "
       "declares 2)"},
      {"bad_over.stl", header("x", 5) + plain_record() + plain_record(),
       "binary STL header triangle count 5 is larger than the file (184 bytes hold 2 triangles)"},
      {"bad_trailing.stl", two + plain_record(),
       "binary STL has 50 bytes after the 2 triangles its header declares"},
      {"bad_short.stl", std::string(40, '\x01'),
       "truncated binary STL: 40 bytes, shorter than the 84-byte header (and not ASCII STL)"},
      {"bad_text.stl", "just some words, no mesh here\n", "not an STL file"},
      {"bad_nul.stl", nul_text, "truncated binary STL"},
  };
  for (const Case& c : cases) {
    const std::string path = write_bytes(c.name, c.bytes);
    const std::string msg = classify_error(path);
    INFO(c.name << " -> " << msg);
    CHECK(msg.rfind(path + ": ", 0) == 0);
    CHECK_THAT(msg, Contains(c.expect));
    CHECK(msg.find('\n') == std::string::npos);
  }
  const std::string missing = temp_path("no_such_stl_file.stl");
  std::filesystem::remove(missing);
  try {
    detail::classify_stl(missing, 100);
    FAIL("no error for a missing file");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) == missing + ": cannot open the file for reading");
  }
}

// -------------------------------------------------------------------- read_binary_stl --

TEST_CASE("records decode as little-endian float32 corners, in file order", "[stl]") {
  // The bit patterns above, read back as the doubles they denote exactly (every float is a
  // double). The normal words and the attribute word are ignored, even when the normal is NaN.
  const std::string bytes =
      header("binary", 2) +
      record({kQuietNaN, kPlusInf, kOne},
             {kOneAndHalf, kMinusQuarter, kThree, kFloatMax, kDenormMin, kZero, kOne, kOne, kOne},
             0xBEEF) +
      record({kZero, kZero, kOne},
             {kThree, kZero, kZero, kZero, kThree, kZero, kZero, kZero, kThree});
  const std::string path = write_bytes("rd_values.stl", bytes);
  const auto t = read_all(path, file_size(path));
  REQUIRE(t.size() == 2);
  CHECK(t[0][0].x == 1.5);
  CHECK(t[0][0].y == -0.25);
  CHECK(t[0][0].z == 3.0);
  CHECK(t[0][1].x == 3.4028234663852886e38);  // (2 − 2⁻²³) · 2¹²⁷
  CHECK(t[0][1].y == std::ldexp(1.0, -149));
  CHECK(t[0][1].z == 0.0);
  CHECK(t[0][2].x == 1.0);
  CHECK(t[1][0].x == 3.0);
  CHECK(t[1][1].y == 3.0);
  CHECK(t[1][2].z == 3.0);
  CHECK(t[1][2].x == 0.0);
}

TEST_CASE("a header of 0 triangles reads nothing", "[stl][degenerate]") {
  const std::string path = write_bytes("rd_zero.stl", header("solid", 0));
  CHECK(read_all(path, 84).empty());
}

TEST_CASE("NaN or infinite corners name the triangle, also past a 64k-record chunk",
          "[stl][errors]") {
  // The triangle number is 1-based in file order; 65 536 + 3 records cross the reader's first
  // chunk (stl_reader.cpp reads 64k records at a time).
  for (std::uint32_t bad : {kQuietNaN, kPlusInf, kPlusInf | 0x80000000u}) {
    const std::string small =
        header("b", 3) + plain_record() +
        record({kZero, kZero, kZero}, {kZero, kZero, kZero, kOne, bad, kZero, kZero, kOne, kZero}) +
        plain_record();
    const std::string path = write_bytes("rd_nan.stl", small);
    const std::string msg = read_error(path, file_size(path));
    CHECK(msg == path + ": NaN or infinite coordinate in triangle 2");
  }
  const std::uint32_t n = 65536 + 3;
  std::string big = header("b", n);
  big.reserve(84 + 50ull * n);
  for (std::uint32_t i = 0; i < n; ++i)
    big += i == 65537 ? record({kZero, kZero, kZero},
                               {kZero, kZero, kZero, kOne, kZero, kZero, kZero, kOne, kQuietNaN})
                      : plain_record();
  const std::string path = write_bytes("rd_nan_big.stl", big);
  REQUIRE(detail::classify_stl(path, file_size(path)) == StlKind::binary);
  CHECK(read_error(path, file_size(path)) ==
        path + ": NaN or infinite coordinate in triangle 65538");
}

TEST_CASE("every record of a file larger than one chunk is delivered once", "[stl]") {
  // 70 000 records, corner x = record index (exact in float below 2²⁴): all arrive, in order.
  const std::uint32_t n = 70000;
  std::string bytes = header("b", n);
  for (std::uint32_t i = 0; i < n; ++i) {
    const float fx = static_cast<float>(i);
    std::uint32_t wx;
    std::memcpy(&wx, &fx, 4);
    bytes +=
        record({kZero, kZero, kZero}, {wx, kZero, kZero, kOne, kOne, kZero, kZero, kOne, kOne});
  }
  const std::string path = write_bytes("rd_many.stl", bytes);
  const auto t = read_all(path, file_size(path));
  REQUIRE(t.size() == n);
  bool in_order = true;
  for (std::uint32_t i = 0; i < n; ++i) in_order = in_order && t[i][0].x == static_cast<double>(i);
  CHECK(in_order);
}

TEST_CASE("a file shorter than the size it was accepted with is a read error", "[stl][errors]") {
  // The file changed (or was cut) after classify_stl: the reader reports it, never reads past.
  const std::string path =
      write_bytes("rd_short.stl", header("b", 2) + plain_record() + plain_record());
  const std::string msg = read_error(path, 84 + 3 * 50);
  CHECK_THAT(msg, Contains(path) && Contains("read error in triangle"));
}

// ------------------------------------------------------------------ through the import --

TEST_CASE("import of a binary STL: the tetrahedron of the bytes, NaN refused", "[stl][import]") {
  // Unit right tetrahedron, outward (counter-clockwise from outside): volume 1/6 (closed form),
  // 4 vertices after the weld; header starting with "solid" to exercise the size rule.
  auto corner_words = [](int a, int b, int c) {
    const std::uint32_t w[4][3] = {
        {kZero, kZero, kZero}, {kOne, kZero, kZero}, {kZero, kOne, kZero}, {kZero, kZero, kOne}};
    return std::array<std::uint32_t, 9>{w[a][0], w[a][1], w[a][2], w[b][0], w[b][1],
                                        w[b][2], w[c][0], w[c][1], w[c][2]};
  };
  const std::string tet = header("solid tetra", 4) + record({}, corner_words(0, 2, 1)) +
                          record({}, corner_words(0, 1, 3)) + record({}, corner_words(0, 3, 2)) +
                          record({}, corner_words(1, 2, 3));
  const std::string path = write_bytes("imp_tetra.stl", tet);
  ImportReport r;
  const Mesh m = import_meshes({path}, {}, &r);
  CHECK(m.positions.size() == 4);
  CHECK(m.triangles.size() == 4);
  CHECK(r.input_triangles == 4);
  CHECK(r.input_corners == 12);
  CHECK(signed_volume(m) == Approx(1.0 / 6.0).epsilon(1e-15));
  CHECK(m.shell_names == std::vector<std::string>{"imp_tetra.stl"});
  // The same bytes with a NaN corner: refused by the import, one line naming the file.
  std::string bad = tet;
  const std::size_t at = 84 + 3 * 50 + 12 + 4;  // 4th record, first corner, y
  bad.replace(at, 4, std::string("\x00\x00\xc0\x7f", 4));
  const std::string bad_path = write_bytes("imp_tetra_nan.stl", bad);
  try {
    import_meshes({bad_path}, {});
    FAIL("NaN accepted");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) == bad_path + ": NaN or infinite coordinate in triangle 4");
  }
}

// Tests of the end treatment (slicing/drag/ends.cpp): the far station, the wake and capture
// tubes behind flat faces (prisms, checked by closed forms and by the section engine's areas)
// and the naming of captured shells.
#include <catch2/catch.hpp>

#include <cmath>
#include <map>
#include <numbers>
#include <set>
#include <utility>

#include "machcut/common/errors.h"
#include "machcut/drag/ends.h"
#include "machcut/sections/section.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::Contains;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {

// Area of a regular n-gon of circumradius r: n/2 r² sin(2π/n) (elementary geometry).
double ngon_area(double r, int n) {
  return 0.5 * n * r * r * std::sin(2 * std::numbers::pi / n);
}

// Closed and consistently oriented: every directed edge once, its reverse once (counted here
// with a map, independently of ends.cpp).
bool consistently_oriented(const Mesh& m) {
  std::map<std::pair<std::uint32_t, std::uint32_t>, int> directed;
  for (const Tri& t : m.triangles)
    for (int k = 0; k < 3; ++k) ++directed[{t[k], t[(k + 1) % 3]}];
  for (const auto& [e, n] : directed) {
    auto it = directed.find({e.second, e.first});
    if (n != 1 || it == directed.end() || it->second != 1) return false;
  }
  return !m.triangles.empty();
}

// Rotation by `rad` about the z axis (tilts faces normal to x).
Mesh rotate_about_z(Mesh m, double rad) {
  const double c = std::cos(rad), s = std::sin(rad);
  for (Vec3& p : m.positions) p = {c * p.x - s * p.y, s * p.x + c * p.y, p.z};
  return m;
}

Mesh with_names(std::vector<std::string> names) {
  Mesh m;
  m.shell_names = std::move(names);
  return m;
}

// The InputError message of capture_shells (and its source), or "" when it does not throw.
std::string capture_error(const Mesh& m, const std::string& name, std::set<std::uint32_t>& taken,
                          std::string* source = nullptr) {
  try {
    capture_shells(m, name, taken);
  } catch (const InputError& e) {
    if (source) *source = e.source();
    return e.what();
  }
  return "";
}

}  // namespace

// ----------------------------------------------------------------------- far_station --

TEST_CASE("far station: the formula, and beyond every Mach plane up to M 20 that meets the model",
          "[ends]") {
  // Header formula x_max + 2·20·r_max + l. Why it is far enough: a Mach plane through a model
  // point p has station p.x − β(p.y cos θ + p.z sin θ) <= x_max + β r_max, and a point of a
  // tube's far cap (radius <= r_max) has station >= x_far − β r_max; β = √(M² − 1) < 20 up to
  // M = 20 (Jones, NACA Report 1284, 1956, for the planes).
  const Mesh box = make_box({-1, -1, -0.5}, {4, 1, 0.5});
  const double x_far = far_station(box);
  CHECK_THAT(x_far, WithinRel(4.0 + 40.0 * std::hypot(1.0, 0.5) + 5.0, 1e-15));
  const Tubes wake = flat_face_tubes(box, +1, x_far);
  REQUIRE(wake.faces == 2);
  for (double mach : {1.0, 1.2, 2.0, 5.0, 20.0})
    for (double roll : {0.0, 30.0, 90.0, 180.0, 270.0}) {
      double model_max = -HUGE_VAL, cap_min = HUGE_VAL;
      for (const Vec3& p : box.positions)
        model_max = std::fmax(model_max, station_of(p, {mach, roll}));
      for (const Vec3& p : wake.mesh.positions)
        if (p.x == x_far) cap_min = std::fmin(cap_min, station_of(p, {mach, roll}));
      INFO("M " << mach << " roll " << roll);
      CHECK(model_max < cap_min);
    }
}

// ------------------------------------------------------------------- flat_face_tubes --

TEST_CASE("wake behind a cylinder's flat base: a prism of the base's n-gon area", "[ends][wake]") {
  // Source: the base of an n-gon cylinder is a regular n-gon, area A = n/2 r² sin(2π/n); the
  // wake is the right prism on it from the base (x = L) to x_far: volume A (x_far − L), every
  // section across it A (elementary geometry). Tolerance: rounding of ~n terms.
  const double r = 0.75, l = 6.0;
  const int n = 48;
  const Mesh body = make_body_of_revolution({0.0, l}, {r, r}, n);
  const double a = ngon_area(r, n), x_far = far_station(body);
  const Tubes w = flat_face_tubes(body, +1, x_far);
  CHECK(w.faces == n);  // the base fan
  CHECK_THAT(w.face_area, WithinRel(a, 1e-13));
  REQUIRE(w.mesh.shell_names == std::vector<std::string>{"wake"});
  CHECK(w.mesh.shell == std::vector<std::uint32_t>(w.mesh.triangles.size(), 0));
  CHECK(consistently_oriented(w.mesh));
  CHECK(w.mesh.triangles.size() == 4 * static_cast<std::size_t>(n));     // 2 caps + 2n walls
  CHECK_THAT(signed_volume(w.mesh), WithinRel(a * (x_far - l), 1e-12));  // outward
  const Box3 b = bounding_box(w.mesh);
  CHECK(b.lo.x == l);
  CHECK(b.hi.x == x_far);
  // Sections: A across the wake at M = 1, and for an oblique Mach plane that crosses it whole
  // (the projection on the normal plane of a cut through a prism along x is its section).
  const SectionEngine wake(w.mesh);
  for (double area :
       wake.areas({1.0, 0.0}, std::vector<double>{l + 1.0, 0.5 * (l + x_far), x_far - 1.0}))
    CHECK_THAT(area, WithinRel(a, 1e-12));
  const double beta = std::sqrt(1.5 * 1.5 - 1.0);
  const std::vector<double> oblique{l + beta * r + 1.0, x_far - beta * r - 1.0};
  for (double area : wake.areas({1.5, 30.0}, oblique)) CHECK_THAT(area, WithinRel(a, 1e-9));
  // Model + wake: the area stays A past the base instead of dropping to 0 (the purpose).
  const SectionEngine both(concatenate({body, w.mesh}));
  for (double area : both.areas({1.0, 0.0}, std::vector<double>{0.5 * l, l + 0.5, l + 20.0}))
    CHECK_THAT(area, WithinRel(a, 1e-12));
  for (double area : both.areas({1.0, 0.0}, std::vector<double>{-1.0, x_far + 1.0}))
    CHECK_THAT(area, WithinAbs(0.0, 1e-15));
}

TEST_CASE("capture behind a cylinder's flat inlet: inward, −A from the inlet to x_far",
          "[ends][capture]") {
  // Source: as above for the front face (normal −x); the capture is inward, so its volume is
  // −A (x_far − 0) and its sections −A. Body + capture + wake is a flow-through duct of
  // constant area: it displaces nothing at any station (common practice), also along an
  // oblique Mach plane that stays within the tubes.
  const double r = 0.4, l = 3.0;
  const int n = 40;
  const Mesh body = make_body_of_revolution({0.0, l}, {r, r}, n);
  const double a = ngon_area(r, n), x_far = far_station(body);
  const Tubes c = flat_face_tubes(body, -1, x_far);
  CHECK(c.faces == n);
  CHECK_THAT(c.face_area, WithinRel(a, 1e-13));
  REQUIRE(c.mesh.shell_names == std::vector<std::string>{"capture"});
  CHECK(consistently_oriented(c.mesh));
  CHECK_THAT(signed_volume(c.mesh), WithinRel(-a * x_far, 1e-12));
  const SectionEngine capture(c.mesh);
  for (double area : capture.areas({1.0, 0.0}, std::vector<double>{0.5, l + 1.0}))
    CHECK_THAT(area, WithinRel(-a, 1e-12));
  const Tubes w = flat_face_tubes(body, +1, x_far);
  const SectionEngine duct(concatenate({body, c.mesh, w.mesh}));
  const double beta = std::sqrt(1.3 * 1.3 - 1.0);
  for (double x : {0.5 * l, l + 10.0}) {
    CHECK_THAT(duct.areas({1.0, 0.0}, std::vector<double>{x})[0], WithinAbs(0.0, 1e-12));
    CHECK_THAT(duct.areas({1.3, 60.0}, std::vector<double>{x + beta * r + 1.0})[0],
               WithinAbs(0.0, 1e-12));
  }
}

TEST_CASE("a stepped body: the base annulus and the aft cap keep the area at its maximum",
          "[ends][wake]") {
  // Source: a radius-R cylinder stepping down to radius ρ at x = 2 has a flat aft annulus of
  // area A(R) − A(ρ) and an aft cap A(ρ) at x = 4 (regular n-gons, elementary geometry);
  // model + wakes then has area A(R) at every station from the step to x_far.
  const int n = 32;
  const double big = 1.0, small = 0.5;
  const Mesh body = make_body_of_revolution({0.0, 2.0, 2.0, 4.0}, {big, big, small, small}, n);
  const double x_far = far_station(body);
  const Tubes w = flat_face_tubes(body, +1, x_far);
  CHECK(w.faces == 3 * n);  // 2n triangles of the annulus band, n of the cap fan
  CHECK_THAT(w.face_area, WithinRel(ngon_area(big, n), 1e-13));
  CHECK(consistently_oriented(w.mesh));
  CHECK_THAT(signed_volume(w.mesh),
             WithinRel((ngon_area(big, n) - ngon_area(small, n)) * (x_far - 2.0) +
                           ngon_area(small, n) * (x_far - 4.0),
                       1e-12));
  const SectionEngine both(concatenate({body, w.mesh}));
  for (double area : both.areas({1.0, 0.0}, std::vector<double>{1.0, 3.0, 5.0, x_far - 1.0}))
    CHECK_THAT(area, WithinRel(ngon_area(big, n), 1e-12));
  // No face of this body faces upstream except the nose cap: one capture prism of A(R).
  const Tubes c = flat_face_tubes(body, -1, x_far);
  CHECK(c.faces == n);
  CHECK_THAT(c.face_area, WithinRel(ngon_area(big, n), 1e-13));
}

TEST_CASE("a face split in two triangles gets walls on its outline only", "[ends][wake]") {
  // Source: a box's aft face is one rectangle b × c in two triangles; its prism to x_far is a
  // box: 8 vertices, 12 triangles (walls along the 4 outer edges, none on the diagonal),
  // volume b c (x_far − x_face) (elementary geometry).
  const Mesh box = make_box({0, 0, 0}, {2, 3, 0.5});
  const Tubes w = flat_face_tubes(box, +1, 10.0);
  CHECK(w.faces == 2);
  CHECK(w.mesh.positions.size() == 8);
  CHECK(w.mesh.triangles.size() == 12);
  CHECK(consistently_oriented(w.mesh));
  CHECK_THAT(signed_volume(w.mesh), WithinRel(1.5 * 8.0, 1e-14));
  CHECK_THAT(surface_area(w.mesh), WithinRel(2 * 1.5 + 2 * (3.0 + 0.5) * 8.0, 1e-14));
}

TEST_CASE("no flat face: no tube, and slightly tilted faces are not flat", "[ends][degenerate]") {
  // A sphere and a cone have no face normal to x; a closed sphere gives an empty result.
  for (const Mesh& m : {make_sphere({0, 0, 0}, 1.0, 12, 24),
                        make_body_of_revolution({0.0, 1.0, 2.0}, {0.0, 0.5, 0.0}, 24)})
    for (int sign : {+1, -1}) {
      const Tubes t = flat_face_tubes(m, sign, 50.0);
      CHECK(t.faces == 0);
      CHECK(t.face_area == 0.0);
      CHECK(t.mesh.triangles.empty());
      CHECK(t.mesh.positions.empty());
    }
  CHECK(flat_face_tubes(Mesh{}, +1, 1.0).faces == 0);
  // Header: "within 1e-9 of +x" on the unit normal's x component. A tilt of 1e-4 rad leaves
  // n.x = cos(1e-4) = 1 − 5e-9: not flat; 1e-5 rad leaves 1 − 5e-11: flat (Taylor series of cos).
  const Mesh cyl = make_body_of_revolution({0.0, 2.0}, {0.5, 0.5}, 24);
  CHECK(flat_face_tubes(rotate_about_z(cyl, 1e-4), +1, 50.0).faces == 0);
  CHECK(flat_face_tubes(rotate_about_z(cyl, 1e-5), +1, 50.0).faces == 24);
  // A zero-area (degenerate) triangle has no normal and is never extruded.
  Mesh sliver;
  sliver.positions = {{1, 0, 0}, {1, 1, 0}, {1, 2, 0}};
  sliver.triangles = {{0, 1, 2}};
  sliver.shell = {0};
  sliver.shell_names = {"sliver"};
  CHECK(flat_face_tubes(sliver, +1, 5.0).faces == 0);
}

// -------------------------------------------------------------------- capture_shells --

TEST_CASE("capture names: FILE#k, every shell of FILE, the path or the file name",
          "[ends][capture]") {
  // Shell names as import_meshes gives them (import.h): "FILE#k" for a file of several shells,
  // "FILE" alone for one; FILE the file name without its folder.
  const Mesh m =
      with_names({"fuselage.obj", "nacelles.obj#1", "nacelles.obj#2", "wing.obj#1", "wing.obj#2"});
  using V = std::vector<std::uint32_t>;
  {
    std::set<std::uint32_t> taken;
    CHECK(capture_shells(m, "nacelles.obj", taken) == V{1, 2});
    CHECK(taken == std::set<std::uint32_t>{1, 2});
    CHECK(capture_shells(m, "fuselage.obj", taken) == V{0});
    CHECK(capture_shells(m, "wing.obj#2", taken) == V{4});
    CHECK(taken == std::set<std::uint32_t>{0, 1, 2, 4});
  }
  {
    // The path of the file as given on the command line (header: "given as the path or the
    // file name alone").
    std::set<std::uint32_t> taken;
    CHECK(capture_shells(m, "models/demo/nacelles.obj", taken) == V{1, 2});
  }
  {
    // Shell names that carry a folder (a mesh named in memory): the file name alone matches.
    const Mesh p = with_names({"parts/pod.stl#1", "parts/pod.stl#2", "parts/body.stl"});
    std::set<std::uint32_t> taken;
    CHECK(capture_shells(p, "pod.stl", taken) == V{0, 1});
    CHECK(capture_shells(p, "parts/body.stl", taken) == V{2});
  }
}

TEST_CASE("capture names that match nothing, or a shell twice, name --capture", "[ends][capture]") {
  const Mesh m = with_names({"fuselage.obj", "nacelles.obj#1", "nacelles.obj#2"});
  std::set<std::uint32_t> taken;
  std::string source;
  for (const std::string bad :
       {"tail.obj", "nacelles", "nacelles.obj#3", "obj", "#1", "nacelles.obj#"}) {
    INFO(bad);
    const std::string msg = capture_error(m, bad, taken, &source);
    CHECK(source == "--capture");
    CHECK(msg == "--capture: no shell, part or file named '" + bad + "' in the model");
  }
  CHECK(taken.empty());
  // A file's shells, then one of them again: captured twice would be subtracted twice.
  CHECK(capture_shells(m, "nacelles.obj", taken).size() == 2);
  std::string msg = capture_error(m, "nacelles.obj#2", taken, &source);
  CHECK(source == "--capture");
  CHECK_THAT(msg, Contains("nacelles.obj#2") && Contains("more than one --capture"));
  msg = capture_error(m, "nacelles.obj", taken);
  CHECK_THAT(msg, Contains("nacelles.obj#1") && Contains("more than one --capture"));
  // An empty model has nothing to capture.
  std::set<std::uint32_t> none;
  CHECK_THAT(capture_error(Mesh{}, "x.obj", none), Contains("no shell, part or file named 'x.obj'"));
}

TEST_CASE("a '#' inside a file name is not a shell suffix", "[ends][capture]") {
  // "FILE#k" has k = 1, 2, ... (import.h); a one-shell file "rev#b.obj" is FILE itself, so
  // "rev" names no file of the model.
  const Mesh m = with_names({"rev#b.obj", "pod#2.stl#1", "pod#2.stl#2"});
  std::set<std::uint32_t> taken;
  CHECK_THAT(capture_error(m, "rev", taken), Contains("no shell, part or file named 'rev'"));
  CHECK_THAT(capture_error(m, "pod", taken), Contains("no shell, part or file named 'pod'"));
  CHECK(capture_shells(m, "rev#b.obj", taken) == std::vector<std::uint32_t>{0});
  CHECK(capture_shells(m, "pod#2.stl", taken) == std::vector<std::uint32_t>{1, 2});
}

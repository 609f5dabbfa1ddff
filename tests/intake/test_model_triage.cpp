// Tests of the triage in slicing/intake/model.cpp (docs/method.md §2.4): dirty meshes of our
// own making — patches with gaps and T-junctions, a non-manifold seam, duplicated vertices and
// faces, an open sheet, a flat quad, points and lines, an inside-out part, named groups, a
// low-poly aircraft with open and intersecting parts — through prepare_mesh and through every
// command of the CLI; the alpha wrap's error bound on a sphere with a slit.
#include <nlohmann/json.hpp>
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <numbers>
#include <sstream>

#include "machcut/intake/holes.h"
#include "machcut/intake/model.h"
#include "machcut/sections/section.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::Contains;

namespace {

std::string write_text(const std::string& name, const std::string& text) {
  const std::string path = temp_path(name);
  std::ofstream(path, std::ios::binary) << text;
  return path;
}

// A UV sphere of radius r (24 rings, 48 segments) cut open along two stretches of one meridian
// (y > 0, z = 0) that meet at one vertex: the vertices of the stretches are doubled on the z < 0
// side, so the boundary is two slits touching at a vertex — not a set of simple loops, and not
// closable by fans. The geometry is that of the closed sphere.
Mesh slit_sphere(double r) {
  Mesh m = make_sphere({0, 0, 0}, r, 24, 48);
  std::vector<std::uint32_t> meridian;
  for (std::uint32_t v = 0; v < m.positions.size(); ++v)
    if (m.positions[v].z == 0.0 && m.positions[v].y > 0.0) meridian.push_back(v);
  std::sort(meridian.begin(), meridian.end(),
            [&](std::uint32_t a, std::uint32_t b) { return m.positions[a].x < m.positions[b].x; });
  REQUIRE(meridian.size() == 23);
  std::vector<std::int64_t> twin(m.positions.size(), -1);
  for (std::size_t k : {9u, 10u, 12u, 13u}) {
    twin[meridian[k]] = static_cast<std::int64_t>(m.positions.size());
    m.positions.push_back(m.positions[meridian[k]]);
  }
  for (Tri& t : m.triangles) {
    const double zc = m.positions[t[0]].z + m.positions[t[1]].z + m.positions[t[2]].z;
    if (zc < 0.0)
      for (std::uint32_t& v : t)
        if (twin[v] >= 0) v = static_cast<std::uint32_t>(twin[v]);
  }
  m.shell_names = {"slit sphere"};
  return m;
}

// OBJ text of a mesh's triangles, vertices numbered from `base` + 1.
std::string obj_lines(const Mesh& m, std::size_t base, Vec3 shift = {}) {
  std::ostringstream s;
  s.precision(17);
  for (const Vec3& p : m.positions) s << "v " << p.x + shift.x << " " << p.y + shift.y << " " << p.z + shift.z << "\n";
  for (const Tri& t : m.triangles) s << "f " << t[0] + base + 1 << " " << t[1] + base + 1 << " " << t[2] + base + 1 << "\n";
  return s.str();
}

Mesh without(Mesh m, std::vector<std::size_t> drop) {
  std::sort(drop.rbegin(), drop.rend());
  for (std::size_t i : drop) {
    m.triangles.erase(m.triangles.begin() + static_cast<std::ptrdiff_t>(i));
    m.shell.erase(m.shell.begin() + static_cast<std::ptrdiff_t>(i));
  }
  return m;
}

// Index of the triangle of `m` whose vertices all satisfy `pred`, from `from` on.
template <class P>
std::size_t find_tri(const Mesh& m, P pred, std::size_t from = 0) {
  for (std::size_t i = from; i < m.triangles.size(); ++i)
    if (pred(m.positions[m.triangles[i][0]]) && pred(m.positions[m.triangles[i][1]]) && pred(m.positions[m.triangles[i][2]]))
      return i;
  FAIL("no such triangle");
  return 0;
}

// The dirty model: one OBJ of named groups, 3 m apart in y, and points and lines.
std::string dirty_obj() {
  std::string text;
  std::size_t base = 0;
  const auto add = [&](const std::string& group, const Mesh& m, Vec3 shift) {
    text += "g " + group + "\n" + obj_lines(m, base, shift);
    base += m.positions.size();
  };
  // A clean closed body.
  std::vector<double> x, r;
  for (int i = 0; i <= 16; ++i) {
    x.push_back(6.0 * i / 16);
    r.push_back(0.6 * std::sin(std::numbers::pi * i / 16));
  }
  add("fuselage", make_body_of_revolution(x, r, 24), {0, 0, 0});
  // Patches: a box whose +x face is a separate patch 2 mm away (a gap), and whose top face is
  // split at the middle of its edge with the +y face, which is not (a T-junction).
  {
    Mesh box = make_box({0, 0, 0}, {1, 1, 1});
    std::vector<std::size_t> end, top;
    for (std::size_t i = 0; i < box.triangles.size(); ++i) {
      bool on_end = true, on_top = true;
      for (std::uint32_t v : box.triangles[i]) {
        on_end = on_end && box.positions[v].x == 1.0;
        on_top = on_top && box.positions[v].z == 1.0;
      }
      if (on_end) end.push_back(i);
      if (on_top) top.push_back(i);
    }
    Mesh rest = without(box, [&] { auto d = end; d.insert(d.end(), top.begin(), top.end()); return d; }());
    // The top as four triangles around the midpoint M of its edge y = 1 (T-junction there).
    const auto id = [&](Vec3 p) {
      for (std::uint32_t v = 0; v < rest.positions.size(); ++v)
        if (rest.positions[v].x == p.x && rest.positions[v].y == p.y && rest.positions[v].z == p.z) return v;
      rest.positions.push_back(p);
      return static_cast<std::uint32_t>(rest.positions.size() - 1);
    };
    const std::uint32_t a = id({0, 0, 1}), b = id({1, 0, 1}), c = id({1, 1, 1}), d = id({0, 1, 1}), mid = id({0.5, 1, 1});
    for (Tri t : {Tri{a, b, mid}, Tri{b, c, mid}, Tri{mid, d, a}}) {
      rest.triangles.push_back(t);
      rest.shell.push_back(0);
    }
    Mesh face;
    face.positions = {{1.002, 0, 0}, {1.002, 1, 0}, {1.002, 1, 1}, {1.002, 0, 1}};
    face.triangles = {{0, 1, 2}, {0, 2, 3}};
    face.shell = {0, 0};
    face.shell_names = {""};
    add("patches", rest, {0, 3, 0});
    text += obj_lines(face, base, {0, 3, 0});
    base += face.positions.size();
  }
  // A non-manifold seam: two boxes sharing one edge (four triangles on it).
  {
    Mesh two = make_box({0, 0, 0}, {1, 1, 1});
    const Mesh other = make_box({1, 1, 0}, {2, 2, 1});
    const std::size_t n = two.positions.size();
    two.positions.insert(two.positions.end(), other.positions.begin(), other.positions.end());
    for (Tri t : other.triangles) {
      two.triangles.push_back({static_cast<std::uint32_t>(t[0] + n), static_cast<std::uint32_t>(t[1] + n), static_cast<std::uint32_t>(t[2] + n)});
      two.shell.push_back(0);
    }
    add("seam", two, {0, 6, 0});  // the shared corners weld on import: a non-manifold edge
  }
  // Duplicated vertices and faces: every vertex written twice, one face twice.
  {
    const Mesh box = make_box({0, 0, 0}, {1, 1, 1});
    text += "g duplicates\n";
    for (int copy = 0; copy < 2; ++copy)
      for (const Vec3& p : box.positions) text += "v " + std::to_string(p.x) + " " + std::to_string(p.y + 9) + " " + std::to_string(p.z) + "\n";
    for (std::size_t i = 0; i < box.triangles.size(); ++i) {
      const std::size_t off = base + (i % 2 ? box.positions.size() : 0);  // alternate copies
      const Tri& t = box.triangles[i];
      const std::string f = "f " + std::to_string(t[0] + off + 1) + " " + std::to_string(t[1] + off + 1) + " " + std::to_string(t[2] + off + 1) + "\n";
      text += f;
      if (i == 3) text += f;
    }
    base += 2 * box.positions.size();
  }
  // An open sheet (half a cylinder's side, not flat).
  {
    Mesh sheet;
    for (int j = 0; j <= 8; ++j)
      for (double xx : {0.0, 1.0}) {
        const double phi = std::numbers::pi * j / 8;
        sheet.positions.push_back({xx, 0.5 * std::cos(phi), 0.5 * std::sin(phi)});
      }
    for (std::uint32_t j = 0; j < 8; ++j) {
      sheet.triangles.push_back({2 * j, 2 * j + 2, 2 * j + 3});
      sheet.triangles.push_back({2 * j, 2 * j + 3, 2 * j + 1});
      sheet.shell.insert(sheet.shell.end(), {0, 0});
    }
    add("sheet", sheet, {0, 12, 0});
  }
  // A flat quad.
  {
    Mesh quad;
    quad.positions = {{0, 0, 0}, {1, 0, 0}, {1, 1, 0.5}, {0, 1, 0.5}};
    quad.triangles = {{0, 1, 2}, {0, 2, 3}};
    quad.shell = {0, 0};
    add("flat", quad, {0, 15, 0});
  }
  // An inside-out box.
  {
    Mesh box = make_box({0, 0, 0}, {1, 1, 1});
    for (Tri& t : box.triangles) std::swap(t[1], t[2]);
    add("inverted", box, {0, 18, 0});
  }
  // Points and lines.
  text += "g wires\nv 0 30 0\nv 1 30 0\nv 2 30 0\nl " + std::to_string(base + 1) + " " + std::to_string(base + 2) +
          " " + std::to_string(base + 3) + "\np " + std::to_string(base + 1) + "\n";
  return text;
}

// Every area column of a CSV (all but the station column) is >= −tol.
void check_csv_nonnegative(const std::string& csv, double tol) {
  std::istringstream in(csv);
  std::string line;
  std::size_t rows = 0;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#' || !(std::isdigit(static_cast<unsigned char>(line[0])) || line[0] == '-')) continue;
    std::istringstream cells(line);
    std::string cell;
    std::getline(cells, cell, ',');  // station
    while (std::getline(cells, cell, ','))
      if (!cell.empty()) CHECK(std::stod(cell) >= -tol);
    ++rows;
  }
  CHECK(rows > 0);
}

}  // namespace

TEST_CASE("alpha wrap of a sphere with a slit: the error bound covers the true area error", "[triage][wrap]") {
  const double r = 1.0;
  const Mesh closed = make_sphere({0, 0, 0}, r, 24, 48);
  const Mesh slit = slit_sphere(r);
  const PreparedModel pm = prepare_mesh(slit, {});
  REQUIRE(pm.usable);
  REQUIRE(pm.wraps.size() == 1);
  const WrappedShell& w = pm.wraps[0];
  CHECK_THAT(w.why, Contains("not a set of simple loops"));
  // Defaults (model.h): alpha = diagonal / 100, offset = alpha / 10; diagonal 2√3 r.
  CHECK(w.alpha == Approx(2.0 * std::sqrt(3.0) * r / 100.0).epsilon(1e-12));
  CHECK(w.offset == Approx(w.alpha / 10.0).epsilon(1e-12));
  // Source: 4/3 π r³ (sphere); the inscribed polyhedron has a little less (here within 1%),
  // the wrap encloses the input (CGAL 3D alpha wrapping: the result strictly contains it) and
  // keeps within about `offset` of it.
  const double v_poly = signed_volume(closed);
  CHECK(v_poly == Approx(4.0 / 3.0 * std::numbers::pi * r * r * r).epsilon(0.01));
  CHECK(w.volume_after > v_poly);
  CHECK(w.volume_after < 4.0 / 3.0 * std::numbers::pi * std::pow(r + 2.0 * w.offset, 3));
  // The bound against the truth: the closed sphere's areas (the slit does not change the
  // geometry) from an independent engine on the unslit mesh.
  const std::vector<double> x = make_stations({-r, r}, 101, Spacing::uniform);
  const std::vector<double> wrapped = SectionEngine(pm.analysis).areas({1.0, 0.0}, x);
  const std::vector<double> truth = SectionEngine(closed).areas({1.0, 0.0}, x);
  const std::vector<double> bound = hole_error_bounds(pm, {1.0, 0.0}, x);
  double worst = 0.0;
  for (std::size_t i = 0; i < x.size(); ++i) {
    CHECK(std::fabs(wrapped[i] - truth[i]) <= bound[i] + 1e-12);
    CHECK(wrapped[i] >= 0.0);
    worst = std::max(worst, std::fabs(wrapped[i] - truth[i]));
  }
  // The bound is not vacuous: within a factor 2 of the largest true change (201 stations for
  // the bound against 101 here), and far below the largest section π r².
  CHECK(w.area_bound < 2.0 * worst + 1e-9);
  CHECK(w.area_bound < 0.1 * std::numbers::pi * r * r);
  // --strict refuses instead, naming the shell and the problem.
  ModelSetup strict;
  strict.strict = true;
  const PreparedModel refused = prepare_mesh(slit, strict);
  CHECK_FALSE(refused.usable);
  CHECK_THAT(refused.reason, Contains("slit sphere") && Contains("simple loops") && Contains("--strict"));
}

TEST_CASE("duplicate triangles: copies removed, back-to-back pairs removed whole", "[triage]") {
  // Two unit cubes side by side written as one mesh with their common face twice (back to back)
  // and one face written twice: the union is a 2 × 1 × 1 box (elementary geometry: 2 m³).
  Mesh a = make_box({0, 0, 0}, {1, 1, 1});
  const Mesh b = make_box({1, 0, 0}, {2, 1, 1});
  const std::size_t n = a.positions.size();
  a.positions.insert(a.positions.end(), b.positions.begin(), b.positions.end());
  for (Tri t : b.triangles) {
    a.triangles.push_back({static_cast<std::uint32_t>(t[0] + n), static_cast<std::uint32_t>(t[1] + n), static_cast<std::uint32_t>(t[2] + n)});
    a.shell.push_back(0);
  }
  // Weld the shared corners (the x = 1 face of both boxes) by position.
  for (Tri& t : a.triangles)
    for (std::uint32_t& v : t)
      for (std::uint32_t u = 0; u < v; ++u)
        if (a.positions[u].x == a.positions[v].x && a.positions[u].y == a.positions[v].y && a.positions[u].z == a.positions[v].z) {
          v = u;
          break;
        }
  a.triangles.push_back(a.triangles[0]);
  a.shell.push_back(0);
  a.shell_names = {"pair"};
  const PreparedModel pm = prepare_mesh(a, {});
  REQUIRE(pm.usable);
  CHECK(pm.wraps.empty());
  CHECK(pm.health.closed);
  CHECK(pm.health.nonmanifold_edges == 0);
  CHECK(signed_volume(pm.analysis) == Approx(2.0).epsilon(1e-12));
  bool same = false, pair = false;
  for (const std::string& note : pm.notes) {
    same = same || note.find("1 duplicated triangle") != std::string::npos;
    pair = pair || note.find("2 back-to-back pair") != std::string::npos;
  }
  CHECK(same);
  CHECK(pair);
}

TEST_CASE("a flat part is left out with a note; a model of flat parts only is refused", "[triage]") {
  Mesh quad;
  quad.positions = {{0, 0, 0}, {1, 0, 0}, {1, 1, 1}, {0, 1, 1}};
  quad.triangles = {{0, 1, 2}, {0, 2, 3}};
  quad.shell = {0, 0};
  quad.shell_names = {"m.obj:quad"};
  Mesh box = make_box({3, 0, 0}, {4, 1, 1});
  box.shell_names = {"m.obj:box"};
  const PreparedModel pm = prepare_mesh(concatenate({quad, box}), {});
  REQUIRE(pm.usable);
  REQUIRE(pm.left_out.size() == 1);
  CHECK(pm.left_out[0].name == "m.obj:quad");
  CHECK_THAT(pm.left_out[0].why, Contains("flat part"));
  CHECK(pm.set_aside.triangles.size() == 2);
  CHECK(pm.mesh.shell_names == std::vector<std::string>{"m.obj:box"});
  const PreparedModel alone = prepare_mesh(quad, {});
  CHECK_FALSE(alone.usable);
  CHECK_THAT(alone.reason, Contains("nothing usable remains") && Contains("flat part"));
}

TEST_CASE("parts selected by --skip and --only; a selector naming nothing is an input error", "[triage]") {
  Mesh a = make_box({0, 0, 0}, {1, 1, 1});
  a.shell_names = {"m.obj:wing"};
  Mesh b = make_box({3, 0, 0}, {4, 1, 2});
  b.shell_names = {"m.obj:tail"};
  const Mesh both = concatenate({a, b});
  ModelSetup skip;
  skip.skip = {"wing"};
  const PreparedModel s = prepare_mesh(both, skip);
  REQUIRE(s.usable);
  CHECK(s.mesh.shell_names == std::vector<std::string>{"m.obj:tail"});
  CHECK(signed_volume(s.analysis) == Approx(2.0).epsilon(1e-12));  // the 1 × 1 × 2 box
  REQUIRE(s.left_out.size() == 1);
  CHECK_THAT(s.left_out[0].why, Contains("--skip"));
  ModelSetup only;
  only.only = {"m.obj:wing"};
  const PreparedModel o = prepare_mesh(both, only);
  REQUIRE(o.usable);
  CHECK(o.mesh.shell_names == std::vector<std::string>{"m.obj:wing"});
  ModelSetup typo;
  typo.skip = {"wnig"};
  CHECK_THROWS_WITH(prepare_mesh(both, typo), Contains("--skip") && Contains("wnig"));
}

TEST_CASE("dirty model through inspect, area, drag and jumps: exit 0, each repair named, no negative area", "[triage][cli]") {
  const std::string path = write_text("dirty.obj", dirty_obj());
  const RunResult in = run_cli("inspect " + path + " --json -");
  INFO(in.err);
  REQUIRE(in.exit_code == 0);
  const auto j = nlohmann::json::parse(in.out);
  CHECK(j["usable"].get<bool>());
  // Parts named by their groups.
  std::vector<std::string> names;
  for (const auto& s : j["shells"]) names.push_back(s["name"].get<std::string>());
  CHECK(std::count(names.begin(), names.end(), "dirty.obj:fuselage") == 1);
  // Each repair named: points and lines, the flat quad, duplicates, the inside-out box, the
  // wraps of the patches (gap, T-junction) and of the seam.
  CHECK_THAT(in.err, Contains("points or lines ignored"));
  CHECK_THAT(in.err, Contains("dirty.obj:flat") && Contains("flat part"));
  CHECK_THAT(in.err, Contains("duplicated triangle"));
  CHECK_THAT(in.err, Contains("dirty.obj:inverted") && Contains("inside out"));
  CHECK_THAT(in.err, Contains("dirty.obj:seam") && Contains("non-manifold"));
  CHECK_THAT(in.err, Contains("dirty.obj:patches") && Contains("alpha wrap"));
  bool seam = false, patches = false;
  for (const auto& w : j["wrapped"]) {
    const std::string s = w["shell"].get<std::string>();
    seam = seam || s.rfind("dirty.obj:seam", 0) == 0;
    patches = patches || s.rfind("dirty.obj:patches", 0) == 0;
    CHECK(w["area_bound"].get<double>() >= 0.0);
    // The wrap of a part stays near its volume (alpha wrap offset: a little more).
    CHECK(w["volume_after"].get<double>() > 0.0);
  }
  CHECK(seam);
  CHECK(patches);
  REQUIRE(j["left_out"].size() == 1);
  CHECK(j["left_out"][0]["shell"] == "dirty.obj:flat");
  // The patches' box (1 m³, gap bridged by the part's wrap) and the seam's two boxes (2 m³)
  // come out near their volumes (elementary geometry; the wrap adds ~offset all round, and
  // the default alpha here is 1/200 of the 31 m model: offset 0.016 m, +10% on the 1 m box).
  for (const auto& w : j["wrapped"]) {
    const std::string s = w["shell"].get<std::string>();
    if (s.rfind("dirty.obj:patches", 0) == 0) CHECK(w["volume_after"].get<double>() == Approx(1.0).epsilon(0.2));
    if (s.rfind("dirty.obj:seam", 0) == 0) CHECK(w["volume_after"].get<double>() == Approx(2.0).epsilon(0.2));
  }
  const RunResult area = run_cli("area " + path + " --mach 1.2 --stations 41 -q");
  INFO(area.err);
  REQUIRE(area.exit_code == 0);
  check_csv_nonnegative(area.out, 1e-12);
  const RunResult drag = run_cli("drag " + path + " --mach 1.5 --rolls 15 --tol 0.05 -q");
  INFO(drag.err);
  CHECK(drag.exit_code == 0);
  const RunResult jumps = run_cli("jumps " + path + " --mach 1.2 --stations 60 -q");
  INFO(jumps.err);
  CHECK(jumps.exit_code == 0);
  CHECK_THAT(jumps.out, Contains("dirty.obj:"));
  // --strict refuses the same model, the reason first on stderr.
  const RunResult strict = run_cli("inspect " + path + " --strict -q");
  CHECK(strict.exit_code == 1);
  CHECK(strict.err.rfind("machcut: model not usable: ", 0) == 0);
  // --skip of the broken parts: nothing to wrap any more.
  const RunResult skipped = run_cli("inspect " + path + " --skip patches --skip seam --skip sheet --strict --json -");
  INFO(skipped.err);
  CHECK(skipped.exit_code == 0);
  const RunResult typo = run_cli("area " + path + " --mach 1 --only nosuchpart -q");
  CHECK(typo.exit_code == 2);
  CHECK_THAT(typo.err, Contains("--only") && Contains("nosuchpart"));
}

TEST_CASE("a low-poly aircraft with open and intersecting parts goes through every command", "[triage][cli]") {
  std::string text;
  std::size_t base = 0;
  const auto add = [&](const std::string& group, const Mesh& m) {
    text += "o " + group + "\n" + obj_lines(m, base);
    base += m.positions.size();
  };
  // Fuselage: 20 m, 32 segments × 24 rings (~1.5k triangles), its tail cap missing (open).
  std::vector<double> x, r;
  for (int i = 0; i <= 24; ++i) {
    const double u = static_cast<double>(i) / 24;
    x.push_back(20.0 * u);
    r.push_back(i == 0 ? 0.0 : 1.0 * std::pow(std::sin(std::numbers::pi * std::min(u, 0.8) / 1.6), 0.7));
  }
  Mesh fus = make_body_of_revolution(x, r, 32);
  const std::size_t cap0 = find_tri(fus, [](const Vec3& p) { return p.x == 20.0; });
  std::vector<std::size_t> cap;
  for (std::size_t i = cap0; i < fus.triangles.size(); ++i) cap.push_back(i);
  add("fuselage", without(fus, cap));
  // Wing: a thin box through the fuselage (intersecting).
  add("wing", make_box({8, -6, -0.15}, {12, 6, 0.15}));
  // Fin: an open bent sheet (two quads at an angle) on the top.
  Mesh fin;
  fin.positions = {{16, 0, 0.8}, {19, 0, 0.8}, {19.5, 0.05, 3}, {18, 0.05, 3}, {19.8, 0, 4}};
  fin.triangles = {{0, 1, 2}, {0, 2, 3}, {3, 2, 4}};
  fin.shell = {0, 0, 0};
  add("fin", fin);
  // Nacelle: an open tube (flow-through) under the wing, overlapping it.
  std::vector<double> nx{9, 9.2, 11.8, 12}, nr{0.4, 0.45, 0.45, 0.4};
  Mesh tube = make_body_of_revolution(nx, nr, 16);
  std::vector<std::size_t> caps;
  for (std::size_t i = 0; i < tube.triangles.size(); ++i) {
    bool flat_end = true;
    for (std::uint32_t v : tube.triangles[i]) flat_end = flat_end && (tube.positions[v].x == 9 || tube.positions[v].x == 12);
    if (flat_end) caps.push_back(i);
  }
  tube = without(tube, caps);
  for (Vec3& p : tube.positions) p = {p.x, p.y + 3.0, p.z - 0.4};
  add("nacelle", tube);
  const std::string path = write_text("lowpoly.obj", text);
  const RunResult in = run_cli("inspect " + path + " --json -");
  INFO(in.err);
  REQUIRE(in.exit_code == 0);
  const auto j = nlohmann::json::parse(in.out);
  CHECK(j["usable"].get<bool>());
  CHECK(j["triangles"].get<int>() >= 1000);
  CHECK(j["triangles"].get<int>() <= 2000);
  const RunResult area = run_cli("area " + path + " --mach 1.4 --stations 61 -q");
  INFO(area.err);
  REQUIRE(area.exit_code == 0);
  check_csv_nonnegative(area.out, 1e-12);
  CHECK_THAT(area.out, Contains("lowpoly.obj:wing"));
  const RunResult drag = run_cli("drag " + path + " --mach 1.4 --rolls 15 --tol 0.05 -q");
  INFO(drag.err);
  CHECK(drag.exit_code == 0);
  const RunResult jumps = run_cli("jumps " + path + " --mach 1.4 --stations 80 -q");
  INFO(jumps.err);
  CHECK(jumps.exit_code == 0);
}

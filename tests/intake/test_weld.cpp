// Tests of welding and shell splitting (slicing/intake/weld.cpp): weld_soup and the Welder
// against an independent weld by an ordered map, Euler's formula on welded closed meshes, and
// edge_connected_shells against an independent breadth-first search.
#include <catch2/catch.hpp>

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <map>
#include <queue>
#include <random>
#include <set>
#include <tuple>
#include <utility>
#include <vector>

#include "../../slicing/intake/import_detail.h"
#include "machcut/intake/import.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;

namespace {

std::vector<Vec3> soup_of(const Mesh& m) {
  std::vector<Vec3> c;
  for (const Tri& t : m.triangles)
    for (std::uint32_t v : t) c.push_back(m.positions[v]);
  return c;
}

// Reference weld, written from import.h's contract with an ordered map: two corners are one
// vertex when their coordinates compare equal (IEEE 754 equality, under which −0 == +0, and
// which for finite values is bitwise equality otherwise); vertices numbered in order of first
// use; triangles with two equal corners dropped, the others kept in order.
struct ReferenceWeld {
  std::vector<Vec3> positions;
  std::vector<Tri> triangles;
};

ReferenceWeld reference_weld(const std::vector<Vec3>& corners) {
  ReferenceWeld r;
  std::map<std::tuple<double, double, double>, std::uint32_t> ids;
  auto id = [&](Vec3 p) {
    auto [it, fresh] =
        ids.try_emplace({p.x, p.y, p.z}, static_cast<std::uint32_t>(r.positions.size()));
    if (fresh) r.positions.push_back(p);
    return it->second;
  };
  for (std::size_t i = 0; i + 2 < corners.size(); i += 3) {
    const Tri t{id(corners[i]), id(corners[i + 1]), id(corners[i + 2])};
    if (t[0] != t[1] && t[1] != t[2] && t[0] != t[2]) r.triangles.push_back(t);
  }
  return r;
}

void check_same_as_reference(const Mesh& m, const std::vector<Vec3>& corners) {
  const ReferenceWeld r = reference_weld(corners);
  REQUIRE(m.positions.size() == r.positions.size());
  REQUIRE(m.triangles.size() == r.triangles.size());
  CHECK(m.triangles == r.triangles);
  for (std::size_t v = 0; v < m.positions.size(); ++v) {
    // Equal values (−0 and +0 are equal; the weld stores +0, checked separately).
    CHECK(m.positions[v].x == r.positions[v].x);
    CHECK(m.positions[v].y == r.positions[v].y);
    CHECK(m.positions[v].z == r.positions[v].z);
  }
  CHECK(m.shell == std::vector<std::uint32_t>(m.triangles.size(), 0));
  CHECK(m.shell_names == std::vector<std::string>{""});
}

// A random soup: corners drawn from a pool of `pool` points on a coarse grid (so that many
// repeat), some with their zero coordinates negated; some triangles degenerate on purpose.
std::vector<Vec3> random_soup(std::size_t triangles, std::size_t pool, unsigned seed) {
  std::mt19937 rng(seed);
  std::uniform_int_distribution<int> coord(-3, 3);
  std::vector<Vec3> points;
  for (std::size_t i = 0; i < pool; ++i)
    points.push_back({0.25 * coord(rng), 0.5 * coord(rng), 1.5 * coord(rng)});
  std::uniform_int_distribution<std::size_t> pick(0, pool - 1);
  std::bernoulli_distribution negate_zero(0.3);
  std::vector<Vec3> soup;
  for (std::size_t t = 0; t < 3 * triangles; ++t) {
    Vec3 p = points[pick(rng)];
    if (negate_zero(rng)) p = {p.x == 0 ? -0.0 : p.x, p.y == 0 ? -0.0 : p.y, p.z == 0 ? -0.0 : p.z};
    soup.push_back(p);
  }
  return soup;
}

// Shells by breadth-first search over triangles sharing an undirected edge (definition in
// import.h), numbered in order of their first triangle.
std::vector<std::uint32_t> reference_shells(const Mesh& m, std::uint32_t* count) {
  std::map<std::pair<std::uint32_t, std::uint32_t>, std::vector<std::size_t>> users;
  for (std::size_t f = 0; f < m.triangles.size(); ++f)
    for (int k = 0; k < 3; ++k) {
      const std::uint32_t a = m.triangles[f][k], b = m.triangles[f][(k + 1) % 3];
      users[{std::min(a, b), std::max(a, b)}].push_back(f);
    }
  constexpr std::uint32_t kUnset = std::numeric_limits<std::uint32_t>::max();
  std::vector<std::uint32_t> shell(m.triangles.size(), kUnset);
  std::uint32_t n = 0;
  for (std::size_t f0 = 0; f0 < m.triangles.size(); ++f0) {
    if (shell[f0] != kUnset) continue;
    std::queue<std::size_t> q;
    q.push(f0);
    shell[f0] = n;
    while (!q.empty()) {
      const std::size_t f = q.front();
      q.pop();
      for (int k = 0; k < 3; ++k) {
        const std::uint32_t a = m.triangles[f][k], b = m.triangles[f][(k + 1) % 3];
        for (std::size_t g : users[{std::min(a, b), std::max(a, b)}])
          if (shell[g] == kUnset) {
            shell[g] = n;
            q.push(g);
          }
      }
    }
    ++n;
  }
  *count = n;
  return shell;
}

// Euler characteristic V − E + F of a welded mesh, E counted as distinct undirected edges.
long euler_characteristic(const Mesh& m) {
  std::set<std::pair<std::uint32_t, std::uint32_t>> edges;
  for (const Tri& t : m.triangles)
    for (int k = 0; k < 3; ++k)
      edges.insert({std::min(t[k], t[(k + 1) % 3]), std::max(t[k], t[(k + 1) % 3])});
  return static_cast<long>(m.positions.size()) - static_cast<long>(edges.size()) +
         static_cast<long>(m.triangles.size());
}

}  // namespace

// ----------------------------------------------------------------------- weld_soup --

TEST_CASE("weld of random soups matches an independent weld", "[weld]") {
  for (unsigned seed : {1u, 2u, 3u}) {
    INFO("seed " << seed);
    const std::vector<Vec3> soup = random_soup(5000, 200, seed);
    check_same_as_reference(weld_soup(soup), soup);
  }
  // Few repeats (a large pool): most corners are new vertices, the table grows many times.
  const std::vector<Vec3> sparse = random_soup(20000, 50000, 7);
  check_same_as_reference(weld_soup(sparse), sparse);
}

TEST_CASE("a welded closed UV sphere and torus satisfy Euler's formula", "[weld]") {
  // Source: Euler's polyhedron formula V − E + F = 2 for a closed surface of genus 0, 0 for the
  // torus (genus 1) (common knowledge); it holds only when the soup welds back into the
  // closed surface. The generators share no coincident vertices, so the weld recovers their
  // vertex counts.
  const Mesh sphere = make_sphere({0.1, -0.2, 0.3}, 1.7, 24, 48);
  const Mesh s = weld_soup(soup_of(sphere));
  CHECK(s.positions.size() == sphere.positions.size());
  CHECK(s.triangles.size() == sphere.triangles.size());
  CHECK(euler_characteristic(s) == 2);
  const Mesh torus = make_torus(0.0, 3.0, 1.0, 40, 20);
  const Mesh t = weld_soup(soup_of(torus));
  CHECK(t.positions.size() == 800);
  CHECK(euler_characteristic(t) == 0);
  // Triangles keep their orientation: the welded volumes equal the originals', term by term.
  CHECK(signed_volume(s) == signed_volume(sphere));
  CHECK(signed_volume(t) == signed_volume(torus));
}

TEST_CASE("only equal coordinates weld: one ulp apart stays apart", "[weld]") {
  // import.h: "Nearly equal coordinates are not welded: no tolerance is guessed." The next
  // double after 1 (1 + 2⁻⁵², IEEE 754 binary64) in any one coordinate is another vertex.
  const double next = std::nextafter(1.0, 2.0);
  const std::vector<Vec3> soup = {{1, 1, 1},    {2, 0, 0},    {0, 2, 0},  // reference triangle
                                  {next, 1, 1}, {2, 0, 0},    {0, 2, 0}, {1, next, 1}, {2, 0, 0},
                                  {0, 2, 0},    {1, 1, next}, {2, 0, 0}, {0, 2, 0},    {1, 1, 1},
                                  {0, 2, 0},    {0, 0, 2}};  // shares the exact corner
  const Mesh m = weld_soup(soup);
  CHECK(m.positions.size() == 7);
  CHECK(m.triangles.size() == 5);
  CHECK(m.triangles[4][0] == m.triangles[0][0]);
  check_same_as_reference(m, soup);
}

TEST_CASE("−0 and +0 weld, and the weld stores +0", "[weld]") {
  // IEEE 754: −0 == +0; import.h welds them (−0 → +0) so mirrored exports close.
  const std::vector<Vec3> soup = {{-0.0, 0.0, -0.0}, {1, 0, 0}, {0, 1, 0},
                                  {0.0, -0.0, 0.0},  {0, 1, 0}, {0, 0, 1}};
  const Mesh m = weld_soup(soup);
  REQUIRE(m.positions.size() == 4);
  CHECK(m.triangles[0][0] == m.triangles[1][0]);
  const Vec3 o = m.positions[m.triangles[0][0]];
  CHECK_FALSE(std::signbit(o.x));
  CHECK_FALSE(std::signbit(o.y));
  CHECK_FALSE(std::signbit(o.z));
  CHECK_FALSE(std::signbit(m.positions[1].y));  // (1, +0, +0) as given
}

TEST_CASE("degenerate triangles are dropped, numbering follows first use", "[weld][degenerate]") {
  // Corners of dropped triangles still become vertices, in order of first use (import.h).
  const std::vector<Vec3> soup = {{5, 5, 5}, {5, 5, 5}, {6, 5, 5},   // two corners equal
                                  {7, 7, 7}, {7, 7, 7}, {7, 7, 7},   // all equal
                                  {6, 5, 5}, {8, 0, 0}, {5, 5, 5}};  // kept
  const Mesh m = weld_soup(soup);
  REQUIRE(m.triangles.size() == 1);
  CHECK(m.positions.size() == 4);
  CHECK(m.triangles[0] == Tri{1, 3, 0});
  CHECK(m.positions[2].x == 7.0);
  const Mesh e = weld_soup({});
  CHECK(e.positions.empty());
  CHECK(e.triangles.empty());
  CHECK(e.shell_names == std::vector<std::string>{""});
}

// -------------------------------------------------------------------------- Welder --

TEST_CASE("Welder: counts, growth from a small table, take() leaves it empty", "[weld]") {
  // Started for 0 triangles (the smallest table) and fed 30 000 triangles of mostly new
  // vertices: the result must equal the reference weld (import_detail.h: the table doubles
  // when half full).
  const std::vector<Vec3> soup = random_soup(30000, 100000, 11);
  detail::Welder w(0);
  for (std::size_t i = 0; i < soup.size(); i += 3) w.add(soup[i], soup[i + 1], soup[i + 2]);
  const ReferenceWeld r = reference_weld(soup);
  CHECK(w.added() == 30000);
  CHECK(w.dropped() == 30000 - r.triangles.size());
  const Mesh m = w.take();
  check_same_as_reference(m, soup);
  // Empty again, and reusable from vertex 0.
  CHECK(w.added() == 0);
  CHECK(w.dropped() == 0);
  w.add({9, 9, 9}, {8, 9, 9}, {9, 8, 9});
  const Mesh again = w.take();
  CHECK(again.positions.size() == 3);
  CHECK(again.triangles == std::vector<Tri>{{0, 1, 2}});
  CHECK(again.positions[0].x == 9.0);
}

// ------------------------------------------------------------ edge_connected_shells --

TEST_CASE("shells match a breadth-first search over shared edges", "[weld][shells]") {
  // A sphere, a torus, two boxes touching at one corner (separate shells: vertex contact only),
  // two triangles sharing an edge in the same direction (one shell: "either orientation") and
  // three triangles on one edge (non-manifold: one shell); triangle order shuffled so that the
  // shells interleave.
  Mesh odd;
  odd.positions = {{20, 0, 0}, {21, 0, 0}, {20, 1, 0}, {20, 0, 1},  // same-direction pair
                   {30, 0, 0}, {31, 0, 0}, {30, 1, 0}, {30, -1, 0}, {30, 0, 1}};  // fin of 3
  odd.triangles = {{0, 1, 2}, {0, 1, 3}, {4, 5, 6}, {4, 5, 7}, {5, 4, 8}};
  odd.shell.assign(odd.triangles.size(), 0);
  odd.shell_names = {"odd"};
  const Mesh parts =
      concatenate({make_sphere({0, 0, 0}, 1, 8, 16), make_torus(5, 2, 0.5, 12, 6),
                   make_box({10, 0, 0}, {11, 1, 1}), make_box({11, 1, 1}, {12, 2, 2}), odd});
  std::vector<std::size_t> order(parts.triangles.size());
  for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
  std::shuffle(order.begin(), order.end(), std::mt19937(5));
  std::vector<Vec3> soup;
  for (std::size_t f : order)
    for (std::uint32_t v : parts.triangles[f]) soup.push_back(parts.positions[v]);
  const Mesh m = weld_soup(soup);
  std::uint32_t n = 0, n_ref = 0;
  const std::vector<std::uint32_t> shells = edge_connected_shells(m, &n);
  const std::vector<std::uint32_t> expected = reference_shells(m, &n_ref);
  CHECK(n == 6);  // sphere, torus, box, box, the same-direction pair, the fin
  CHECK(n == n_ref);
  CHECK(shells == expected);
  CHECK(edge_connected_shells(m, nullptr) == shells);  // count is optional
}

TEST_CASE("a fan of many triangles around one vertex is one shell", "[weld][shells]") {
  // A pointed cone with 20 000 segments: every side triangle meets the apex; the edges chain
  // them all into one shell with the base fan (definition in import.h).
  const Mesh cone = make_body_of_revolution({0.0, 1.0}, {0.0, 0.5}, 20000);
  std::uint32_t n = 0;
  const std::vector<std::uint32_t> s = edge_connected_shells(weld_soup(soup_of(cone)), &n);
  CHECK(n == 1);
  CHECK(std::all_of(s.begin(), s.end(), [](std::uint32_t k) { return k == 0; }));
  // Empty mesh: no shells.
  std::uint32_t none = 99;
  CHECK(edge_connected_shells(Mesh{}, &none).empty());
  CHECK(none == 0);
}

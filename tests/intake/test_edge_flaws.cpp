// Tests of the flawed-edge lists (slicing/intake/edge_flaws.cpp).
#include <catch2/catch.hpp>

#include <algorithm>
#include <array>
#include <set>

#include "machcut/intake/edge_flaws.h"
#include "machcut/intake/health.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;

namespace {
using Edge = std::array<std::uint32_t, 2>;
Edge edge(std::uint32_t a, std::uint32_t b) {
  return {std::min(a, b), std::max(a, b)};
}
std::set<Edge> as_set(const std::vector<Edge>& v) {
  return {v.begin(), v.end()};
}
}  // namespace

TEST_CASE("a closed cube has no flawed edges", "[edge_flaws]") {
  // A closed box: every edge has two triangles (elementary).
  const EdgeFlaws f = find_edge_flaws(make_box({0, 0, 0}, {1, 1, 1}));
  CHECK(f.boundary.empty());
  CHECK(f.nonmanifold.empty());
  CHECK(find_edge_flaws(Mesh{}).boundary.empty());
}

TEST_CASE("a cube without one triangle has that triangle's edges as its boundary", "[edge_flaws]") {
  Mesh m = make_box({0, 0, 0}, {1, 1, 1});
  const Tri gone = m.triangles[5];
  m.triangles.erase(m.triangles.begin() + 5);
  m.shell.erase(m.shell.begin() + 5);
  const EdgeFlaws f = find_edge_flaws(m);
  // The removed triangle's three edges lost one of their two triangles; nothing else changed.
  CHECK(as_set(f.boundary) ==
        std::set<Edge>{edge(gone[0], gone[1]), edge(gone[1], gone[2]), edge(gone[2], gone[0])});
  CHECK(f.nonmanifold.empty());
  CHECK(f.boundary.size() == check_health(m).boundary_edges);  // the same edges health counts
}

TEST_CASE("three sheets on one edge: one non-manifold edge, six boundary edges", "[edge_flaws]") {
  // Vertices 0 and 1 form the shared edge; triangles fan out to 2, 3 and 4.
  Mesh m;
  m.positions = {{0, 0, 0}, {1, 0, 0}, {0.5, 1, 0}, {0.5, -1, 0}, {0.5, 0, 1}};
  m.triangles = {{0, 1, 2}, {1, 0, 3}, {0, 1, 4}};
  m.shell = {0, 0, 0};
  m.shell_names = {"fan"};
  const EdgeFlaws f = find_edge_flaws(m);
  CHECK(as_set(f.nonmanifold) == std::set<Edge>{edge(0, 1)});
  CHECK(as_set(f.boundary) ==
        std::set<Edge>{edge(1, 2), edge(0, 2), edge(0, 3), edge(1, 3), edge(1, 4), edge(0, 4)});
  const HealthReport h = check_health(m);
  CHECK(f.nonmanifold.size() == h.nonmanifold_edges);
  CHECK(f.boundary.size() == h.boundary_edges);
}

TEST_CASE("hole loops become their closing edges", "[edge_flaws]") {
  const auto e = hole_edges({{4, 7, 9}, {2}});
  // A loop of three vertices has three edges; a one-vertex "loop" has none.
  CHECK(as_set(e) == std::set<Edge>{edge(4, 7), edge(7, 9), edge(4, 9)});
  CHECK(e.size() == 3);
}

// Welding a triangle soup and splitting it into edge-connected shells.
#include <algorithm>
#include <bit>
#include <cassert>
#include <limits>
#include <string>

#include "import_detail.h"
#include "machcut/intake/import.h"

namespace machcut {

namespace {

constexpr std::uint64_t kEmpty = std::numeric_limits<std::uint64_t>::max();

// −0 → +0 (IEEE 754: −0 + +0 = +0 under round-to-nearest), so the two zeros weld.
std::array<std::uint64_t, 3> key_bits(Vec3 p) {
  return {std::bit_cast<std::uint64_t>(p.x + 0.0), std::bit_cast<std::uint64_t>(p.y + 0.0),
          std::bit_cast<std::uint64_t>(p.z + 0.0)};
}

// 64-bit mix of the three coordinates (multiply–xorshift finaliser of splitmix64,
// Steele, Lea & Flood, OOPSLA 2014).
std::uint64_t hash_key(const std::array<std::uint64_t, 3>& k) {
  std::uint64_t h = k[0] * 0x9E3779B97F4A7C15ull ^ k[1] * 0xC2B2AE3D27D4EB4Full ^
                    k[2] * 0x165667B19E3779F9ull;
  h = (h ^ (h >> 30)) * 0xBF58476D1CE4E5B9ull;
  h = (h ^ (h >> 27)) * 0x94D049BB133111EBull;
  return h ^ (h >> 31);
}

// Union–find with path halving (Tarjan & van Leeuwen, J. ACM 31(2), 1984).
std::uint32_t find_root(std::vector<std::uint32_t>& parent, std::uint32_t a) {
  while (parent[a] != a) a = parent[a] = parent[parent[a]];
  return a;
}

void unite(std::vector<std::uint32_t>& parent, std::uint32_t a, std::uint32_t b) {
  a = find_root(parent, a);
  b = find_root(parent, b);
  if (a != b) parent[std::max(a, b)] = std::min(a, b);  // the root is the lowest triangle
}

// Half-edges bucketed by lower vertex (counting sort): entry = (upper vertex, triangle).
struct EdgeBuckets {
  std::vector<std::uint32_t> offset;
  std::vector<std::pair<std::uint32_t, std::uint32_t>> entry;
};

EdgeBuckets bucket_edges(const Mesh& mesh) {
  EdgeBuckets b;
  b.offset.assign(mesh.positions.size() + 1, 0);
  for (const Tri& t : mesh.triangles)
    for (int c = 0; c < 3; ++c) ++b.offset[std::min(t[c], t[(c + 1) % 3]) + 1];
  for (std::size_t v = 1; v < b.offset.size(); ++v) b.offset[v] += b.offset[v - 1];
  std::vector<std::uint32_t> fill(b.offset.begin(), b.offset.end() - 1);
  b.entry.resize(3 * mesh.triangles.size());
  for (std::size_t f = 0; f < mesh.triangles.size(); ++f) {
    const Tri& t = mesh.triangles[f];
    for (int c = 0; c < 3; ++c) {
      const std::uint32_t a = t[c], d = t[(c + 1) % 3];
      b.entry[fill[std::min(a, d)]++] = {std::max(a, d), static_cast<std::uint32_t>(f)};
    }
  }
  return b;
}

}  // namespace

namespace detail {

Welder::Welder(std::size_t expected_triangles) {
  std::size_t cap = 16;
  while (cap < expected_triangles + expected_triangles / 2) cap *= 2;  // load ≈ 1/3 when closed
  slots_.assign(cap, kEmpty);
  mask_ = cap - 1;
  mesh_.positions.reserve(expected_triangles / 2 + 3);
  mesh_.triangles.reserve(expected_triangles);
  mesh_.shell.reserve(expected_triangles);
}

// Doubles the table and re-inserts every vertex (hashes recomputed from the positions).
void Welder::grow() {
  slots_.assign(2 * slots_.size(), kEmpty);
  mask_ = slots_.size() - 1;
  for (std::size_t id = 0; id < mesh_.positions.size(); ++id) {
    const std::uint64_t h = hash_key(key_bits(mesh_.positions[id]));
    std::size_t i = h & mask_;
    while (slots_[i] != kEmpty) i = (i + 1) & mask_;
    slots_[i] = (h >> 32 << 32) | id;
  }
}

// Open addressing, linear probing; each slot keeps the upper 32 hash bits beside the vertex
// id so most mismatches are rejected without touching the positions.
std::uint32_t Welder::find_or_add(Vec3 p) {
  const auto k = key_bits(p);
  const std::uint64_t h = hash_key(k), tag = h >> 32 << 32;
  for (std::size_t i = h & mask_;; i = (i + 1) & mask_) {
    const std::uint64_t s = slots_[i];
    if (s == kEmpty) {
      const auto id = static_cast<std::uint32_t>(mesh_.positions.size());
      mesh_.positions.push_back({std::bit_cast<double>(k[0]), std::bit_cast<double>(k[1]),
                                 std::bit_cast<double>(k[2])});
      slots_[i] = tag | id;
      if (2 * mesh_.positions.size() > slots_.size()) grow();
      return id;
    }
    const auto id = static_cast<std::uint32_t>(s);
    if ((s & ~0xFFFFFFFFull) == tag && key_bits(mesh_.positions[id]) == k) return id;
  }
}

void Welder::add(Vec3 a, Vec3 b, Vec3 c) {
  assert(mesh_.positions.size() < std::numeric_limits<std::uint32_t>::max() - 3);
  ++added_;
  const Tri t{find_or_add(a), find_or_add(b), find_or_add(c)};
  if (t[0] != t[1] && t[1] != t[2] && t[0] != t[2]) {
    mesh_.triangles.push_back(t);
    mesh_.shell.push_back(part_);
  }
}

void Welder::set_part(const std::string& name) {
  const auto it = std::find(part_names_.begin(), part_names_.end(), name);
  part_ = static_cast<std::uint32_t>(it - part_names_.begin());
  if (it == part_names_.end()) part_names_.push_back(name);
}

Mesh Welder::take() {
  Mesh out = std::move(mesh_);
  out.shell_names = std::move(part_names_);
  mesh_ = Mesh{};
  added_ = 0;
  part_ = 0;
  part_names_ = {""};
  return out;
}

}  // namespace detail

Mesh weld_soup(const std::vector<Vec3>& corners) {
  assert(corners.size() % 3 == 0);
  detail::Welder welder(corners.size() / 3);
  for (std::size_t i = 0; i + 2 < corners.size(); i += 3)
    welder.add(corners[i], corners[i + 1], corners[i + 2]);
  return welder.take();
}

std::vector<std::uint32_t> edge_connected_shells(const Mesh& mesh, std::uint32_t* count) {
  const std::size_t nf = mesh.triangles.size();
  std::vector<std::uint32_t> parent(nf);
  for (std::size_t f = 0; f < nf; ++f) parent[f] = static_cast<std::uint32_t>(f);
  EdgeBuckets b = bucket_edges(mesh);
  // Sorting each lower vertex's bucket by upper vertex puts the users of one edge side by
  // side (a sort, not a pairwise scan, so a fan of many triangles around a vertex stays cheap).
  for (std::size_t v = 0; v + 1 < b.offset.size(); ++v) {
    const auto first = b.entry.begin() + b.offset[v], last = b.entry.begin() + b.offset[v + 1];
    std::sort(first, last);
    for (auto it = first; it != last && it + 1 != last; ++it)
      if (it->first == (it + 1)->first) unite(parent, it->second, (it + 1)->second);
  }
  // Number the shells by their first triangle.
  std::vector<std::uint32_t> shell(nf);
  std::uint32_t n = 0;
  for (std::size_t f = 0; f < nf; ++f) {
    const std::uint32_t r = find_root(parent, static_cast<std::uint32_t>(f));
    shell[f] = r == f ? n++ : shell[r];
  }
  if (count) *count = n;
  return shell;
}

}  // namespace machcut

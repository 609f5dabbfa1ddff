// Mesh import: units, axes, reading files (Assimp; binary STL directly), welding and shells.
#include "machcut/intake/import.h"

#include <assimp/BaseImporter.h>
#include <assimp/Importer.hpp>
#include <assimp/config.h>
#include <assimp/postprocess.h>
#include <assimp/scene.h>

#include <algorithm>
#include <array>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <functional>
#include <iterator>
#include <limits>
#include <map>
#include <memory>
#include <optional>
#include <set>
#include <span>
#include <system_error>
#include <utility>

#include "import_detail.h"
#include "machcut/common/errors.h"

namespace machcut {

namespace fs = std::filesystem;

// ---------------------------------------------------------------------------------- units --

namespace {
constexpr std::array<LengthUnit, 5> kUnits = {LengthUnit::m, LengthUnit::mm, LengthUnit::cm,
                                              LengthUnit::in, LengthUnit::ft};

const char* unit_long_name(LengthUnit u) {
  switch (u) {
    case LengthUnit::m: return "metres";
    case LengthUnit::mm: return "millimetres";
    case LengthUnit::cm: return "centimetres";
    case LengthUnit::in: return "inches";
    case LengthUnit::ft: return "feet";
  }
  return "?";
}

std::string short_number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.3g", v);
  return buf;
}
}  // namespace

std::optional<LengthUnit> parse_length_unit(std::string_view name) {
  for (LengthUnit u : kUnits)
    if (name == unit_name(u)) return u;
  return std::nullopt;
}

double metres_per_unit(LengthUnit unit) {
  switch (unit) {
    case LengthUnit::m: return 1.0;
    case LengthUnit::mm: return 0.001;
    case LengthUnit::cm: return 0.01;
    case LengthUnit::in: return 0.0254;  // exact by definition (1959), NIST SP 811 B.8
    case LengthUnit::ft: return 0.3048;  // exact by definition (1959), NIST SP 811 B.8
  }
  return 1.0;
}

const char* unit_name(LengthUnit unit) {
  switch (unit) {
    case LengthUnit::m: return "m";
    case LengthUnit::mm: return "mm";
    case LengthUnit::cm: return "cm";
    case LengthUnit::in: return "in";
    case LengthUnit::ft: return "ft";
  }
  return "?";
}

std::string unit_warning(double extent, LengthUnit unit) {
  constexpr double kLow = 0.05, kHigh = 200.0, kTypical = 10.0;
  if (!(extent > 0.0) || !std::isfinite(extent) || (extent >= kLow && extent <= kHigh)) return "";
  const double in_file_units = extent / metres_per_unit(unit);
  std::optional<LengthUnit> best;
  double best_distance = HUGE_VAL;
  for (LengthUnit u : kUnits) {
    const double as_u = in_file_units * metres_per_unit(u);
    const double distance = std::fabs(std::log10(as_u / kTypical));
    if (u != unit && as_u >= kLow && as_u <= kHigh && distance < best_distance) {
      best = u;
      best_distance = distance;
    }
  }
  const std::string head = "longest extent " + short_number(extent) + " m ";
  if (!best)
    return head + "is outside the plausible 0.05-200 m for any unit; check the model and --units";
  return head + "looks like " + unit_long_name(*best) + " (" +
         short_number(in_file_units * metres_per_unit(*best)) + " m); use --units " +
         unit_name(*best);
}

// ----------------------------------------------------------------------------------- axes --

std::optional<SignedAxis> parse_axis(std::string_view text) {
  SignedAxis a;
  if (!text.empty() && (text[0] == '+' || text[0] == '-')) {
    a.sign = text[0] == '-' ? -1 : 1;
    text.remove_prefix(1);
  }
  if (text.size() != 1) return std::nullopt;
  const char c = static_cast<char>(std::tolower(static_cast<unsigned char>(text[0])));
  if (c < 'x' || c > 'z') return std::nullopt;
  a.axis = c - 'x';
  return a;
}

void check_axes(const AxisMapping& m) {
  for (const SignedAxis& a : {m.flow, m.up})
    if (a.axis < 0 || a.axis > 2 || (a.sign != 1 && a.sign != -1))
      throw InputError("axes", "an axis must be one of +x -x +y -y +z -z");
  if (m.flow.axis == m.up.axis)
    throw InputError("axes", std::string("flow and up are both along file ") +
                                 static_cast<char>('x' + m.flow.axis) +
                                 "; they must be two different axes");
}

SignedAxis model_y_axis(const AxisMapping& m) {
  // Unit vectors e_flow, e_up in file axes; y = up × flow. For distinct axes i (flow) and
  // j (up), e_j × e_i = −ε_ijk e_k with k the third axis (Levi-Civita symbol).
  const int i = m.flow.axis, j = m.up.axis, k = 3 - i - j;
  const int cyclic = ((j - i + 3) % 3 == 1) ? 1 : -1;  // ε_ijk
  return {k, -cyclic * m.flow.sign * m.up.sign};
}

Vec3 apply_axes(const AxisMapping& m, Vec3 p) {
  const double c[3] = {p.x, p.y, p.z};
  const SignedAxis y = model_y_axis(m);
  return {m.flow.sign * c[m.flow.axis], y.sign * c[y.axis], m.up.sign * c[m.up.axis]};
}

std::string describe(const AxisMapping& m) {
  auto name = [](const SignedAxis& a) {
    return std::string(a.sign < 0 ? "-" : "+") + "file " + static_cast<char>('x' + a.axis);
  };
  return "model x = " + name(m.flow) + ", model y = " + name(model_y_axis(m)) +
         ", model z = " + name(m.up);
}

// ---------------------------------------------------------------------------------- files --

namespace {

// Open or published exchange formats only (README "Formats"): STL, OBJ, PLY, OFF, glTF
// (Khronos), COLLADA (Khronos), AMF (ISO/ASTM 52915), X3D (ISO/IEC 19775), all read by Assimp
// except binary STL. 3MF is left out: Assimp 5.2's 3MF reader aborts on a package without its
// root part (found by fuzz/fuzz_import.cpp).
constexpr const char* kExtensions[] = {".stl", ".obj", ".ply", ".off", ".gltf", ".glb",
                                       ".dae", ".amf", ".x3d"};

// File coordinates → model axes in metres, then into the welder.
struct Sink {
  const std::string& path;
  double scale;
  const AxisMapping& axes;
  detail::Welder& welder;
  void add(const Vec3* c) const {
    // Mesh indices are 32-bit; 1.4·10⁹ triangles is far beyond any max_file_bytes in use.
    if (welder.added() >= 1'400'000'000) throw InputError(path, "too many triangles (over 1.4 billion)");
    welder.add(scale * apply_axes(axes, c[0]), scale * apply_axes(axes, c[1]),
               scale * apply_axes(axes, c[2]));
  }
};

std::string lower_extension(const std::string& path) {
  std::string ext = fs::path(path).extension().string();
  for (char& c : ext) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return ext;
}

// Existence, kind, extension and size, before a byte is read. Returns the size.
std::uint64_t check_file(const std::string& path, const std::string& ext, std::uint64_t limit) {
  std::error_code ec;
  const fs::file_status st = fs::status(path, ec);
  if (!fs::exists(st)) throw InputError(path, "file not found");
  if (fs::is_directory(st)) throw InputError(path, "is a directory, not a mesh file");
  if (std::find(std::begin(kExtensions), std::end(kExtensions), ext) == std::end(kExtensions))
    throw InputError(path, "unknown file extension '" + ext +
                               "' (supported: .stl .obj .ply .off .gltf .glb .dae .amf .x3d)");
  const std::uint64_t size = fs::file_size(path, ec);
  if (ec) throw InputError(path, "cannot read the file size: " + ec.message());
  if (size == 0) throw InputError(path, "empty file (0 bytes)");
  if (size > limit)
    throw InputError(path, "file is " + std::to_string(size) + " bytes, over the limit of " +
                               std::to_string(limit) + " bytes");
  return size;
}

aiMatrix4x4t<double> to_double(const aiMatrix4x4& m) {
  return aiMatrix4x4t<double>(m.a1, m.a2, m.a3, m.a4, m.b1, m.b2, m.b3, m.b4, m.c1, m.c2, m.c3,
                              m.c4, m.d1, m.d2, m.d3, m.d4);
}

// The reader's name in messages ("the PLY reader failed ...").
const char* format_name(const std::string& ext) {
  if (ext == ".stl") return "STL";
  if (ext == ".obj") return "OBJ";
  if (ext == ".ply") return "PLY";
  if (ext == ".off") return "OFF";
  if (ext == ".gltf") return "glTF";
  if (ext == ".glb") return "GLB";
  if (ext == ".dae") return "COLLADA";
  if (ext == ".amf") return "AMF";
  return "X3D";
}

// One mesh placed by its node's accumulated transform, with the name of the part it belongs to.
struct Instance {
  const aiMesh* mesh;
  aiMatrix4x4t<double> xf;
  std::string part;
};

// A name the file gave (not one the reader made up: Assimp 5.2 names the nodes it creates
// itself "<STL_ASCII>", "<OBJRoot>" and the like, or after the file).
std::string given_name(const aiString& name, const std::string& file) {
  std::string s(name.C_Str(), std::min<std::size_t>(name.length, 200));
  for (char& c : s)
    if (static_cast<unsigned char>(c) < 0x20) c = ' ';
  while (!s.empty() && s.back() == ' ') s.pop_back();
  while (!s.empty() && s.front() == ' ') s.erase(s.begin());
  if (s.empty() || s.front() == '<' || s == file || s == "RootNode" || s == "Scene" ||
      s == "defaultobject" || s == "default")
    return "";
  // Assimp's glTF 2 reader names an unnamed node or mesh by its place: "nodes[3]", "meshes[0]".
  for (const char* made : {"nodes[", "meshes["})
    if (s.rfind(made, 0) == 0 && s.back() == ']') return "";
  return s;
}

// Every mesh instance of the node tree, depth first, a node's meshes before its children's.
// Its part: the name of its node, else of its mesh, else of the nearest named ancestor node,
// else "" (the file). Iterative: a glTF file may nest nodes deeper than the stack would take.
std::vector<Instance> instances_of(const aiScene& scene, const std::string& file) {
  std::vector<Instance> out;
  if (!scene.mRootNode) return out;
  struct Todo {
    const aiNode* node;
    aiMatrix4x4t<double> xf;
    std::string named;  // nearest named ancestor
  };
  std::vector<Todo> todo{{scene.mRootNode, {}, ""}};
  while (!todo.empty()) {
    const Todo t = todo.back();
    todo.pop_back();
    const aiMatrix4x4t<double> xf = t.xf * to_double(t.node->mTransformation);
    const std::string own = given_name(t.node->mName, file);
    for (unsigned i = 0; i < t.node->mNumMeshes; ++i)
      if (t.node->mMeshes[i] < scene.mNumMeshes && scene.mMeshes[t.node->mMeshes[i]]) {
        const aiMesh* m = scene.mMeshes[t.node->mMeshes[i]];
        std::string part = own;
        if (part.empty()) part = given_name(m->mName, file);
        if (part.empty()) part = t.named;
        out.push_back({m, xf, part});
      }
    for (unsigned i = t.node->mNumChildren; i-- > 0;)
      if (t.node->mChildren[i]) todo.push_back({t.node->mChildren[i], xf, own.empty() ? t.named : own});
  }
  return out;
}

// Sends the triangles of one mesh instance, placed by its transform; counts the rest.
void append_mesh(const aiMesh& mesh, const aiMatrix4x4t<double>& xf, const Sink& sink,
                 detail::ReadCounts& counts) {
  if ((mesh.mNumVertices && !mesh.mVertices) || (mesh.mNumFaces && !mesh.mFaces))
    throw InputError(sink.path, "not a readable mesh: the reader returned a mesh without its data");
  counts.vertices_read += mesh.mNumVertices;
  for (unsigned f = 0; f < mesh.mNumFaces; ++f) {
    const aiFace& face = mesh.mFaces[f];
    if (face.mNumIndices != 3 || !face.mIndices) {
      ++counts.ignored_primitives;
      continue;
    }
    Vec3 corners[3];
    for (unsigned c = 0; c < 3; ++c) {
      const unsigned v = face.mIndices[c];
      if (v >= mesh.mNumVertices)
        throw InputError(sink.path, "face " + std::to_string(f + 1) + " uses vertex index " +
                                        std::to_string(v) + ", outside the " +
                                        std::to_string(mesh.mNumVertices) + " vertices");
      const aiVector3D& q = mesh.mVertices[v];
      const aiVector3t<double> p = xf * aiVector3t<double>(q.x, q.y, q.z);
      corners[c] = {p.x, p.y, p.z};
      if (!is_finite(corners[c]))
        throw InputError(sink.path, "NaN or infinite coordinate at vertex " +
                                        std::to_string(v + 1) + " (face " + std::to_string(f + 1) + ")");
    }
    sink.add(corners);
  }
}

// Leaves `importer` only the readers for `ext` (".ply"). Otherwise Assimp 5.2 hands a file
// that its extension's reader declines to whichever reader recognises the content: a ".gltf"
// file holding a broken PLY header reached the PLY reader, past the PLY checks, and hung it
// (found by fuzz/fuzz_import.cpp).
void keep_readers_for(Assimp::Importer& importer, const std::string& ext) {
  std::vector<Assimp::BaseImporter*> others;
  for (std::size_t i = 0; i < importer.GetImporterCount(); ++i) {
    Assimp::BaseImporter* reader = importer.GetImporter(i);
    std::set<std::string> handles;
    if (reader) reader->GetExtensionList(handles);
    if (reader && !handles.count(ext.substr(1))) others.push_back(reader);
  }
  for (Assimp::BaseImporter* reader : others)
    if (importer.UnregisterLoader(reader) == aiReturn_SUCCESS) delete reader;  // no longer owned
}

// An ASCII STL whose facets do not all have three vertices (Assimp's own STL writer stores
// points and lines as facets of one and two vertices): the text without those facets, and
// their count in `*dropped`; nullopt when every facet has three (the file is read as it is).
// Assimp 5.2 would otherwise refuse the file ("invalid number of vertices") or, when the
// stray vertices add up to a multiple of three, silently make triangles of unrelated vertices.
std::optional<std::string> stl_without_stray_facets(const std::string& path, std::size_t* dropped) {
  std::ifstream in(path, std::ios::binary);
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  if (!in && !in.eof()) throw InputError(path, "cannot read the file");
  std::vector<std::pair<std::size_t, std::size_t>> cut;  // [begin, end) of facets to drop
  std::size_t facet_begin = std::string::npos, vertices = 0;
  const auto is_space = [](char c) { return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f' || c == '\v'; };
  for (std::size_t i = 0; i < text.size();) {
    while (i < text.size() && is_space(text[i])) ++i;
    const std::size_t b = i;
    while (i < text.size() && !is_space(text[i])) ++i;
    std::string tok = text.substr(b, std::min<std::size_t>(i - b, 9));
    for (char& c : tok) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    if (i - b == 5 && tok == "facet") {
      facet_begin = b;
      vertices = 0;
    } else if (i - b == 6 && tok == "vertex") {
      ++vertices;
    } else if (i - b == 8 && tok == "endfacet" && facet_begin != std::string::npos) {
      if (vertices != 3) cut.push_back({facet_begin, i});
      facet_begin = std::string::npos;
    }
  }
  *dropped = cut.size();
  if (cut.empty()) return std::nullopt;
  std::string kept;
  kept.reserve(text.size());
  std::size_t at = 0;
  for (const auto& [b, e] : cut) {
    kept.append(text, at, b - at);
    at = e;
  }
  kept.append(text, at, std::string::npos);
  return kept;
}

// Assimp's reading of the sink's file, every triangle into the sink. (In the reader's child
// process too the scene is freed: the shells found there after it reuse its memory, which
// was faster than fresh pages: +5 % against +14 % of a 1M-triangle PLY's in-process load,
// measured in a virtual machine where each page fault is expensive.)
detail::ReadCounts read_with_assimp(const Sink& sink) {
  const auto importer = std::make_unique<Assimp::Importer>();
  keep_readers_for(*importer, lower_extension(sink.path));
  // The file's own axes, as for every other format: --flow and --up map them (COLLADA's
  // up_axis would otherwise turn a Z_UP model to Y up).
  importer->SetPropertyBool(AI_CONFIG_IMPORT_COLLADA_IGNORE_UP_DIRECTION, true);
  std::size_t stray = 0;
  std::optional<std::string> text;
  if (lower_extension(sink.path) == ".stl" &&
      detail::classify_stl(sink.path, fs::file_size(sink.path)) == detail::StlKind::ascii)
    text = stl_without_stray_facets(sink.path, &stray);
  const aiScene* scene = text ? importer->ReadFileFromMemory(text->data(), text->size(),
                                                             aiProcess_Triangulate, "stl")
                              : importer->ReadFile(sink.path, aiProcess_Triangulate);
  if (!scene)
    throw InputError(sink.path,
                     "not a readable mesh: " + detail::tidy_message(importer->GetErrorString()));
  detail::ReadCounts counts;
  counts.ignored_primitives = stray;
  for (const Instance& part : instances_of(*scene, fs::path(sink.path).filename().string())) {
    sink.welder.set_part(part.part);
    append_mesh(*part.mesh, part.xf, sink, counts);
  }
  if (counts.vertices_read == 0)
    throw InputError(sink.path, "no mesh found in the file (no vertices or faces)");
  return counts;
}

// What reading one file gives: its welded triangles (one shell) and the counts for the report.
struct FileRead {
  Mesh mesh;
  std::size_t added = 0;  // triangles read, before degenerate ones were dropped
  detail::ReadCounts counts;
};

std::string basename(const std::string& path) { return fs::path(path).filename().string(); }

// Splits a file's welded triangles (part labels in mesh.shell, part names in shell_names)
// into edge-connected shells and names them (import.h): "FILE:PART", "FILE:PART#k" when the
// part holds several shells, "FILE:A+B" for a shell whose triangles the file puts in several
// parts, "FILE" / "FILE#k" for triangles in no named part and for every shell of a file that
// holds one part only.
void name_shells(Mesh& mesh, const std::string& file) {
  const std::vector<std::uint32_t> part = std::move(mesh.shell);
  const std::vector<std::string> part_names = std::move(mesh.shell_names);
  std::uint32_t count = 0;
  mesh.shell = edge_connected_shells(mesh, &count);
  // The named parts of each shell, in order of first triangle.
  std::vector<std::vector<std::uint32_t>> parts_of(count);
  for (std::size_t f = 0; f < mesh.triangles.size(); ++f) {
    std::vector<std::uint32_t>& p = parts_of[mesh.shell[f]];
    const std::uint32_t id = f < part.size() ? part[f] : 0;
    if (id < part_names.size() && !part_names[id].empty() && std::find(p.begin(), p.end(), id) == p.end())
      p.push_back(id);
  }
  std::vector<std::string> label(count, file);
  // A file whose triangles are all in one part is that part: named by the file alone.
  const bool one_part = std::all_of(part.begin(), part.end(), [&](std::uint32_t p) { return p == part.front(); });
  for (std::uint32_t s = 0; s < count && !one_part; ++s) {
    std::string joined;
    for (std::size_t i = 0; i < parts_of[s].size() && i < 3; ++i)
      joined += (i ? "+" : "") + part_names[parts_of[s][i]];
    if (parts_of[s].size() > 3) joined += "+" + std::to_string(parts_of[s].size() - 3) + " more";
    if (!joined.empty()) label[s] = file + ":" + joined;
  }
  std::map<std::string, std::uint32_t> seen, total;
  for (const std::string& l : label) ++total[l];
  mesh.shell_names.resize(count);
  for (std::uint32_t s = 0; s < count; ++s)
    mesh.shell_names[s] = total[label[s]] > 1 ? label[s] + "#" + std::to_string(++seen[label[s]]) : label[s];
}

// Runs `feed` into a fresh welder (sized for a file of `size` bytes: binary STL takes 50 bytes
// per triangle, text formats more, so this over-sizes at worst) and finds and names the
// shells. In the reader's child process this runs there, on the memory the freed Assimp scene
// leaves: the parent then touches only the final arrays (finding the shells in the parent, on
// pages it had to fault in, cost ~12 % of a 1M-triangle PLY's load in a virtual machine, measured).
FileRead weld_file(const std::string& path, std::uint64_t size, const ImportOptions& options,
                   const std::function<detail::ReadCounts(const Sink&)>& feed) {
  FileRead read;
  {
    detail::Welder welder(static_cast<std::size_t>(size / 50));
    const Sink sink{path, metres_per_unit(options.unit), options.axes, welder};
    read.counts = feed(sink);
    read.added = welder.added();
    read.mesh = welder.take();
  }
  if (!read.mesh.triangles.empty()) name_shells(read.mesh, basename(path));
  return read;
}

// The welded mesh handed back from the reader's process: this header, the positions, the
// triangles, the shell of each triangle, the shell names (each ended by a zero byte). The weld
// runs in the child, where Assimp's memory is: the parent then touches only the final arrays
// (24 bytes per vertex + 16 per triangle), not a welder's hash table and growing arrays in
// memory it shares copy-on-write with the child.
struct WeldedHeader {
  std::uint64_t vertices = 0;
  std::uint64_t triangles = 0;
  std::uint64_t added = 0;
  std::uint64_t parts = 0;
  std::uint64_t name_bytes = 0;
};
static_assert(sizeof(Vec3) == 24 && sizeof(Tri) == 12, "stored as they are in memory");

// Hands `read` to the parent; it and the header and names made here stay in place for the
// parent to copy after the reader returns (left to the child's _exit).
void store_welded(const FileRead& read, const detail::ResultStore& store) {
  struct Extra {
    WeldedHeader header;
    std::string names;
  };
  auto* extra = new Extra;
  for (const std::string& n : read.mesh.shell_names) (extra->names += n) += '\0';
  extra->header = {read.mesh.positions.size(), read.mesh.triangles.size(), read.added,
                   read.mesh.shell_names.size(), extra->names.size()};
  store({std::as_bytes(std::span(&extra->header, 1)), std::as_bytes(std::span(read.mesh.positions)),
         std::as_bytes(std::span(read.mesh.triangles)), std::as_bytes(std::span(read.mesh.shell)),
         std::as_bytes(std::span(extra->names))});
}

FileRead load_welded(const std::string& path, const detail::ResultSource& result,
                     const detail::ReadCounts& counts) {
  WeldedHeader h;
  const auto damaged = [&] { return InputError(path, "the reader's result is damaged"); };
  if (result.size < sizeof h) throw damaged();
  result.read(reinterpret_cast<std::byte*>(&h), sizeof h);
  if (h.vertices > result.size || h.triangles > result.size || h.name_bytes > result.size ||
      h.parts == 0 || h.parts > h.name_bytes + 1 ||
      result.size != sizeof h + h.vertices * sizeof(Vec3) +
                         h.triangles * (sizeof(Tri) + sizeof(std::uint32_t)) + h.name_bytes)
    throw damaged();
  FileRead read;
  read.added = static_cast<std::size_t>(h.added);
  read.counts = counts;
  // The arrays are first touched by the copy: on huge pages where the kernel offers them (on
  // 4 KiB pages the touch took 90 ms of a 1M-triangle PLY's 700 ms in a virtual machine, measured).
  const auto take = [&](auto& v, std::size_t n) {
    v.reserve(n);
    detail::advise_huge_pages(v.data(), n * sizeof v[0]);
    v.resize(n);
    result.read(reinterpret_cast<std::byte*>(v.data()), n * sizeof v[0]);
  };
  std::string names;
  take(read.mesh.positions, h.vertices);
  take(read.mesh.triangles, h.triangles);
  take(read.mesh.shell, h.triangles);
  take(names, h.name_bytes);
  for (std::size_t at = 0; at < names.size();) {
    const std::size_t end = names.find('\0', at);
    if (end == std::string::npos) throw damaged();
    read.mesh.shell_names.push_back(names.substr(at, end - at));
    at = end + 1;
  }
  if (read.mesh.shell_names.size() != h.parts) throw damaged();
  for (std::size_t f = 0; f < read.mesh.triangles.size(); ++f) {
    const Tri& t = read.mesh.triangles[f];
    if (t[0] >= h.vertices || t[1] >= h.vertices || t[2] >= h.vertices || read.mesh.shell[f] >= h.parts)
      throw damaged();
  }
  return read;
}

FileRead read_file(const std::string& path, const std::string& ext, std::uint64_t size,
                   const ImportOptions& options, detail::LeavingChildren& leaving) {
  detail::check_before_assimp(path, ext, size);
  if (ext == ".stl" && detail::classify_stl(path, size) == detail::StlKind::binary &&
      options.fast_binary_stl)
    return weld_file(path, size, options, [&](const Sink& sink) {
      detail::read_binary_stl(path, size, [&](const Vec3* c) { sink.add(c); });
      return detail::ReadCounts{3 * sink.welder.added(), 0};
    });
  if (!options.isolate_reader)
    return weld_file(path, size, options, [](const Sink& sink) { return read_with_assimp(sink); });
  FileRead read;
  detail::read_isolated(
      path, format_name(ext), detail::default_reader_limits(size),
      [&](const detail::ResultStore& store) {
        // Left for the child's _exit: the parent copies the arrays from here.
        const auto* r = new FileRead(
            weld_file(path, size, options, [](const Sink& sink) { return read_with_assimp(sink); }));
        store_welded(*r, store);
        return r->counts;
      },
      [&](const detail::ResultSource& result, const detail::ReadCounts& counts) {
        read = load_welded(path, result, counts);
      },
      &leaving);
  return read;
}

// The welded triangles of one file (its shells found and named by weld_file) checked for
// emptiness; counts and warnings into `report`.
Mesh finish_file(const std::string& path, FileRead read, ImportReport* report) {
  Mesh mesh = std::move(read.mesh);
  const std::size_t added = read.added, dropped = added - mesh.triangles.size();
  if (mesh.triangles.empty())
    throw InputError(path, added == 0 ? "no triangles in the file"
                                      : "no triangles left: all " + std::to_string(dropped) +
                                            " are degenerate (corners coincide)");
  if (report) {
    report->input_triangles += added;
    report->input_corners += read.counts.vertices_read;
    if (read.counts.ignored_primitives)
      report->warnings.push_back(path + ": " + std::to_string(read.counts.ignored_primitives) +
                                 " points or lines ignored (only triangles are used)");
  }
  if (dropped && report) {
    report->degenerate_triangles += dropped;
    report->warnings.push_back(path + ": " + std::to_string(dropped) +
                               " degenerate triangles dropped (two or three corners coincide)");
  }
  return mesh;
}

Mesh import_one(const std::string& path, const ImportOptions& options, ImportReport* report,
                detail::LeavingChildren& leaving) {
  const std::string ext = lower_extension(path);
  const std::uint64_t size = check_file(path, ext, options.max_file_bytes);
  return finish_file(path, read_file(path, ext, size, options, leaving), report);
}

std::string join(const std::vector<std::string>& paths) {
  std::string s;
  for (const std::string& p : paths) s += (s.empty() ? "" : ", ") + p;
  return s;
}

}  // namespace

Mesh import_meshes(const std::vector<std::string>& paths, const ImportOptions& options,
                   ImportReport* report) {
  check_axes(options.axes);
  if (paths.empty()) throw InputError("", "no input files");
  std::vector<Mesh> parts;
  detail::LeavingChildren leaving;  // reader processes end while their shells are found
  for (const std::string& path : paths) parts.push_back(import_one(path, options, report, leaving));
  Mesh all = parts.size() == 1 ? std::move(parts.front()) : concatenate(parts);
  const Box3 box = bounding_box(all);
  const double extent = std::max({box.hi.x - box.lo.x, box.hi.y - box.lo.y, box.hi.z - box.lo.z});
  const std::string w = unit_warning(extent, options.unit);
  if (!w.empty() && report) report->warnings.push_back(join(paths) + ": " + w);
  return all;
}

}  // namespace machcut

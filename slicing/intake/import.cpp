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
#include <functional>
#include <limits>
#include <memory>
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

// One mesh placed by its node's accumulated transform.
struct Instance {
  const aiMesh* mesh;
  aiMatrix4x4t<double> xf;
};

// Every mesh instance of the node tree, depth first, a node's meshes before its children's.
// Iterative: a glTF file may nest nodes deeper than the stack would take.
std::vector<Instance> instances_of(const aiScene& scene) {
  std::vector<Instance> out;
  if (!scene.mRootNode) return out;
  std::vector<std::pair<const aiNode*, aiMatrix4x4t<double>>> todo{{scene.mRootNode, {}}};
  while (!todo.empty()) {
    const auto [node, parent] = todo.back();
    todo.pop_back();
    const aiMatrix4x4t<double> xf = parent * to_double(node->mTransformation);
    for (unsigned i = 0; i < node->mNumMeshes; ++i)
      if (node->mMeshes[i] < scene.mNumMeshes && scene.mMeshes[node->mMeshes[i]])
        out.push_back({scene.mMeshes[node->mMeshes[i]], xf});
    for (unsigned i = node->mNumChildren; i-- > 0;)
      if (node->mChildren[i]) todo.push_back({node->mChildren[i], xf});
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

// Assimp's reading of the sink's file, every triangle into the sink. `in_child`: the scene is
// left for the reader's process to drop at its _exit — freeing its million small blocks took
// ~8% of a 1M-triangle PLY read here (measured), and no one needs that memory back.
detail::ReadCounts read_with_assimp(const Sink& sink, bool in_child) {
  auto* importer = new Assimp::Importer;
  const std::unique_ptr<Assimp::Importer> owner(in_child ? nullptr : importer);
  keep_readers_for(*importer, lower_extension(sink.path));
  // The file's own axes, as for every other format: --flow and --up map them (COLLADA's
  // up_axis would otherwise turn a Z_UP model to Y up).
  importer->SetPropertyBool(AI_CONFIG_IMPORT_COLLADA_IGNORE_UP_DIRECTION, true);
  const aiScene* scene = importer->ReadFile(sink.path, aiProcess_Triangulate);
  if (!scene)
    throw InputError(sink.path,
                     "not a readable mesh: " + detail::tidy_message(importer->GetErrorString()));
  detail::ReadCounts counts;
  for (const Instance& part : instances_of(*scene)) append_mesh(*part.mesh, part.xf, sink, counts);
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

// Runs `feed` into a fresh welder (sized for a file of `size` bytes: binary STL takes 50 bytes
// per triangle, text formats more, so this over-sizes at worst).
FileRead weld_file(const std::string& path, std::uint64_t size, const ImportOptions& options,
                   const std::function<detail::ReadCounts(const Sink&)>& feed) {
  detail::Welder welder(static_cast<std::size_t>(size / 50));
  const Sink sink{path, metres_per_unit(options.unit), options.axes, welder};
  FileRead read;
  read.counts = feed(sink);
  read.added = welder.added();
  read.mesh = welder.take();
  return read;
}

// The welded mesh handed back from the reader's process: this header, the positions, the
// triangles. The weld runs in the child, where Assimp's memory is: the parent then touches
// only the final arrays (24 bytes per vertex + 12 per triangle), not a welder's hash table
// and growing arrays in memory it shares copy-on-write with the child.
struct WeldedHeader {
  std::uint64_t vertices = 0;
  std::uint64_t triangles = 0;
  std::uint64_t added = 0;
};
static_assert(sizeof(Vec3) == 24 && sizeof(Tri) == 12, "stored as they are in memory");

void store_welded(const FileRead& read, const detail::ResultStore& store) {
  const WeldedHeader h{read.mesh.positions.size(), read.mesh.triangles.size(), read.added};
  const std::size_t pos = h.vertices * sizeof(Vec3), tri = h.triangles * sizeof(Tri);
  std::byte* out = store(sizeof h + pos + tri);
  std::memcpy(out, &h, sizeof h);
  if (pos) std::memcpy(out + sizeof h, read.mesh.positions.data(), pos);
  if (tri) std::memcpy(out + sizeof h + pos, read.mesh.triangles.data(), tri);
}

FileRead load_welded(const std::string& path, std::span<const std::byte> bytes,
                     const detail::ReadCounts& counts) {
  WeldedHeader h;
  if (bytes.size() >= sizeof h) std::memcpy(&h, bytes.data(), sizeof h);
  if (bytes.size() < sizeof h || h.vertices > bytes.size() || h.triangles > bytes.size() ||
      bytes.size() != sizeof h + h.vertices * sizeof(Vec3) + h.triangles * sizeof(Tri))
    throw InputError(path, "the reader's result is damaged");
  FileRead read;
  read.added = static_cast<std::size_t>(h.added);
  read.counts = counts;
  const auto* pos = reinterpret_cast<const Vec3*>(bytes.data() + sizeof h);
  const auto* tri = reinterpret_cast<const Tri*>(pos + h.vertices);
  read.mesh.positions.assign(pos, pos + h.vertices);
  read.mesh.triangles.assign(tri, tri + h.triangles);
  for (const Tri& t : read.mesh.triangles)
    if (t[0] >= h.vertices || t[1] >= h.vertices || t[2] >= h.vertices)
      throw InputError(path, "the reader's result is damaged");
  read.mesh.shell_names = {""};  // shells are found by finish_file, as for the Welder's mesh
  return read;
}

FileRead read_file(const std::string& path, const std::string& ext, std::uint64_t size,
                   const ImportOptions& options) {
  detail::check_before_assimp(path, ext, size);
  if (ext == ".stl" && detail::classify_stl(path, size) == detail::StlKind::binary &&
      options.fast_binary_stl)
    return weld_file(path, size, options, [&](const Sink& sink) {
      detail::read_binary_stl(path, size, [&](const Vec3* c) { sink.add(c); });
      return detail::ReadCounts{3 * sink.welder.added(), 0};
    });
  if (!options.isolate_reader)
    return weld_file(path, size, options, [](const Sink& sink) { return read_with_assimp(sink, false); });
  FileRead read;
  detail::read_isolated(
      path, format_name(ext), detail::default_reader_limits(size),
      [&](const detail::ResultStore& store) {
        const FileRead r =
            weld_file(path, size, options, [](const Sink& sink) { return read_with_assimp(sink, true); });
        store_welded(r, store);
        return r.counts;
      },
      [&](std::span<const std::byte> bytes, const detail::ReadCounts& counts) {
        read = load_welded(path, bytes, counts);
      });
  return read;
}

std::string basename(const std::string& path) { return fs::path(path).filename().string(); }

// The welded triangles of one file, its shells named; counts and warnings into `report`.
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
  std::uint32_t count = 0;
  mesh.shell = edge_connected_shells(mesh, &count);
  const std::string name = basename(path);
  mesh.shell_names.assign(count, name);
  if (count > 1)
    for (std::uint32_t k = 0; k < count; ++k) mesh.shell_names[k] += "#" + std::to_string(k + 1);
  return mesh;
}

Mesh import_one(const std::string& path, const ImportOptions& options, ImportReport* report) {
  const std::string ext = lower_extension(path);
  const std::uint64_t size = check_file(path, ext, options.max_file_bytes);
  return finish_file(path, read_file(path, ext, size, options), report);
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
  for (const std::string& path : paths) parts.push_back(import_one(path, options, report));
  Mesh all = parts.size() == 1 ? std::move(parts.front()) : concatenate(parts);
  const Box3 box = bounding_box(all);
  const double extent = std::max({box.hi.x - box.lo.x, box.hi.y - box.lo.y, box.hi.z - box.lo.z});
  const std::string w = unit_warning(extent, options.unit);
  if (!w.empty() && report) report->warnings.push_back(join(paths) + ": " + w);
  return all;
}

}  // namespace machcut

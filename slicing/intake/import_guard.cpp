// Checks on PLY and OFF files before Assimp reads them: declared counts against the file size,
// and (OFF) face indices against the vertex count.
//
// Measured with Assimp 5.2.5 on this machine: a PLY header declaring 3·10⁹ vertices in a
// 200-byte file ends in std::bad_alloc (smaller forged counts would allocate gigabytes and
// succeed); an OFF header declaring 3·10⁸ vertices in a 60-byte file ran for over 20 s; an
// OFF face index past the vertex list is silently clamped to a valid vertex.
#include <fstream>
#include <sstream>

#include "import_detail.h"
#include "machcut/common/errors.h"

namespace machcut::detail {

namespace {

// Bytes of one PLY scalar type; 0 for an unknown name (Bourke, "PLY — Polygon File Format",
// 1994: char uchar short ushort int uint float double, plus the sized aliases int8 … float64).
std::uint64_t ply_type_bytes(const std::string& t) {
  if (t == "char" || t == "uchar" || t == "int8" || t == "uint8") return 1;
  if (t == "short" || t == "ushort" || t == "int16" || t == "uint16") return 2;
  if (t == "int" || t == "uint" || t == "float" || t == "int32" || t == "uint32" ||
      t == "float32")
    return 4;
  if (t == "double" || t == "float64") return 8;
  return 0;
}

struct PlyElement {
  std::string name;
  std::uint64_t count = 0;
  std::uint64_t min_bytes = 0;  // the fewest bytes one element can take
};

// Parses the PLY header; the minimum element sizes assume the file's format (ASCII: at least
// one digit and one separator per property).
std::vector<PlyElement> read_ply_header(std::istream& in, std::uint64_t* header_bytes) {
  std::vector<PlyElement> elements;
  bool ascii = true;
  std::string line;
  while (std::getline(in, line)) {
    std::istringstream words(line);
    std::string key;
    words >> key;
    if (key == "format") {
      std::string f;
      words >> f;
      ascii = f == "ascii";
    } else if (key == "element") {
      PlyElement e;
      words >> e.name >> e.count;
      elements.push_back(e);
    } else if (key == "property" && !elements.empty()) {
      std::string type;
      words >> type;
      if (type == "list") words >> type;  // the count type: an empty list still stores it
      elements.back().min_bytes += ascii ? 2 : ply_type_bytes(type);
    } else if (key == "end_header") {
      break;
    }
  }
  *header_bytes = in ? static_cast<std::uint64_t>(in.tellg()) : 0;
  for (PlyElement& e : elements) e.min_bytes = std::max<std::uint64_t>(e.min_bytes, 1);
  return elements;
}

void check_ply(const std::string& path, std::uint64_t size) {
  std::ifstream in(path, std::ios::binary);
  std::uint64_t header = 0;
  const std::vector<PlyElement> elements = read_ply_header(in, &header);
  std::uint64_t need = header;
  std::string what;
  for (const PlyElement& e : elements) {
    // Saturating: a forged count must not wrap around to a small number.
    const std::uint64_t room = e.min_bytes ? (size / e.min_bytes) : size;
    need = e.count > room ? size + 1 : need + e.count * e.min_bytes;
    what += (what.empty() ? "" : ", ") + std::to_string(e.count) + " " + e.name;
    if (need > size)
      throw InputError(path, "PLY header declares " + what + ", more than the file's " +
                                 std::to_string(size) + " bytes can hold");
  }
}

// Next line that is neither blank nor a '#' comment; false at the end of the file.
bool next_content_line(std::istream& in, std::string* line) {
  while (std::getline(in, *line)) {
    const auto first = line->find_first_not_of(" \t\r");
    if (first != std::string::npos && (*line)[first] != '#') return true;
  }
  return false;
}

void check_off_faces(const std::string& path, std::istream& in, std::uint64_t nv,
                     std::uint64_t nf) {
  std::string line;
  for (std::uint64_t i = 0; i < nv; ++i)
    if (!next_content_line(in, &line))
      throw InputError(path, "OFF file ends after " + std::to_string(i) + " of its " +
                                 std::to_string(nv) + " declared vertices");
  for (std::uint64_t f = 0; f < nf; ++f) {
    if (!next_content_line(in, &line))
      throw InputError(path, "OFF file ends after " + std::to_string(f) + " of its " +
                                 std::to_string(nf) + " declared faces");
    std::istringstream words(line);
    long long n = 0, index = 0;
    words >> n;
    for (long long k = 0; k < n && words >> index; ++k)
      if (index < 0 || static_cast<std::uint64_t>(index) >= nv)
        throw InputError(path, "OFF face " + std::to_string(f + 1) + " uses vertex index " +
                                   std::to_string(index) + ", outside 0.." +
                                   std::to_string(nv == 0 ? 0 : nv - 1));
  }
}

void check_off(const std::string& path, std::uint64_t size) {
  std::ifstream in(path, std::ios::binary);
  std::string line;
  if (!next_content_line(in, &line)) return;  // empty: reported by the caller
  std::istringstream words(line);
  std::string magic;
  words >> magic;
  if (magic.size() < 3 || magic.compare(magic.size() - 3, 3, "OFF") != 0) return;  // Assimp says
  std::uint64_t nv = 0, nf = 0;
  if (!(words >> nv >> nf)) {  // the counts may be on the next line
    if (!next_content_line(in, &line)) return;
    std::istringstream counts(line);
    if (!(counts >> nv >> nf)) return;
  }
  // ASCII OFF: a vertex line takes at least 6 bytes ("0 0 0\n"), a face at least 4 ("1 0\n").
  if (nv > size / 6 || nf > size / 4 || nv * 6 + nf * 4 > size)
    throw InputError(path, "OFF header declares " + std::to_string(nv) + " vertices and " +
                               std::to_string(nf) + " faces, more than the file's " +
                               std::to_string(size) + " bytes can hold");
  check_off_faces(path, in, nv, nf);
}

}  // namespace

void check_declared_counts(const std::string& path, const std::string& ext, std::uint64_t size) {
  if (ext == ".ply") check_ply(path, size);
  if (ext == ".off") check_off(path, size);
}

}  // namespace machcut::detail

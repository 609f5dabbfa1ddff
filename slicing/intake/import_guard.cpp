// Guards around the file readers: strict checks of PLY and OFF files before Assimp reads them,
// and the child process every Assimp read runs in.
//
// Measured with Assimp 5.2.5 on this machine (mutation fuzzing, issue 13):
//   - a PLY header declaring 3·10⁹ vertices in a 200-byte file ends in std::bad_alloc (smaller
//     forged counts allocate gigabytes and succeed); an OFF header declaring 3·10⁸ vertices in a
//     60-byte file runs for over 20 s;
//   - a PLY header line "vertex end_header" makes the reader loop forever;
//   - a PLY face of 0 corners aborts the process (ai_assert in TriangulateProcess.cpp);
//     a binary PLY list count that does not match the data reads past it (SIGSEGV);
//   - an OFF face of 0 or more than 9 corners is dropped without a word; an OFF face index past
//     the vertex list is clamped to the last vertex; a comment line in the OFF body is an error;
//   - ASCII PLY is read one element per line: a line with too few values takes the rest from
//     nowhere, two elements on one line shift everything after them;
//   - "1,5" reads as 1.5 in OFF vertex lines but "0,1" in an index list reads as 0.
// The checks below refuse all of these before Assimp sees the file; what they miss (and every
// other format Assimp reads) is contained by read_isolated.
#include <fcntl.h>
#include <malloc.h>
#include <poll.h>
#include <signal.h>
#include <sys/mman.h>
#include <sys/prctl.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/uio.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <bit>
#include <cerrno>
#include <charconv>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <limits>
#include <new>
#include <optional>

#include "import_detail.h"
#include "machcut/common/errors.h"

#if defined(__SANITIZE_ADDRESS__)
#define MACHCUT_UNDER_ASAN 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#define MACHCUT_UNDER_ASAN 1
#endif
#endif

namespace machcut::detail {

namespace {

// ------------------------------------------------------------------------- text helpers --

// A file mapped read-only for one pass of checks (no copy of the file is held).
class MappedFile {
 public:
  MappedFile(const std::string& path, std::uint64_t size) : size_(static_cast<std::size_t>(size)) {
    const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
    if (fd < 0) throw InputError(path, std::string("cannot open the file: ") + std::strerror(errno));
    void* p = size_ ? ::mmap(nullptr, size_, PROT_READ, MAP_PRIVATE, fd, 0) : nullptr;
    const int err = errno;
    ::close(fd);
    if (p == MAP_FAILED) throw InputError(path, std::string("cannot read the file: ") + std::strerror(err));
    data_ = static_cast<const char*>(p);
  }
  ~MappedFile() {
    if (data_) ::munmap(const_cast<char*>(data_), size_);
  }
  MappedFile(const MappedFile&) = delete;
  MappedFile& operator=(const MappedFile&) = delete;
  std::string_view text() const { return {data_, size_}; }

 private:
  const char* data_ = nullptr;
  std::size_t size_ = 0;
};

// 'text' for a message: at most 40 characters, control characters shown as '?'.
std::string quote(std::string_view t) {
  constexpr std::size_t kMax = 40;
  std::string s = "'";
  for (std::size_t i = 0; i < t.size() && i < kMax; ++i) {
    const auto c = static_cast<unsigned char>(t[i]);
    s += (c < 0x20 || c == 0x7f) ? '?' : static_cast<char>(c);
  }
  return s + (t.size() > kMax ? "...'" : "'");
}

// Lines of a text ("\n" or "\r\n" ends), numbered from 1.
class Lines {
 public:
  explicit Lines(std::string_view text) : text_(text) {}
  bool next(std::string_view* line) {
    if (pos_ >= text_.size()) return false;
    const std::size_t end = text_.find('\n', pos_);
    const std::size_t stop = end == std::string_view::npos ? text_.size() : end;
    *line = text_.substr(pos_, stop - pos_);
    if (!line->empty() && line->back() == '\r') line->remove_suffix(1);
    pos_ = end == std::string_view::npos ? text_.size() : end + 1;
    ++number_;
    return true;
  }
  std::uint64_t number() const { return number_; }  // of the line last returned
  std::size_t offset() const { return pos_; }        // just after it

 private:
  std::string_view text_;
  std::size_t pos_ = 0;
  std::uint64_t number_ = 0;
};

// Separators as Assimp's text readers take them: space and tab only ('\r', '\f' and NUL end a
// line there, so inside a line they are refused as part of a token).
bool is_space(char c) { return c == ' ' || c == '\t'; }

// Takes the next white-space-separated token off the front of `rest`; false when none is left.
bool next_token(std::string_view& rest, std::string_view* token) {
  std::size_t i = 0;
  while (i < rest.size() && is_space(rest[i])) ++i;
  std::size_t j = i;
  while (j < rest.size() && !is_space(rest[j])) ++j;
  *token = rest.substr(i, j - i);
  rest.remove_prefix(j);
  return j > i;
}

bool is_blank(std::string_view line) {
  return std::all_of(line.begin(), line.end(), is_space);
}

std::string_view before_comment(std::string_view line) { return line.substr(0, line.find('#')); }

bool is_digit(char c) { return c >= '0' && c <= '9'; }

bool all_digits(std::string_view t) { return !t.empty() && std::all_of(t.begin(), t.end(), is_digit); }

// [+-] digits
bool is_integer_syntax(std::string_view t) {
  if (!t.empty() && (t[0] == '+' || t[0] == '-')) t.remove_prefix(1);
  return all_digits(t);
}

// [+-] (digits [. [digits]] | . digits) [(e|E) [+-] digits]
bool is_decimal_syntax(std::string_view t) {
  std::size_t i = 0, n = t.size();
  if (i < n && (t[i] == '+' || t[i] == '-')) ++i;
  std::size_t digits = 0;
  while (i < n && is_digit(t[i])) ++i, ++digits;
  if (i < n && t[i] == '.') {
    ++i;
    while (i < n && is_digit(t[i])) ++i, ++digits;
  }
  if (digits == 0) return false;
  if (i < n && (t[i] == 'e' || t[i] == 'E')) {
    ++i;
    if (i < n && (t[i] == '+' || t[i] == '-')) ++i;
    std::size_t e = 0;
    while (i < n && is_digit(t[i])) ++i, ++e;
    if (e == 0) return false;
  }
  return i == n;
}

// "nan", "inf", "infinity" with an optional sign, any case: what Assimp's number reader takes.
bool is_special_real(std::string_view t) {
  if (!t.empty() && (t[0] == '+' || t[0] == '-')) t.remove_prefix(1);
  std::string s(t);
  for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s == "nan" || s == "inf" || s == "infinity";
}

// The value of a token with decimal syntax; ±HUGE_VAL beyond the double range, 0 below it.
double decimal_value(std::string_view t) {
  if (!t.empty() && t[0] == '+') t.remove_prefix(1);
  double v = 0.0;
  const auto r = std::from_chars(t.data(), t.data() + t.size(), v);
  if (r.ec == std::errc::result_out_of_range) {
    const bool tiny = t.find("e-") != std::string_view::npos || t.find("E-") != std::string_view::npos;
    return tiny ? 0.0 : (t[0] == '-' ? -HUGE_VAL : HUGE_VAL);
  }
  return v;
}

// Why a token is not a number of the kind wanted.
std::string not_a_number(std::string_view t, bool integer) {
  std::string why = quote(t) + (integer ? " is not an integer" : " is not a number");
  const std::size_t comma = t.find(',');
  if (comma != std::string_view::npos && comma > 0 && is_digit(t[comma - 1]) &&
      comma + 1 < t.size() && is_digit(t[comma + 1]))
    why += integer ? "" : " (a decimal comma? write a point)";
  return why;
}

// Largest magnitude Assimp can store: it keeps coordinates in single precision (IEEE 754).
constexpr double kFloatMax = std::numeric_limits<float>::max();

std::string beyond_float(std::string_view t) {
  return "coordinate " + quote(t) +
         " is beyond the single-precision range the reader stores (3.4e38)";
}

// ----------------------------------------------------------------------------- PLY --

// PLY scalar types (Bourke, "PLY — Polygon File Format", 1994: char uchar short ushort int uint
// float double, and the sized aliases int8 … float64 most writers use).
enum class PlyType : std::uint8_t { none, i8, u8, i16, u16, i32, u32, f32, f64 };

PlyType ply_type(std::string_view t) {
  if (t == "char" || t == "int8") return PlyType::i8;
  if (t == "uchar" || t == "uint8") return PlyType::u8;
  if (t == "short" || t == "int16") return PlyType::i16;
  if (t == "ushort" || t == "uint16") return PlyType::u16;
  if (t == "int" || t == "int32") return PlyType::i32;
  if (t == "uint" || t == "uint32") return PlyType::u32;
  if (t == "float" || t == "float32") return PlyType::f32;
  if (t == "double" || t == "float64") return PlyType::f64;
  return PlyType::none;
}

int type_bytes(PlyType t) {
  switch (t) {
    case PlyType::i8: case PlyType::u8: return 1;
    case PlyType::i16: case PlyType::u16: return 2;
    case PlyType::i32: case PlyType::u32: case PlyType::f32: return 4;
    case PlyType::f64: return 8;
    case PlyType::none: return 0;
  }
  return 0;
}

bool is_real_type(PlyType t) { return t == PlyType::f32 || t == PlyType::f64; }

// The values an integer type holds.
std::pair<std::int64_t, std::int64_t> integer_range(PlyType t) {
  switch (t) {
    case PlyType::i8: return {-128, 127};
    case PlyType::u8: return {0, 255};
    case PlyType::i16: return {-32768, 32767};
    case PlyType::u16: return {0, 65535};
    case PlyType::i32: return {-2147483648LL, 2147483647LL};
    default: return {0, 4294967295LL};
  }
}

enum class PlyFormat { ascii, little_endian, big_endian };
enum class Role { other, coordinate, indices };  // what a property means to the reader

struct PlyProperty {
  std::string name;
  PlyType type = PlyType::none;        // of the scalar or of the list items
  PlyType count_type = PlyType::none;  // lists only
  bool is_list = false;
  Role role = Role::other;
};

struct PlyElement {
  std::string name;
  std::uint64_t count = 0;
  std::vector<PlyProperty> props;
  bool face = false;       // "face" or "tristrips": its index list refers to the vertices
  bool tristrip = false;   // indices may be −1 (strip restart)
};

struct PlyHeader {
  PlyFormat format = PlyFormat::ascii;
  std::vector<PlyElement> elements;
  std::size_t body = 0;        // byte offset of the data
  std::uint64_t lines = 0;     // header lines
  std::uint64_t vertices = 0;  // count of the "vertex" element (0 when there is none)
};

bool same_name(std::string_view a, std::string_view b) {
  return a.size() == b.size() && std::equal(a.begin(), a.end(), b.begin(), [](char x, char y) {
           return std::tolower(static_cast<unsigned char>(x)) == std::tolower(static_cast<unsigned char>(y));
         });
}

// Element and property names Assimp gives a meaning to (its PLY loader compares them without
// regard to case).
void assign_roles(PlyHeader& h) {
  for (PlyElement& e : h.elements) {
    const bool vertex = same_name(e.name, "vertex") || same_name(e.name, "vertices");
    e.tristrip = same_name(e.name, "tristrips");
    e.face = e.tristrip || same_name(e.name, "face") || same_name(e.name, "faces");
    if (vertex && h.vertices == 0) h.vertices = e.count;
    for (PlyProperty& p : e.props) {
      if (vertex && !p.is_list && (p.name == "x" || p.name == "y" || p.name == "z"))
        p.role = Role::coordinate;
      if (e.face && p.is_list && (same_name(p.name, "vertex_indices") || same_name(p.name, "vertex_index")))
        p.role = Role::indices;
    }
  }
}

std::vector<std::string_view> words_of(std::string_view line) {
  std::vector<std::string_view> w;
  std::string_view t;
  while (w.size() < 8 && next_token(line, &t)) w.push_back(t);
  return w;
}

PlyHeader parse_ply_header(const std::string& path, std::string_view text) {
  Lines lines(text);
  std::string_view line;
  if (!lines.next(&line) || words_of(line) != std::vector<std::string_view>{"ply"})
    throw InputError(path, "not a readable mesh: a PLY file starts with the line 'ply'");
  PlyHeader h;
  bool have_format = false;
  for (;;) {
    if (!lines.next(&line)) throw InputError(path, "PLY header has no end_header line");
    const std::vector<std::string_view> w = words_of(line);
    const auto not_understood = [&] {
      return InputError(path, "PLY header line " + std::to_string(lines.number()) +
                                  " is not understood: " + quote(line));
    };
    // Assimp reads names up to a NUL or other control character: "vertex_indices\0…" is its
    // index list, while here it would be some other property (found by fuzz_import).
    if (std::any_of(line.begin(), line.end(), [](char c) {
          return (static_cast<unsigned char>(c) < 0x20 && c != '\t') || c == 0x7f;
        }))
      throw InputError(path, "PLY header line " + std::to_string(lines.number()) +
                                 " holds a control character: " + quote(line));
    if (w.empty()) throw not_understood();
    if (w[0] == "comment" || w[0] == "obj_info") continue;
    if (w[0] == "end_header") {
      if (w.size() != 1) throw not_understood();
      break;
    }
    if (w[0] == "format") {
      if (have_format || w.size() != 3 || w[2] != "1.0") throw not_understood();
      if (w[1] == "ascii") h.format = PlyFormat::ascii;
      else if (w[1] == "binary_little_endian") h.format = PlyFormat::little_endian;
      else if (w[1] == "binary_big_endian") h.format = PlyFormat::big_endian;
      else throw not_understood();
      have_format = true;
    } else if (w[0] == "element") {
      if (!have_format || w.size() != 3 || !all_digits(w[2]) || w[2].size() > 10)
        throw not_understood();
      PlyElement e;
      e.name = std::string(w[1]);
      e.count = std::stoull(std::string(w[2]));
      if (e.count > 0xFFFFFFFFull) throw not_understood();
      h.elements.push_back(std::move(e));
    } else if (w[0] == "property") {
      if (h.elements.empty()) throw not_understood();
      PlyProperty p;
      if (w.size() == 3) {
        p.type = ply_type(w[1]);
        p.name = std::string(w[2]);
      } else if (w.size() == 5 && w[1] == "list") {
        p.is_list = true;
        p.count_type = ply_type(w[2]);
        p.type = ply_type(w[3]);
        p.name = std::string(w[4]);
        if (is_real_type(p.count_type)) throw not_understood();
      } else {
        throw not_understood();
      }
      if (p.type == PlyType::none || (p.is_list && p.count_type == PlyType::none))
        throw not_understood();
      h.elements.back().props.push_back(std::move(p));
    } else {
      throw not_understood();
    }
  }
  if (!have_format) throw InputError(path, "PLY header has no format line");
  h.body = lines.offset();
  h.lines = lines.number();
  assign_roles(h);
  for (const PlyElement& e : h.elements)
    for (const PlyProperty& p : e.props)
      if (p.role == Role::indices && is_real_type(p.type))
        throw InputError(path, "PLY " + e.name + " " + p.name + " are stored as floating-point "
                               "numbers; indices must be integers");
  return h;
}

// The declared counts against the file size: the fewest bytes each element can take (ASCII:
// one digit and one separator per property), saturating so a forged count cannot wrap around.
void check_ply_size(const std::string& path, const PlyHeader& h, std::uint64_t size) {
  std::uint64_t need = h.body;
  std::string what;
  for (const PlyElement& e : h.elements) {
    std::uint64_t min_bytes = 0;
    for (const PlyProperty& p : e.props)
      min_bytes += h.format == PlyFormat::ascii ? 2 : type_bytes(p.is_list ? p.count_type : p.type);
    min_bytes = std::max<std::uint64_t>(min_bytes, h.format == PlyFormat::ascii ? 1 : 0);
    const std::uint64_t room = min_bytes ? size / min_bytes : std::numeric_limits<std::uint64_t>::max();
    need = e.count > room ? size + 1 : need + e.count * min_bytes;
    what += (what.empty() ? "" : ", ") + std::to_string(e.count) + " " + e.name;
    if (need > size)
      throw InputError(path, "PLY header declares " + what + ", more than the file's " +
                                 std::to_string(size) + " bytes can hold");
  }
}

// "PLY line 12 (vertex 3)" / "PLY face 7".
std::string where(std::uint64_t line, const PlyElement& e, std::uint64_t i) {
  return "PLY line " + std::to_string(line) + " (" + e.name + " " + std::to_string(i + 1) + ")";
}

void check_index(const std::string& path, const PlyElement& e, std::uint64_t i, std::int64_t v,
                 std::uint64_t vertices) {
  const std::int64_t lowest = e.tristrip ? -1 : 0;
  if (v < lowest || (v >= 0 && static_cast<std::uint64_t>(v) >= vertices))
    throw InputError(path, "PLY " + e.name + " " + std::to_string(i + 1) + " uses vertex index " +
                               std::to_string(v) + ", outside 0.." +
                               std::to_string(vertices == 0 ? 0 : vertices - 1));
}

void check_corner_count(const std::string& path, const PlyElement& e, std::uint64_t i,
                        std::int64_t n) {
  if (n == 0 && !e.tristrip)
    throw InputError(path, "PLY " + e.name + " " + std::to_string(i + 1) +
                               " has no corners (a list count of 0)");
}

// One ASCII value of type `t`; a coordinate must also lie in the single-precision range.
void check_ascii_value(const std::string& path, const std::string& at, std::string_view tok,
                       PlyType t, Role role) {
  if (!is_real_type(t)) {
    if (!is_integer_syntax(tok)) throw InputError(path, at + ": " + not_a_number(tok, true));
    const auto [lo, hi] = integer_range(t);
    const bool negative = tok[0] == '-';
    std::string_view digits = tok.substr(tok[0] == '+' || tok[0] == '-' ? 1 : 0);
    while (digits.size() > 1 && digits[0] == '0') digits.remove_prefix(1);
    std::int64_t v = 0;
    if (digits.size() > 12) v = negative ? lo - 1 : hi + 1;
    else std::from_chars(digits.data(), digits.data() + digits.size(), v);
    if (negative) v = -v;
    if (v < lo || v > hi)
      throw InputError(path, at + ": " + quote(tok) + " is outside the range of its type (" +
                                 std::to_string(lo) + " to " + std::to_string(hi) + ")");
    return;
  }
  if (is_decimal_syntax(tok)) {
    if (role == Role::coordinate && !(std::fabs(decimal_value(tok)) <= kFloatMax))
      throw InputError(path, at + ": " + beyond_float(tok));
    return;
  }
  if (is_special_real(tok) && role != Role::coordinate) return;
  if (is_special_real(tok)) throw InputError(path, at + ": coordinate " + quote(tok) + " is not finite");
  throw InputError(path, at + ": " + not_a_number(tok, false));
}

std::int64_t ascii_integer(std::string_view tok) {
  std::int64_t v = 0;
  std::string_view d = tok.substr(tok[0] == '+' || tok[0] == '-' ? 1 : 0);
  std::from_chars(d.data(), d.data() + d.size(), v);
  return tok[0] == '-' ? -v : v;
}

// ASCII PLY as Assimp 5.2 reads it: one element per line (blank lines skipped), exactly the
// declared values on each.
void walk_ply_ascii(const std::string& path, std::string_view text, const PlyHeader& h) {
  Lines lines(text.substr(h.body));
  const std::uint64_t first_line = h.lines;
  std::string_view line, tok;
  for (const PlyElement& e : h.elements) {
    for (std::uint64_t i = 0; i < e.count; ++i) {
      do {
        if (!lines.next(&line))
          throw InputError(path, "PLY file ends after " + std::to_string(i) + " of its " +
                                     std::to_string(e.count) + " " + e.name + " elements");
      } while (is_blank(line));
      const std::uint64_t n = first_line + lines.number();
      const auto missing = [&] {
        return InputError(path, where(n, e, i) + " holds fewer values than the header declares "
                                "(ASCII PLY keeps one element per line)");
      };
      std::string_view rest = line;
      for (const PlyProperty& p : e.props) {
        if (!next_token(rest, &tok)) throw missing();
        if (!p.is_list) {
          check_ascii_value(path, where(n, e, i), tok, p.type, p.role);
          continue;
        }
        check_ascii_value(path, where(n, e, i), tok, p.count_type, Role::other);
        const std::int64_t count = ascii_integer(tok);
        if (count < 0)
          throw InputError(path, where(n, e, i) + ": negative list count " + quote(tok));
        if (p.role == Role::indices) check_corner_count(path, e, i, count);
        for (std::int64_t k = 0; k < count; ++k) {
          if (!next_token(rest, &tok)) throw missing();
          check_ascii_value(path, where(n, e, i), tok, p.type, Role::other);
          if (p.role == Role::indices) check_index(path, e, i, ascii_integer(tok), h.vertices);
        }
      }
      if (next_token(rest, &tok))
        throw InputError(path, where(n, e, i) + " holds more values than the header declares: " +
                                   quote(line));
    }
  }
}

std::uint64_t load_bits(const unsigned char* p, int n, bool big) {
  std::uint64_t v = 0;
  for (int k = 0; k < n; ++k) v = v << 8 | p[big ? k : n - 1 - k];
  return v;
}

std::int64_t binary_integer(const unsigned char* p, PlyType t, bool big) {
  const std::uint64_t b = load_bits(p, type_bytes(t), big);
  switch (t) {
    case PlyType::i8: return static_cast<std::int8_t>(b);
    case PlyType::i16: return static_cast<std::int16_t>(b);
    case PlyType::i32: return static_cast<std::int32_t>(b);
    default: return static_cast<std::int64_t>(b);
  }
}

double binary_real(const unsigned char* p, PlyType t, bool big) {
  if (t == PlyType::f32) return std::bit_cast<float>(static_cast<std::uint32_t>(load_bits(p, 4, big)));
  if (t == PlyType::f64) return std::bit_cast<double>(load_bits(p, 8, big));
  return static_cast<double>(binary_integer(p, t, big));
}

// Binary PLY: every list count read and the data walked to its end, so that no count can send
// the reader past the file.
void walk_ply_binary(const std::string& path, std::string_view text, const PlyHeader& h) {
  const auto* p = reinterpret_cast<const unsigned char*>(text.data()) + h.body;
  const auto* end = reinterpret_cast<const unsigned char*>(text.data()) + text.size();
  const bool big = h.format == PlyFormat::big_endian;
  for (const PlyElement& e : h.elements) {
    for (std::uint64_t i = 0; i < e.count; ++i) {
      const auto truncated = [&] {
        return InputError(path, "PLY file ends inside " + e.name + " " + std::to_string(i + 1) +
                                    " of its " + std::to_string(e.count) + " (binary data shorter "
                                    "than the header and list counts declare)");
      };
      for (const PlyProperty& pr : e.props) {
        if (!pr.is_list) {
          const int n = type_bytes(pr.type);
          if (end - p < n) throw truncated();
          if (pr.role == Role::coordinate && !(std::fabs(binary_real(p, pr.type, big)) <= kFloatMax))
            throw InputError(path, "PLY " + e.name + " " + std::to_string(i + 1) + ": coordinate " +
                                       pr.name + " is not finite or beyond the single-precision range");
          p += n;
          continue;
        }
        const int cn = type_bytes(pr.count_type), n = type_bytes(pr.type);
        if (end - p < cn) throw truncated();
        const std::int64_t count = binary_integer(p, pr.count_type, big);
        p += cn;
        if (count < 0)
          throw InputError(path, "PLY " + e.name + " " + std::to_string(i + 1) +
                                     ": negative list count " + std::to_string(count));
        if (pr.role == Role::indices) check_corner_count(path, e, i, count);
        if (static_cast<std::uint64_t>(end - p) / static_cast<std::uint64_t>(n) <
            static_cast<std::uint64_t>(count))
          throw truncated();
        if (pr.role == Role::indices)
          for (std::int64_t k = 0; k < count; ++k)
            check_index(path, e, i, binary_integer(p + k * n, pr.type, big), h.vertices);
        p += count * n;
      }
    }
  }
}

void check_ply(const std::string& path, std::uint64_t size) {
  const MappedFile file(path, size);
  const PlyHeader h = parse_ply_header(path, file.text());
  check_ply_size(path, h, size);
  if (h.format == PlyFormat::ascii) walk_ply_ascii(path, file.text(), h);
  else walk_ply_binary(path, file.text(), h);
}

// ----------------------------------------------------------------------------- OFF --

// Assimp 5.2's OFF reader copies each line into a 4096-byte buffer.
constexpr std::size_t kOffLineMax = 4000;
constexpr std::int64_t kOffMaxCorners = 9;  // it drops faces with more, without a word

struct OffHeader {
  bool normals = false, colors = false, texcoords = false;
  std::uint64_t vertices = 0, faces = 0;
};

// The next line that is not blank (the reader skips those), its number in `*number`.
bool next_nonblank(Lines& lines, std::string_view* line) {
  while (lines.next(line))
    if (!is_blank(*line)) return true;
  return false;
}

// [ST][C][N][4][n]OFF, the keyword prefixes Assimp reads in this order.
std::optional<OffHeader> parse_off_keyword(const std::string& path, std::string_view w) {
  OffHeader h;
  std::string_view k = w;
  if (k.starts_with("ST")) h.texcoords = true, k.remove_prefix(2);
  if (k.starts_with("C")) h.colors = true, k.remove_prefix(1);
  if (k.starts_with("N")) h.normals = true, k.remove_prefix(1);
  if (k == "4OFF" || k == "nOFF" || k == "4nOFF")
    throw InputError(path, "OFF variant " + quote(w) + " (homogeneous or n-dimensional "
                           "coordinates) is not supported; write plain OFF");
  if (k != "OFF") return std::nullopt;
  return h;
}

OffHeader parse_off_header(const std::string& path, Lines& lines) {
  std::string_view line, tok;
  // Comment lines may precede the keyword and the counts (the reader skips them there).
  const auto next_content = [&] {
    while (next_nonblank(lines, &line))
      if (line[line.find_first_not_of(" \t")] != '#') return true;
    return false;
  };
  if (!next_content()) throw InputError(path, "not a readable mesh: no OFF header");
  std::string_view rest = before_comment(line);
  next_token(rest, &tok);
  OffHeader h;
  if (const auto keyword = parse_off_keyword(path, tok)) {
    h = *keyword;
    std::string_view probe = rest;
    if (!next_token(probe, &tok)) {  // the counts are on a line of their own
      if (!next_content()) throw InputError(path, "OFF file ends before its counts line");
      rest = before_comment(line);
    }
  } else if (is_digit(tok[0])) {
    rest = before_comment(line);  // no keyword (allowed): the counts come first
  } else {
    throw InputError(path, "not a readable mesh: an OFF file starts with 'OFF' (or its counts), "
                           "not " + quote(tok));
  }
  std::string_view counts[3];
  int found = 0;
  while (found < 3 && next_token(rest, &counts[found])) ++found;
  if (found != 3 || next_token(rest, &tok) || !all_digits(counts[0]) || !all_digits(counts[1]) ||
      !all_digits(counts[2]) || counts[0].size() > 10 || counts[1].size() > 10)
    throw InputError(path, "OFF counts line " + std::to_string(lines.number()) +
                               " must be 'VERTICES FACES EDGES' (three whole numbers): " +
                               quote(line));
  h.vertices = std::stoull(std::string(counts[0]));
  h.faces = std::stoull(std::string(counts[1]));
  return h;
}

// A body line of the OFF file: not too long, not a comment line; its part before any '#'.
std::string_view off_body_line(const std::string& path, const Lines& lines, std::string_view line) {
  const std::string at = "OFF line " + std::to_string(lines.number());
  if (line.size() > kOffLineMax)
    throw InputError(path, at + " is longer than " + std::to_string(kOffLineMax) + " characters");
  if (line.find('\0') != std::string_view::npos)
    throw InputError(path, at + " holds a NUL byte (binary data in a text file)");
  if (line[line.find_first_not_of(" \t")] == '#')
    throw InputError(path, at + ": a comment line inside the vertex or face list (the OFF reader "
                                "cannot skip it)");
  return before_comment(line);
}

void check_off_vertices(const std::string& path, Lines& lines, const OffHeader& h) {
  const int need = 3 + (h.normals ? 3 : 0) + (h.texcoords ? 2 : 0);
  std::string_view line, tok;
  for (std::uint64_t i = 0; i < h.vertices; ++i) {
    if (!next_nonblank(lines, &line))
      throw InputError(path, "OFF file ends after " + std::to_string(i) + " of its " +
                                 std::to_string(h.vertices) + " declared vertices");
    std::string_view rest = off_body_line(path, lines, line);
    const std::string at = "OFF line " + std::to_string(lines.number()) + " (vertex " +
                           std::to_string(i + 1) + ")";
    int k = 0;
    for (; next_token(rest, &tok); ++k) {
      if (!is_decimal_syntax(tok)) throw InputError(path, at + ": " + not_a_number(tok, false));
      if (k < 3 && !(std::fabs(decimal_value(tok)) <= kFloatMax))
        throw InputError(path, at + ": " + beyond_float(tok));
    }
    if (k < need)
      throw InputError(path, at + " holds " + std::to_string(k) + " numbers; " +
                                 std::to_string(need) + " expected");
  }
}

void check_off_faces(const std::string& path, Lines& lines, const OffHeader& h) {
  std::string_view line, tok;
  for (std::uint64_t f = 0; f < h.faces; ++f) {
    if (!next_nonblank(lines, &line))
      throw InputError(path, "OFF file ends after " + std::to_string(f) + " of its " +
                                 std::to_string(h.faces) + " declared faces");
    std::string_view rest = off_body_line(path, lines, line);
    const std::string at = "OFF line " + std::to_string(lines.number()) + " (face " +
                           std::to_string(f + 1) + ")";
    next_token(rest, &tok);
    if (!all_digits(tok)) throw InputError(path, at + ": corner count " + not_a_number(tok, true));
    const std::int64_t n = tok.size() > 4 ? 10000 : ascii_integer(tok);
    if (n == 0) throw InputError(path, at + " has no corners (a corner count of 0)");
    if (n > kOffMaxCorners)
      throw InputError(path, at + " has " + std::to_string(n) + " corners; the OFF reader takes at "
                                  "most 9 (split the polygon)");
    for (std::int64_t k = 0; k < n; ++k) {
      if (!next_token(rest, &tok))
        throw InputError(path, at + " lists fewer than its " + std::to_string(n) + " vertex indices");
      if (!is_integer_syntax(tok)) throw InputError(path, at + ": vertex index " + not_a_number(tok, true));
      const std::int64_t index = tok.size() > 12 ? -1 : ascii_integer(tok);
      if (index < 0 || static_cast<std::uint64_t>(index) >= h.vertices)
        throw InputError(path, "OFF face " + std::to_string(f + 1) + " uses vertex index " +
                                   std::string(tok) + ", outside 0.." +
                                   std::to_string(h.vertices == 0 ? 0 : h.vertices - 1));
    }
    while (next_token(rest, &tok))  // a colour may follow
      if (!is_decimal_syntax(tok)) throw InputError(path, at + ": " + not_a_number(tok, false));
  }
}

// Assimp's OFF reader ends a line at '\r', '\f' and NUL as well as at '\n'; Lines ends one at
// '\n' only ("\r\n" counts as one end). Inside a comment, which these checks skip, a lone '\r'
// let Assimp read a line they never saw: "# text\r4 4 0" hid the counts line from them, the
// reader took other counts and its triangulation aborted (found by fuzz/fuzz_import.cpp). So
// such line ends are refused anywhere in the file.
void refuse_hidden_line_ends(const std::string& path, std::string_view text) {
  std::uint64_t line = 1;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (c == '\n') ++line;
    const bool lone_cr = c == '\r' && i + 1 < text.size() && text[i + 1] != '\n';
    if (lone_cr || c == '\f' || c == '\0')
      throw InputError(path, "OFF line " + std::to_string(line) + " holds a " +
                                 (lone_cr ? std::string("carriage return not followed by a line feed")
                                  : c == '\f' ? std::string("form feed")
                                              : std::string("NUL byte")) +
                                 ", where the OFF reader would end the line");
  }
}

void check_off(const std::string& path, std::uint64_t size) {
  const MappedFile file(path, size);
  refuse_hidden_line_ends(path, file.text());
  Lines lines(file.text());
  const OffHeader h = parse_off_header(path, lines);
  // ASCII OFF: a vertex line takes at least 6 bytes ("0 0 0\n"), a face at least 4 ("1 0\n").
  if (h.vertices > size / 6 || h.faces > size / 4 || h.vertices * 6 + h.faces * 4 > size)
    throw InputError(path, "OFF header declares " + std::to_string(h.vertices) + " vertices and " +
                               std::to_string(h.faces) + " faces, more than the file's " +
                               std::to_string(size) + " bytes can hold");
  check_off_vertices(path, lines, h);
  check_off_faces(path, lines, h);
}

// ----------------------------------------------------------------------------- GLB --

// Binary glTF (Khronos, glTF 2.0 specification, section "GLB File Format Specification"): a
// 12-byte header (magic "glTF", version 2, total length), then chunks of uint32 length, uint32
// type and data, the first of type JSON, little-endian. Assimp 5.2 zero-fills a buffer of the
// declared JSON chunk length before reading it: a 273-byte file declaring a 4 GB chunk spent
// over 10 s in memset (found by fuzz/fuzz_import.cpp). Every declared length is checked
// against the file here, so no reader allocation is larger than the file.
void check_glb(const std::string& path, std::uint64_t size) {
  const MappedFile file(path, size);
  const auto* b = reinterpret_cast<const unsigned char*>(file.text().data());
  const auto u32 = [&](std::uint64_t at) { return load_bits(b + at, 4, false); };
  if (size < 20 || std::memcmp(b, "glTF", 4) != 0)
    throw InputError(path, "not a GLB file: it does not start with the 12-byte \"glTF\" header "
                           "and a chunk");
  const std::uint64_t version = u32(4), length = u32(8);
  if (version != 1 && version != 2)
    throw InputError(path, "GLB version " + std::to_string(version) + "; glTF 1 and 2 are read");
  if (length > size)
    throw InputError(path, "GLB header declares " + std::to_string(length) +
                               " bytes, more than the file's " + std::to_string(size));
  // glTF 1's binary extension (KHR_binary_glTF): the header goes on with the JSON content's
  // length and format (0 = JSON), and the binary body fills the rest.
  if (version == 1) {
    if (u32(12) > length - std::min<std::uint64_t>(length, 20))
      throw InputError(path, "GLB header declares " + std::to_string(u32(12)) +
                                 " bytes of JSON, more than the file's " + std::to_string(length) +
                                 " bytes hold");
    return;
  }
  if (u32(16) != 0x4E4F534Au)  // "JSON"
    throw InputError(path, "damaged GLB file: its first chunk is not the JSON chunk");
  for (std::uint64_t at = 12, chunk = 1; at < length; ++chunk) {
    if (length - at < 8)
      throw InputError(path, "damaged GLB file: chunk " + std::to_string(chunk) +
                                 " is cut off in its 8-byte header");
    const std::uint64_t n = u32(at);
    if (n > length - at - 8)
      throw InputError(path, "GLB chunk " + std::to_string(chunk) + " declares " + std::to_string(n) +
                                 " bytes, more than the " + std::to_string(length - at - 8) +
                                 " left in the file");
    at += 8 + n;
  }
}

// ------------------------------------------------------------------ reader isolation --

// A file descriptor closed on scope exit.
class Fd {
 public:
  explicit Fd(int fd = -1) : fd_(fd) {}
  ~Fd() { reset(); }
  Fd(const Fd&) = delete;
  Fd& operator=(const Fd&) = delete;
  int get() const { return fd_; }
  void reset() {
    if (fd_ >= 0) ::close(fd_);
    fd_ = -1;
  }

 private:
  int fd_;
};

// The report a child sends through its pipe: this header, then `source`, `text` and `parts`
// descriptions of where its result lies in its memory (RemotePart).
struct ChildReport {
  enum Status : std::uint32_t { ok, input_error, out_of_memory, other_error };
  std::uint32_t status = other_error;
  std::uint32_t source_bytes = 0;
  std::uint32_t text_bytes = 0;
  std::uint32_t parts = 0;
  std::uint64_t result_bytes = 0;
  std::uint64_t vertices_read = 0;
  std::uint64_t ignored_primitives = 0;
};

// One part of the result in the child's address space.
struct RemotePart {
  std::uint64_t address = 0;
  std::uint64_t bytes = 0;
};

// What the parent asks of a child that has reported: nothing more (it closes the pipe, the
// child leaves) or to send its result through the result pipe.
constexpr char kSendThroughPipe = 'S';

void write_all(int fd, const char* p, std::size_t n) {
  while (n > 0) {
    const ssize_t k = ::write(fd, p, n);
    if (k < 0 && errno == EINTR) continue;
    if (k <= 0) return;
    p += k;
    n -= static_cast<std::size_t>(k);
  }
}

// Where the child's signals and limits are set: only calls that are safe after fork.
void set_child_limits(const ReaderLimits& limits, double wall, std::uint64_t inherited_bytes) {
  sigset_t all;
  sigemptyset(&all);
  sigprocmask(SIG_SETMASK, &all, nullptr);
  for (int s : {SIGSEGV, SIGBUS, SIGFPE, SIGILL, SIGABRT, SIGXCPU, SIGALRM, SIGPIPE, SIGTERM})
    ::signal(s, SIG_DFL);
  const rlimit no_core{0, 0};
  setrlimit(RLIMIT_CORE, &no_core);
  if (limits.memory_bytes > 0) {
    const rlim_t bytes = static_cast<rlim_t>(inherited_bytes + limits.memory_bytes);
    const rlimit as{bytes, bytes};
    setrlimit(RLIMIT_AS, &as);
  }
  if (limits.seconds > 0) {
    rusage used{};
    getrusage(RUSAGE_SELF, &used);  // a forked child starts at zero; be safe anyway
    const rlim_t cpu = static_cast<rlim_t>(std::ceil(limits.seconds)) +
                       static_cast<rlim_t>(used.ru_utime.tv_sec + used.ru_stime.tv_sec);
    const rlimit lim{cpu, cpu + 1};
    setrlimit(RLIMIT_CPU, &lim);
  }
  // A second clock in the child, one second after the parent's: it also ends a child whose
  // parent can no longer watch it.
  if (wall < 1e8) alarm(static_cast<unsigned>(std::ceil(wall)) + 1);
}

// The child: runs the reader, reports, then keeps its result in memory until the parent has
// copied it (process_vm_readv) or asked for it through the result pipe.
[[noreturn]] void child_main(int report_fd, int result_fd, int release_fd, const ReaderLimits& limits,
                             double wall, std::uint64_t inherited_bytes, const IsolatedReader& reader) {
  set_child_limits(limits, wall, inherited_bytes);
  ChildReport r;
  std::string source, text;
  std::vector<RemotePart> parts;
  try {
    const ResultStore store = [&](const std::vector<std::span<const std::byte>>& result) {
      std::uint64_t bytes = 0;
      for (const auto& part : result) bytes += part.size();
      if (limits.memory_bytes > 0 && bytes > limits.memory_bytes) throw std::bad_alloc();
      parts.clear();
      for (const auto& part : result)
        if (!part.empty()) parts.push_back({reinterpret_cast<std::uintptr_t>(part.data()), part.size()});
      r.result_bytes = bytes;
    };
    const ReadCounts c = reader(store);
    r.vertices_read = c.vertices_read;
    r.ignored_primitives = c.ignored_primitives;
    r.status = ChildReport::ok;
  } catch (const InputError& e) {
    r.status = ChildReport::input_error;
    source = e.source();
    text = e.problem();
  } catch (const std::bad_alloc&) {
    r.status = ChildReport::out_of_memory;
  } catch (const std::exception& e) {
    r.status = ChildReport::other_error;
    text = e.what();
  } catch (...) {
    r.status = ChildReport::other_error;
    text = "unknown exception";
  }
  if (r.status != ChildReport::ok) parts.clear();
  text = tidy_message(text, 60, 300);
  r.source_bytes = static_cast<std::uint32_t>(std::min<std::size_t>(source.size(), 4096));
  r.text_bytes = static_cast<std::uint32_t>(text.size());
  r.parts = static_cast<std::uint32_t>(parts.size());
  write_all(report_fd, reinterpret_cast<const char*>(&r), sizeof r);
  write_all(report_fd, source.data(), r.source_bytes);
  write_all(report_fd, text.data(), r.text_bytes);
  write_all(report_fd, reinterpret_cast<const char*>(parts.data()), parts.size() * sizeof(RemotePart));
  if (!parts.empty()) {
    // The parent's clock and PR_SET_PDEATHSIG watch from here: waiting uses no processor time.
    alarm(0);
    char ask = 0;
    ssize_t k;
    while ((k = ::read(release_fd, &ask, 1)) < 0 && errno == EINTR) {
    }
    if (k == 1 && ask == kSendThroughPipe)
      for (const RemotePart& part : parts)
        write_all(result_fd, reinterpret_cast<const char*>(static_cast<std::uintptr_t>(part.address)),
                  static_cast<std::size_t>(part.bytes));
  }
  ::_exit(0);
}

// Address space of this process now (bytes): the child inherits it, its limit comes on top.
std::uint64_t address_space_bytes() {
  std::FILE* f = std::fopen("/proc/self/statm", "r");
  unsigned long long pages = 0;
  if (f) {
    if (std::fscanf(f, "%llu", &pages) != 1) pages = 0;
    std::fclose(f);
  }
  return pages * static_cast<std::uint64_t>(::sysconf(_SC_PAGESIZE));
}

std::string gigabytes(std::uint64_t bytes) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.3g GB", static_cast<double>(bytes) / 1e9);
  return buf;
}

std::string seconds_text(double s) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.3g s", s);
  return buf;
}

// What the child wrote on stderr, for a message: its last line that says something.
std::string last_line(const std::string& err) {
  std::size_t end = err.size();
  while (end > 0) {
    const std::size_t start = err.rfind('\n', end - 1);
    const std::size_t from = start == std::string::npos ? 0 : start + 1;
    const std::string line = tidy_message(std::string_view(err).substr(from, end - from), 40, 160);
    if (!line.empty() && line != " ") return line;
    if (start == std::string::npos) break;
    end = start;
  }
  return "";
}

// The child's outcome: its report (maybe incomplete), wait status, stderr and whether the
// parent killed it for taking too long.
struct ChildOutcome {
  std::string report;
  std::string err;
  int wait_status = 0;
  bool waited = false;
  bool timed_out = false;
};

// Waits for the child to end; false when it cannot be waited for (ECHILD: the host program
// ignores SIGCHLD, so the kernel reaps it).
bool reap(pid_t pid, int* status) {
  for (;;) {
    const pid_t w = ::waitpid(pid, status, 0);
    if (w == pid) return true;
    if (w < 0 && errno == EINTR) continue;
    return false;
  }
}

// Reaps the child on scope exit unless it was reaped already: no zombie is left behind. The
// pipes it may be waiting on are closed first (it then leaves).
struct Reaper {
  pid_t pid;
  Fd* release;
  Fd* result;
  bool done = false;
  ~Reaper() {
    release->reset();
    result->reset();
    int status = 0;
    if (!done) reap(pid, &status);
  }
};

std::size_t report_size(const ChildReport& r) {
  return sizeof r + r.source_bytes + r.text_bytes + std::size_t{r.parts} * sizeof(RemotePart);
}

bool report_complete(const std::string& report) {
  if (report.size() < sizeof(ChildReport)) return false;
  ChildReport r;
  std::memcpy(&r, report.data(), sizeof r);
  return report.size() >= report_size(r);
}

ChildOutcome watch_child(pid_t pid, int report_fd, int err_fd, double wall_seconds) {
  using Clock = std::chrono::steady_clock;
  const auto deadline = Clock::now() + std::chrono::duration<double>(wall_seconds);
  ChildOutcome out;
  pollfd fds[2] = {{report_fd, POLLIN, 0}, {err_fd, POLLIN, 0}};
  char buf[65536];
  for (;;) {
    // Done when the report is complete (the child then waits for its result to be taken) or
    // when both pipes are closed (it has ended).
    if (report_complete(out.report)) break;
    const int open = (fds[0].fd >= 0) + (fds[1].fd >= 0);
    if (open == 0) break;
    const auto left = std::chrono::duration_cast<std::chrono::milliseconds>(deadline - Clock::now());
    if (left.count() <= 0) {
      out.timed_out = true;
      break;
    }
    const int ready = ::poll(fds, 2, static_cast<int>(std::min<long long>(left.count(), 1000)));
    if (ready < 0 && errno != EINTR) break;
    for (pollfd& p : fds) {
      if (p.fd < 0 || !(p.revents & (POLLIN | POLLHUP | POLLERR))) continue;
      const ssize_t k = ::read(p.fd, buf, sizeof buf);
      if (k < 0 && errno == EINTR) continue;
      if (k <= 0) {
        p.fd = -1;  // end of file: the child closed it (it has exited)
        continue;
      }
      if (&p == &fds[0]) {
        out.report.append(buf, static_cast<std::size_t>(k));
      } else {
        out.err.append(buf, static_cast<std::size_t>(k));
        if (out.err.size() > 16384) out.err.erase(0, out.err.size() - 8192);  // keep the end
      }
    }
  }
  if (out.timed_out) ::kill(pid, SIGKILL);
  // With a complete report the child is reaped later (Reaper), after its result is taken.
  if (!report_complete(out.report)) out.waited = reap(pid, &out.wait_status);
  return out;
}

std::string signal_text(int sig) {
  const char* abbrev = sigabbrev_np(sig);
  return "signal " + std::to_string(sig) + (abbrev ? std::string(", SIG") + abbrev : "");
}

// Turns the outcome into the report (with the result still in the child) or throws.
ChildReport interpret(const std::string& path, const std::string& format,
                      const ReaderLimits& limits, double wall, const ChildOutcome& o) {
  const std::string failed = "the " + format + " reader failed (";
  const std::string said = last_line(o.err);
  const std::string detail = said.empty() ? "" : ": " + said;
  if (o.timed_out) throw InputError(path, failed + "took longer than " + seconds_text(wall) + ")");
  if (o.waited && WIFSIGNALED(o.wait_status)) {
    const int sig = WTERMSIG(o.wait_status);
    if (sig == SIGXCPU)
      throw InputError(path, failed + "took longer than " + seconds_text(std::ceil(limits.seconds)) +
                                 " of processor time)");
    if (sig == SIGALRM) throw InputError(path, failed + "took longer than " + seconds_text(wall) + ")");
    if (sig == SIGKILL)
      throw InputError(path, failed + signal_text(sig) + ": killed from outside, perhaps for "
                                      "running out of memory)");
    throw InputError(path, failed + signal_text(sig) + detail + ")");
  }
  ChildReport r;
  const std::size_t have = o.report.size();
  if (have < sizeof r) {
    const std::string status = o.waited && WIFEXITED(o.wait_status)
                                   ? "exit status " + std::to_string(WEXITSTATUS(o.wait_status))
                                   : "ended without a report";
    throw InputError(path, failed + status + detail + ")");
  }
  std::memcpy(&r, o.report.data(), sizeof r);
  if (have < report_size(r)) throw InputError(path, failed + "its report was cut short)");
  const std::string source = o.report.substr(sizeof r, r.source_bytes);
  const std::string text = o.report.substr(sizeof r + r.source_bytes, r.text_bytes);
  switch (r.status) {
    case ChildReport::ok: return r;
    case ChildReport::input_error: throw InputError(source.empty() ? path : source, text);
    case ChildReport::out_of_memory:
      throw InputError(path, failed + "out of memory: over the " + gigabytes(limits.memory_bytes) +
                                 " limit)");
    default: throw InputError(path, failed + text + ")");
  }
}

// The child's result, read in order: straight from its memory (process_vm_readv, one copy
// into the consumer's arrays), or, where the system refuses that (a seccomp profile, Yama
// ptrace_scope 3), through the result pipe, which the child then fills.
class RemoteResult {
 public:
  RemoteResult(const std::string& path, pid_t pid, std::vector<RemotePart> parts, int release_fd,
               int result_fd, std::chrono::steady_clock::time_point deadline, bool through_pipe)
      : path_(path), pid_(pid), parts_(std::move(parts)), release_fd_(release_fd),
        result_fd_(result_fd), deadline_(deadline) {
    if (through_pipe) use_pipe();
  }

  void read(std::byte* dst, std::size_t n) {
    if (n == 0) return;
    if (!pipe_) {
      const ssize_t k = from_memory(dst, n);
      if (k == static_cast<ssize_t>(n)) return;
      const int err = errno;
      // Refused before anything was copied: the child sends all of it through the pipe.
      if (k < 0 && part_ == 0 && offset_ == 0 && (err == EPERM || err == EACCES || err == ENOSYS)) {
        use_pipe();
      } else {
        throw InputError(path_, std::string("cannot take the reader's result: ") +
                                    (k < 0 ? std::strerror(err) : "it is shorter than it said"));
      }
    }
    from_pipe(dst, n);
  }

 private:
  void use_pipe() {
    const char ask = kSendThroughPipe;
    write_all(release_fd_, &ask, 1);
    pipe_ = true;
  }

  // Copies n bytes from the parts, from the cursor on; the count copied, or -1 (errno).
  ssize_t from_memory(std::byte* dst, std::size_t n) {
    std::size_t done = 0;
    while (done < n) {
      iovec remote[64];
      int count = 0;
      std::size_t want = 0;
      for (std::size_t k = part_, off = offset_; k < parts_.size() && count < 64 && done + want < n; ++k, off = 0) {
        const std::size_t take = std::min<std::size_t>(static_cast<std::size_t>(parts_[k].bytes) - off, n - done - want);
        remote[count++] = {reinterpret_cast<void*>(static_cast<std::uintptr_t>(parts_[k].address) + off), take};
        want += take;
      }
      if (want == 0) break;
      iovec local{dst + done, want};
      const ssize_t k = ::process_vm_readv(pid_, &local, 1, remote, static_cast<unsigned long>(count), 0);
      if (k < 0) return done ? static_cast<ssize_t>(done) : -1;
      if (k == 0) break;
      advance(static_cast<std::size_t>(k));
      done += static_cast<std::size_t>(k);
    }
    return static_cast<ssize_t>(done);
  }

  void advance(std::size_t n) {
    while (n > 0 && part_ < parts_.size()) {
      const std::size_t left = static_cast<std::size_t>(parts_[part_].bytes) - offset_;
      const std::size_t step = std::min(left, n);
      offset_ += step;
      n -= step;
      if (offset_ == parts_[part_].bytes) {
        ++part_;
        offset_ = 0;
      }
    }
  }

  void from_pipe(std::byte* dst, std::size_t n) {
    while (n > 0) {
      const auto left = std::chrono::duration_cast<std::chrono::milliseconds>(
          deadline_ - std::chrono::steady_clock::now());
      if (left.count() <= 0) throw InputError(path_, "the reader's result did not come in time");
      pollfd p{result_fd_, POLLIN, 0};
      const int ready = ::poll(&p, 1, static_cast<int>(std::min<long long>(left.count(), 1000)));
      if (ready < 0 && errno != EINTR)
        throw InputError(path_, std::string("cannot take the reader's result: ") + std::strerror(errno));
      if (ready <= 0) continue;
      const ssize_t k = ::read(result_fd_, dst, std::min<std::size_t>(n, std::size_t{1} << 30));
      if (k < 0 && errno == EINTR) continue;
      if (k <= 0) throw InputError(path_, "the reader's result is incomplete");
      dst += k;
      n -= static_cast<std::size_t>(k);
    }
  }

  std::string path_;
  pid_t pid_;
  std::vector<RemotePart> parts_;
  int release_fd_, result_fd_;
  std::chrono::steady_clock::time_point deadline_;
  bool pipe_ = false;
  std::size_t part_ = 0, offset_ = 0;  // the cursor: the next byte to copy
};

}  // namespace

void check_before_assimp(const std::string& path, const std::string& ext, std::uint64_t size) {
  if (ext == ".ply") check_ply(path, size);
  if (ext == ".off") check_off(path, size);
  if (ext == ".glb") check_glb(path, size);
}

ReaderLimits default_reader_limits(std::uint64_t size) {
  ReaderLimits l;
  l.memory_bytes = (4ull << 30) + 16 * size;
  l.seconds = 30.0 + static_cast<double>(size) / 1e6;
  return l;
}

void advise_huge_pages(void* p, std::size_t bytes) {
  constexpr std::uintptr_t huge = std::uintptr_t{2} << 20;
  const auto begin = reinterpret_cast<std::uintptr_t>(p);
  const std::uintptr_t lo = (begin + huge - 1) & ~(huge - 1), hi = (begin + bytes) & ~(huge - 1);
  if (p && hi > lo) (void)::madvise(reinterpret_cast<void*>(lo), hi - lo, MADV_HUGEPAGE);
}

void read_isolated(const std::string& path, const std::string& format, const ReaderLimits& limits,
                   const IsolatedReader& reader, const ResultConsumer& consume, LeavingChildren* leaving) {
  int report_pipe[2], result_pipe[2], release_pipe[2], err_pipe[2];
  const auto no_pipe = [&] {
    return InputError(path, std::string("cannot set up the reader process: ") + std::strerror(errno));
  };
  if (::pipe2(report_pipe, O_CLOEXEC) != 0) throw no_pipe();
  Fd report_read(report_pipe[0]), report_write(report_pipe[1]);
  if (::pipe2(result_pipe, O_CLOEXEC) != 0) throw no_pipe();
  Fd result_read(result_pipe[0]), result_write(result_pipe[1]);
  if (::pipe2(release_pipe, O_CLOEXEC) != 0) throw no_pipe();
  Fd release_read(release_pipe[0]), release_write(release_pipe[1]);
  if (::pipe2(err_pipe, O_CLOEXEC) != 0) throw no_pipe();
  Fd err_read(err_pipe[0]), err_write(err_pipe[1]);
  const std::uint64_t inherited = address_space_bytes();
  const double wall = limits.wall_seconds > 0 ? limits.wall_seconds
                     : limits.seconds > 0      ? 3.0 * limits.seconds + 10.0
                                               : 1e9;
  const auto deadline = std::chrono::steady_clock::now() +
                        std::chrono::duration_cast<std::chrono::steady_clock::duration>(
                            std::chrono::duration<double>(std::min(wall, 1e7)));
  std::fflush(nullptr);  // nothing buffered here may be written twice
  // Free heap pages go back to the system first: otherwise parent and child share them
  // copy-on-write, and each write to one (the parent's weld, the child's reader) copies it.
  ::malloc_trim(0);
  const pid_t parent = ::getpid();
  const pid_t pid = ::fork();
  if (pid < 0)
    throw InputError(path, std::string("cannot start the reader process: ") + std::strerror(errno));
  if (pid == 0) {
    ::close(report_pipe[0]);
    ::close(result_pipe[0]);
    ::close(release_pipe[1]);
    ::close(err_pipe[0]);
    ::prctl(PR_SET_PDEATHSIG, SIGKILL);  // the reader must not outlive an interrupted import
    if (::getppid() != parent) ::_exit(1);
#ifndef MACHCUT_UNDER_ASAN
    // Assimp's assertion messages go to stderr; the parent quotes their last line. (Under a
    // sanitizer the child keeps the real stderr, so that its reports are seen.)
    ::dup2(err_pipe[1], STDERR_FILENO);
#endif
    child_main(report_pipe[1], result_pipe[1], release_pipe[0], limits, wall, inherited, reader);
  }
  report_write.reset();
  result_write.reset();
  release_read.reset();
  err_write.reset();
  Reaper reaper{pid, &release_write, &result_read};
  const ChildOutcome outcome = watch_child(pid, report_read.get(), err_read.get(), wall);
  reaper.done = outcome.waited;
  const ChildReport r = interpret(path, format, limits, wall, outcome);
  std::vector<RemotePart> parts(r.parts);
  std::uint64_t total = 0;
  if (r.parts) std::memcpy(parts.data(), outcome.report.data() + sizeof r + r.source_bytes + r.text_bytes,
                           parts.size() * sizeof(RemotePart));
  for (const RemotePart& part : parts) total += part.bytes;
  if (total != r.result_bytes) throw InputError(path, "the reader's result is damaged");
  RemoteResult remote(path, pid, std::move(parts), release_write.get(), result_read.get(), deadline,
                      limits.through_pipe);
  const ReadCounts counts{static_cast<std::size_t>(r.vertices_read),
                          static_cast<std::size_t>(r.ignored_primitives)};
  consume(ResultSource{r.result_bytes, [&](std::byte* dst, std::size_t n) { remote.read(dst, n); }}, counts);
  // The Reaper's closing of the pipes lets the child leave. The teardown of its address space
  // (5-25 ms after a 1M-triangle read, measured) is waited for by `leaving` when given, after
  // the caller's next work.
  if (leaving) {
    leaving->add(pid);
    reaper.done = true;
  }
}

LeavingChildren::~LeavingChildren() {
  for (const int pid : pids_) {
    int status = 0;
    reap(pid, &status);
  }
}

std::string tidy_message(std::string_view text, std::size_t max_quote, std::size_t max_total) {
  std::string out;
  bool in_quote = false, cut = false;
  std::size_t quoted = 0;
  for (const char ch : text) {
    char c = ch;
    if (static_cast<unsigned char>(c) < 0x20 || c == 0x7f) c = ' ';
    if (c == '"') {
      if (in_quote && cut) out += "...";
      in_quote = !in_quote;
      quoted = 0;
      cut = false;
      out += c;
      continue;
    }
    if (in_quote && quoted++ >= max_quote) {
      cut = true;
      continue;
    }
    if (c == ' ' && (out.empty() || out.back() == ' ')) continue;
    out += c;
  }
  if (in_quote && cut) out += "...\"";
  while (!out.empty() && out.back() == ' ') out.pop_back();
  if (out.size() > max_total) {
    std::size_t n = max_total;
    while (n > 0 && (static_cast<unsigned char>(out[n]) & 0xC0) == 0x80) --n;  // UTF-8 boundary
    out = out.substr(0, n) + "...";
  }
  return out;
}

}  // namespace machcut::detail

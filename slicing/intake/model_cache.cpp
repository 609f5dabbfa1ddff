// The prepared-model cache of model_cache.h: SHA-256, the entry format, atomic writes and the
// size bound.
#include "machcut/intake/model_cache.h"

#include <algorithm>
#include <bit>
#include <cerrno>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <limits>
#include <memory>
#include <type_traits>

#include <unistd.h>

#ifndef MACHCUT_VERSION
#define MACHCUT_VERSION "unknown"
#endif

namespace machcut {

namespace fs = std::filesystem;

// ---- SHA-256, NIST FIPS 180-4 (2015) ------------------------------------------------------

namespace {

// §4.2.2: the first 32 bits of the fractional parts of the cube roots of the first 64 primes.
constexpr std::uint32_t kSha256K[64] = {
    0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5,
    0xd807aa98, 0x12835b01, 0x243185be, 0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174,
    0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da,
    0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967,
    0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13, 0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85,
    0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3, 0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070,
    0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f, 0x682e6ff3,
    0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2};

constexpr std::uint32_t rotr(std::uint32_t x, int n) {
  return std::rotr(x, n);
}

}  // namespace

// §6.2.2: message schedule, then 64 rounds on the working variables a..h.
void Sha256::compress(const std::uint8_t* p) {
  std::uint32_t w[64];
  for (int t = 0; t < 16; ++t)
    w[t] = std::uint32_t{p[4 * t]} << 24 | std::uint32_t{p[4 * t + 1]} << 16 |
           std::uint32_t{p[4 * t + 2]} << 8 | std::uint32_t{p[4 * t + 3]};
  for (int t = 16; t < 64; ++t) {
    const std::uint32_t s0 = rotr(w[t - 15], 7) ^ rotr(w[t - 15], 18) ^ (w[t - 15] >> 3);
    const std::uint32_t s1 = rotr(w[t - 2], 17) ^ rotr(w[t - 2], 19) ^ (w[t - 2] >> 10);
    w[t] = w[t - 16] + s0 + w[t - 7] + s1;
  }
  std::uint32_t a = h_[0], b = h_[1], c = h_[2], d = h_[3], e = h_[4], f = h_[5], g = h_[6],
                h = h_[7];
  for (int t = 0; t < 64; ++t) {
    const std::uint32_t t1 =
        h + (rotr(e, 6) ^ rotr(e, 11) ^ rotr(e, 25)) + ((e & f) ^ (~e & g)) + kSha256K[t] + w[t];
    const std::uint32_t t2 =
        (rotr(a, 2) ^ rotr(a, 13) ^ rotr(a, 22)) + ((a & b) ^ (a & c) ^ (b & c));
    h = g;
    g = f;
    f = e;
    e = d + t1;
    d = c;
    c = b;
    b = a;
    a = t1 + t2;
  }
  h_[0] += a;
  h_[1] += b;
  h_[2] += c;
  h_[3] += d;
  h_[4] += e;
  h_[5] += f;
  h_[6] += g;
  h_[7] += h;
}

void Sha256::update(const void* data, std::size_t bytes) {
  const auto* p = static_cast<const std::uint8_t*>(data);
  total_ += bytes;
  if (used_ > 0) {
    const std::size_t take = std::min(bytes, block_.size() - used_);
    std::memcpy(block_.data() + used_, p, take);
    used_ += take;
    p += take;
    bytes -= take;
    if (used_ < block_.size()) return;
    compress(block_.data());
    used_ = 0;
  }
  for (; bytes >= 64; bytes -= 64, p += 64) compress(p);
  if (bytes > 0) std::memcpy(block_.data(), p, bytes);
  used_ = bytes;
}

// §5.1.1: a 1 bit, zeros to 448 mod 512 bits, the message length in bits (64 bits, big-endian).
Sha256::Digest Sha256::finish() {
  const std::uint64_t bits = total_ * 8;
  const std::uint8_t one = 0x80;
  const std::uint8_t zeros[64] = {};
  update(&one, 1);
  update(zeros, (used_ <= 56 ? 56 : 120) - used_);
  std::uint8_t length[8];
  for (int i = 0; i < 8; ++i) length[i] = static_cast<std::uint8_t>(bits >> (56 - 8 * i));
  update(length, 8);
  Digest d;
  for (int i = 0; i < 8; ++i)
    for (int j = 0; j < 4; ++j) d[4 * i + j] = static_cast<std::uint8_t>(h_[i] >> (24 - 8 * j));
  return d;
}

std::string to_hex(const Sha256::Digest& digest) {
  static const char* kHex = "0123456789abcdef";
  std::string s;
  for (std::uint8_t b : digest) {
    s += kHex[b >> 4];
    s += kHex[b & 15];
  }
  return s;
}

// ---- Folder, limit, key -------------------------------------------------------------------

namespace {

constexpr char kMagic[8] = {'M', 'C', 'U', 'T', 'P', 'R', 'E', 'P'};
constexpr const char* kTempMarker = ".tmp";
constexpr bool kLittleEndian = std::endian::native == std::endian::little;

// A new field in these structs must be stored, loaded and checked below (and, for the setup,
// hashed into the key), and kModelCacheVersion bumped: these sizes catch the change on the
// usual 64-bit Linux build.
#if defined(__x86_64__) && defined(__GLIBCXX__)
static_assert(sizeof(Mesh) == 96 && sizeof(Hole) == 40 && sizeof(ShellHealth) == 96 &&
                  sizeof(HealthReport) == 272 && sizeof(PreparedModel) == 752,
              "a prepared-model struct changed: update model_cache.cpp, bump kModelCacheVersion");
static_assert(sizeof(ImportOptions) == 40 && sizeof(ModelSetup) == 184,
              "a model setup struct changed: hash the new field in model_cache_key");
#endif
static_assert(sizeof(Vec3) == 24 && sizeof(Tri) == 12 && sizeof(ShellPair) == 8,
              "the payload copies these arrays as they are in memory");

bool absolute_env(const char* name, std::string& value) {
  const char* v = std::getenv(name);
  if (!v || !*v || v[0] != '/') return false;
  value = v;
  return true;
}

bool is_hex64(const std::string& s) {
  return s.size() >= 64 && std::all_of(s.begin(), s.begin() + 64, [](char c) {
           return (c >= '0' && c <= '9') || (c >= 'a' && c <= 'f');
         });
}

// Feeds a value into a hash as its bytes (little-endian hosts only, see model_cache_key).
template <class T>
void hash_value(Sha256& h, const T& v) {
  static_assert(std::is_trivially_copyable_v<T>);
  h.update(&v, sizeof v);
}

void hash_string(Sha256& h, const std::string& s) {
  hash_value(h, std::uint64_t{s.size()});
  h.update(s.data(), s.size());
}

// Streams the file's bytes into the hash; false when it cannot be read whole (`size` bytes).
bool hash_file(Sha256& h, const std::string& path, std::uint64_t size,
               const std::function<void(std::uint64_t)>& advanced) {
  std::unique_ptr<std::FILE, int (*)(std::FILE*)> f(std::fopen(path.c_str(), "rb"), std::fclose);
  if (!f) return false;
  std::vector<char> buf(1 << 20);
  std::uint64_t got = 0;
  for (std::size_t n; (n = std::fread(buf.data(), 1, buf.size(), f.get())) > 0;) {
    h.update(buf.data(), n);
    got += n;
    if (advanced) advanced(n);
  }
  return !std::ferror(f.get()) && got == size;  // a file that changed size while read: no key
}

}  // namespace

std::string default_cache_dir() {
  std::string base;
  if (absolute_env("XDG_CACHE_HOME", base)) return (fs::path(base) / "machcut").string();
  const char* home = std::getenv("HOME");
  if (home && *home) return (fs::path(home) / ".cache" / "machcut").string();
  return "";
}

std::uint64_t cache_size_limit(std::string* note) {
  const char* v = std::getenv("MACHCUT_CACHE_MAX_MB");
  if (!v) return kDefaultCacheMaxBytes;
  char* end = nullptr;
  errno = 0;
  const unsigned long long mb = std::strtoull(v, &end, 10);
  const bool whole = *v >= '0' && *v <= '9' && end && *end == '\0' && errno == 0;
  if (whole && mb <= (~0ull >> 20)) return mb << 20;
  if (note)
    *note = "MACHCUT_CACHE_MAX_MB='" + std::string(v) +
            "' is not a whole number of MiB; the prepared-model cache keeps the default " +
            std::to_string(kDefaultCacheMaxBytes >> 20) + " MiB";
  return kDefaultCacheMaxBytes;
}

std::optional<Sha256::Digest> model_cache_key(const std::vector<std::string>& files,
                                              const ModelSetup& setup,
                                              const std::function<void(double)>& progress) {
  if constexpr (!kLittleEndian) return std::nullopt;
  std::vector<std::uint64_t> sizes;
  std::uint64_t total = 0;
  for (const std::string& path : files) {
    std::error_code ec;
    if (!fs::is_regular_file(path, ec)) return std::nullopt;
    const std::uint64_t size = fs::file_size(path, ec);
    if (ec || size > setup.import.max_file_bytes) return std::nullopt;
    sizes.push_back(size);
    total += size;
  }
  Sha256 h;
  hash_string(h, "machcut prepared model");
  hash_value(h, kModelCacheVersion);
  hash_string(h, MACHCUT_VERSION);
  const ImportOptions& im = setup.import;
  hash_value(h, static_cast<std::int32_t>(im.unit));
  for (const SignedAxis& a : {im.axes.flow, im.axes.up}) {
    hash_value(h, static_cast<std::int32_t>(a.axis));
    hash_value(h, static_cast<std::int32_t>(a.sign));
  }
  hash_value(h, std::uint64_t{im.max_file_bytes});
  hash_value(h, std::uint8_t{im.fast_binary_stl});
  hash_value(h, std::uint8_t{setup.unite});
  hash_value(h, std::uint8_t{setup.strict});
  hash_value(h, setup.wrap_alpha);
  hash_value(h, setup.wrap_offset);
  for (const auto* list : {&setup.skip, &setup.only}) {
    hash_value(h, std::uint64_t{list->size()});
    for (const std::string& sel : *list) hash_string(h, sel);
  }
  hash_value(h, std::uint64_t{files.size()});
  std::uint64_t done = 0;
  const auto advanced = [&](std::uint64_t n) {
    done += n;
    if (progress && total > 0) progress(static_cast<double>(done) / static_cast<double>(total));
  };
  for (std::size_t i = 0; i < files.size(); ++i) {
    hash_string(h, files[i]);
    hash_value(h, sizes[i]);
    if (!hash_file(h, files[i], sizes[i], advanced)) return std::nullopt;
  }
  return h.finish();
}

std::string cache_entry_path(const std::string& dir, const Sha256::Digest& key) {
  return (fs::path(dir) / (to_hex(key) + kModelCacheExtension)).string();
}

// ---- Writing ------------------------------------------------------------------------------

namespace {

// Appends to a file and hashes what it writes; `ok` turns false at the first failed write.
class EntryWriter {
 public:
  explicit EntryWriter(std::FILE* f) : f_(f) {}
  void bytes(const void* p, std::size_t n) {
    if (n == 0 || !ok) return;
    sha_.update(p, n);
    ok = std::fwrite(p, 1, n, f_) == n;
    length += n;
  }
  template <class T>
  void value(const T& v) {
    static_assert(std::is_trivially_copyable_v<T>);
    bytes(&v, sizeof v);
  }
  void count(std::size_t n) { value(std::uint64_t{n}); }
  void flag(bool b) { value(std::uint8_t{b}); }
  void string(const std::string& s) {
    count(s.size());
    bytes(s.data(), s.size());
  }
  template <class T>
  void array(const std::vector<T>& v) {
    count(v.size());
    bytes(v.data(), v.size() * sizeof(T));
  }
  void strings(const std::vector<std::string>& v) {
    count(v.size());
    for (const std::string& s : v) string(s);
  }
  Sha256::Digest checksum() { return sha_.finish(); }

  bool ok = true;
  std::uint64_t length = 0;

 private:
  std::FILE* f_;
  Sha256 sha_;
};

void write_mesh(EntryWriter& w, const Mesh& m) {
  w.array(m.positions);
  w.array(m.triangles);
  w.array(m.shell);
  w.strings(m.shell_names);
}

void write_shell(EntryWriter& w, const ShellHealth& s) {
  w.string(s.name);
  w.count(s.triangles);
  w.value(s.volume);
  w.flag(s.closed);
  w.flag(s.oriented);
  w.count(s.boundary_edges);
  w.count(s.nonmanifold_edges);
  w.count(s.degenerate_triangles);
  w.count(s.flipped_faces);
  w.flag(s.inverted);
}

void write_health(EntryWriter& w, const HealthReport& h) {
  w.count(h.shells.size());
  for (const ShellHealth& s : h.shells) write_shell(w, s);
  w.count(h.triangles);
  w.count(h.vertices);
  w.flag(h.closed);
  w.count(h.boundary_edges);
  w.array(h.boundary_samples);
  w.count(h.nonmanifold_edges);
  w.array(h.nonmanifold_samples);
  w.count(h.degenerate_triangles);
  w.value(h.bounds.lo);
  w.value(h.bounds.hi);
  w.value(h.length);
  w.value(h.wetted_area);
  w.value(h.volume);
  w.flag(h.volume_is_union);
  w.flag(h.overlaps_checked);
  w.array(h.intersecting);
  w.array(h.contained);
  w.array(h.self_intersecting);
}

void write_model(EntryWriter& w, const PreparedModel& m) {
  w.strings(m.files);
  write_mesh(w, m.mesh);
  write_mesh(w, m.analysis);
  write_health(w, m.health);
  w.count(m.holes.size());
  for (const Hole& h : m.holes) {
    w.array(h.loop);
    w.value(h.projected_area);
    w.value(h.shell);
  }
  w.strings(m.notes);
  w.strings(m.warnings);
  w.flag(m.usable);
  w.string(m.reason);
  w.flag(m.united);
  w.count(m.wraps.size());
  for (const WrappedShell& x : m.wraps) {
    w.value(x.shell);
    w.string(x.why);
    w.value(x.alpha);
    w.value(x.offset);
    w.value(x.volume_before);
    w.value(x.volume_after);
    w.value(x.area_bound);
  }
  w.count(m.left_out.size());
  for (const LeftOut& x : m.left_out) {
    w.string(x.name);
    w.string(x.why);
    w.value(std::uint64_t{x.triangles});
  }
  write_mesh(w, m.set_aside);
}

std::string errno_text(const std::string& what) {
  return what + ": " + std::strerror(errno);
}

// Writes the whole entry to `path` (header, payload, then the header again with the length and
// checksum); "" or why not.
std::string write_entry(const std::string& path, const Sha256::Digest& key,
                        const PreparedModel& model) {
  std::FILE* f = std::fopen(path.c_str(), "wb");
  if (!f) return errno_text(path);
  std::vector<char> buf(1 << 20);
  std::setvbuf(f, buf.data(), _IOFBF, buf.size());
  const std::uint8_t zeros[kModelCacheHeaderBytes] = {};
  bool ok = std::fwrite(zeros, 1, sizeof zeros, f) == sizeof zeros;
  EntryWriter w(f);
  write_model(w, model);
  ok = ok && w.ok;
  const Sha256::Digest sum = w.checksum();
  std::uint8_t header[kModelCacheHeaderBytes];
  std::memcpy(header, kMagic, 8);
  std::memcpy(header + 8, &kModelCacheVersion, 4);
  std::memcpy(header + 12, key.data(), 32);
  std::memcpy(header + 44, &w.length, 8);
  std::memcpy(header + 52, sum.data(), 32);
  ok = ok && std::fseek(f, 0, SEEK_SET) == 0 &&
       std::fwrite(header, 1, sizeof header, f) == sizeof header;
  ok = ok && std::fflush(f) == 0;
  std::string err = ok ? "" : errno_text(path);
  if (std::fclose(f) != 0 && err.empty()) err = errno_text(path);  // a full disk may show here
  return err;
}

struct CacheFile {
  fs::path path;
  fs::file_time_type mtime;
  std::uint64_t size = 0;
};

// Trims the folder to max_bytes; the entry `keep` goes only when it alone is over the limit.
void trim(const std::string& dir, std::uint64_t max_bytes, const fs::path& keep) {
  std::error_code ec;
  std::vector<CacheFile> entries;
  const auto now = fs::file_time_type::clock::now();
  fs::directory_iterator it(dir, ec), end;
  for (; !ec && it != end; it.increment(ec)) {
    const std::string name = it->path().filename().string();
    std::error_code e2;
    if (!is_hex64(name) || !it->is_regular_file(e2)) continue;
    const std::string rest = name.substr(64);
    const auto mtime = it->last_write_time(e2);
    if (e2) continue;
    if (rest.starts_with(std::string(kModelCacheExtension) + kTempMarker)) {
      if (now - mtime > std::chrono::hours(24)) fs::remove(it->path(), e2);
      continue;
    }
    if (rest != kModelCacheExtension) continue;
    const std::uint64_t size = it->file_size(e2);
    if (!e2) entries.push_back({it->path(), mtime, size});
  }
  std::uint64_t total = 0;
  for (const CacheFile& e : entries) total += e.size;
  // Oldest first; the entry just written last whatever its time stamp (coarse clocks tie).
  std::sort(entries.begin(), entries.end(), [&](const CacheFile& a, const CacheFile& b) {
    const bool ka = a.path == keep, kb = b.path == keep;
    if (ka != kb) return kb;
    return a.mtime < b.mtime;
  });
  for (const CacheFile& e : entries) {
    if (total <= max_bytes) break;
    std::error_code e2;
    if (fs::remove(e.path, e2) || !fs::exists(e.path, e2)) total -= e.size;
  }
}

}  // namespace

std::string store_cached_model(const std::string& dir, const Sha256::Digest& key,
                               const PreparedModel& model, std::uint64_t max_bytes) {
  if constexpr (!kLittleEndian) return "not supported on big-endian hosts";
  try {
    std::error_code ec;
    fs::create_directories(dir, ec);
    if (ec) return dir + ": " + ec.message();
    static int counter = 0;
    const std::string entry = cache_entry_path(dir, key);
    const std::string temp =
        entry + kTempMarker + std::to_string(::getpid()) + "_" + std::to_string(counter++);
    std::string err = write_entry(temp, key, model);
    if (err.empty()) {
      fs::rename(temp, entry, ec);
      if (ec) err = dir + ": " + ec.message();
    }
    if (!err.empty()) {
      fs::remove(temp, ec);
      return err;
    }
    trim(dir, max_bytes, entry);
    return "";
  } catch (const std::exception& e) {  // e.g. bad_alloc for the path strings: still not fatal
    return e.what();
  }
}

void trim_cache(const std::string& dir, std::uint64_t max_bytes) {
  try {
    trim(dir, max_bytes, fs::path());
  } catch (const std::exception&) {
    // Never fatal: the folder stays as it is.
  }
}

// ---- Reading ------------------------------------------------------------------------------

namespace {

// Reads at most `left` bytes of payload and hashes them; any failure (short file, a count larger
// than the bytes left, a bad boolean) turns `ok` false and every later read into a no-op.
class EntryReader {
 public:
  EntryReader(std::FILE* f, std::uint64_t left) : f_(f), left_(left) {}
  bool bytes(void* p, std::size_t n) {
    if (!ok || n > left_) return ok = false;
    if (n == 0) return true;
    if (std::fread(p, 1, n, f_) != n) return ok = false;
    sha_.update(p, n);
    left_ -= n;
    return true;
  }
  template <class T>
  T value() {
    static_assert(std::is_trivially_copyable_v<T>);
    T v{};
    bytes(&v, sizeof v);
    return v;
  }
  // A count of items of at least `item_bytes` each: never more than the bytes left allow.
  std::size_t count(std::size_t item_bytes) {
    const std::uint64_t n = value<std::uint64_t>();
    if (!ok || (item_bytes > 0 && n > left_ / item_bytes)) {
      ok = false;
      return 0;
    }
    return static_cast<std::size_t>(n);
  }
  // A plain number (a count of something not stored here, such as edges).
  std::size_t size() {
    const std::uint64_t n = value<std::uint64_t>();
    if (n > std::numeric_limits<std::size_t>::max()) ok = false;
    return static_cast<std::size_t>(n);
  }
  bool flag() {
    const std::uint8_t b = value<std::uint8_t>();
    if (b > 1) ok = false;
    return b == 1;
  }
  std::string string() {
    std::string s(count(1), '\0');
    bytes(s.data(), s.size());
    return s;
  }
  template <class T>
  std::vector<T> array() {
    std::vector<T> v(count(sizeof(T)));
    bytes(v.data(), v.size() * sizeof(T));
    return v;
  }
  std::vector<std::string> strings() {
    std::vector<std::string> v(count(8));  // each string has an 8-byte length at least
    for (std::string& s : v) s = string();
    return v;
  }
  bool finished() const { return ok && left_ == 0; }
  Sha256::Digest checksum() { return sha_.finish(); }

  bool ok = true;

 private:
  std::FILE* f_;
  std::uint64_t left_;
  Sha256 sha_;
};

Mesh read_mesh(EntryReader& r) {
  Mesh m;
  m.positions = r.array<Vec3>();
  m.triangles = r.array<Tri>();
  m.shell = r.array<std::uint32_t>();
  m.shell_names = r.strings();
  return m;
}

ShellHealth read_shell(EntryReader& r) {
  ShellHealth s;
  s.name = r.string();
  s.triangles = r.size();
  s.volume = r.value<double>();
  s.closed = r.flag();
  s.oriented = r.flag();
  s.boundary_edges = r.size();
  s.nonmanifold_edges = r.size();
  s.degenerate_triangles = r.size();
  s.flipped_faces = r.size();
  s.inverted = r.flag();
  return s;
}

HealthReport read_health(EntryReader& r) {
  HealthReport h;
  h.shells.resize(r.count(8 + 8 + 8 + 3 + 4 * 8));  // the fixed part of one shell record
  for (ShellHealth& s : h.shells) s = read_shell(r);
  h.triangles = r.size();
  h.vertices = r.size();
  h.closed = r.flag();
  h.boundary_edges = r.size();
  h.boundary_samples = r.array<Vec3>();
  h.nonmanifold_edges = r.size();
  h.nonmanifold_samples = r.array<Vec3>();
  h.degenerate_triangles = r.size();
  h.bounds.lo = r.value<Vec3>();
  h.bounds.hi = r.value<Vec3>();
  h.length = r.value<double>();
  h.wetted_area = r.value<double>();
  h.volume = r.value<double>();
  h.volume_is_union = r.flag();
  h.overlaps_checked = r.flag();
  h.intersecting = r.array<ShellPair>();
  h.contained = r.array<ShellPair>();
  h.self_intersecting = r.array<std::uint32_t>();
  return h;
}

PreparedModel read_model(EntryReader& r) {
  PreparedModel m;
  m.files = r.strings();
  m.mesh = read_mesh(r);
  m.analysis = read_mesh(r);
  m.health = read_health(r);
  m.holes.resize(r.count(8 + 8 + 4));
  for (Hole& h : m.holes) {
    h.loop = r.array<std::uint32_t>();
    h.projected_area = r.value<double>();
    h.shell = r.value<std::uint32_t>();
  }
  m.notes = r.strings();
  m.warnings = r.strings();
  m.usable = r.flag();
  m.reason = r.string();
  m.united = r.flag();
  m.wraps.resize(r.count(4 + 8 + 5 * 8));
  for (WrappedShell& x : m.wraps) {
    x.shell = r.value<std::uint32_t>();
    x.why = r.string();
    x.alpha = r.value<double>();
    x.offset = r.value<double>();
    x.volume_before = r.value<double>();
    x.volume_after = r.value<double>();
    x.area_bound = r.value<double>();
  }
  m.left_out.resize(r.count(8 + 8 + 8));
  for (LeftOut& x : m.left_out) {
    x.name = r.string();
    x.why = r.string();
    x.triangles = static_cast<std::size_t>(r.value<std::uint64_t>());
  }
  m.set_aside = read_mesh(r);
  return m;
}

bool sound_mesh(const Mesh& m) {
  const std::size_t nv = m.positions.size(), ns = m.shell_names.size();
  if (m.shell.size() != m.triangles.size()) return false;
  for (const Vec3& p : m.positions)
    if (!is_finite(p)) return false;
  for (const Tri& t : m.triangles)
    if (t[0] >= nv || t[1] >= nv || t[2] >= nv) return false;
  return std::all_of(m.shell.begin(), m.shell.end(), [&](std::uint32_t s) { return s < ns; });
}

bool sound_model(const PreparedModel& m) {
  if (!sound_mesh(m.mesh) || !sound_mesh(m.analysis) || !sound_mesh(m.set_aside)) return false;
  const std::size_t shells = m.health.shells.size();
  if (shells != m.mesh.shell_names.size()) return false;
  for (const auto* pairs : {&m.health.intersecting, &m.health.contained})
    for (const ShellPair& p : *pairs)
      if (p.a >= shells || p.b >= shells) return false;
  for (std::uint32_t s : m.health.self_intersecting)
    if (s >= shells) return false;
  for (const WrappedShell& w : m.wraps)
    if (w.shell >= shells) return false;
  for (const Hole& h : m.holes) {
    if (h.shell >= shells) return false;
    for (std::uint32_t v : h.loop)
      if (v >= m.mesh.positions.size()) return false;
  }
  return true;
}

std::optional<PreparedModel> read_entry(const std::string& path, const Sha256::Digest& key) {
  std::unique_ptr<std::FILE, int (*)(std::FILE*)> f(std::fopen(path.c_str(), "rb"), std::fclose);
  if (!f) return std::nullopt;
  std::error_code ec;
  const std::uint64_t file_bytes = fs::file_size(path, ec);
  if (ec || file_bytes < kModelCacheHeaderBytes) return std::nullopt;
  std::vector<char> buf(1 << 20);
  std::setvbuf(f.get(), buf.data(), _IOFBF, buf.size());
  std::uint8_t header[kModelCacheHeaderBytes];
  if (std::fread(header, 1, sizeof header, f.get()) != sizeof header) return std::nullopt;
  std::uint32_t version = 0;
  std::uint64_t length = 0;
  std::memcpy(&version, header + 8, 4);
  std::memcpy(&length, header + 44, 8);
  if (std::memcmp(header, kMagic, 8) != 0 || version != kModelCacheVersion ||
      std::memcmp(header + 12, key.data(), 32) != 0 ||
      length != file_bytes - kModelCacheHeaderBytes)
    return std::nullopt;
  EntryReader r(f.get(), length);
  PreparedModel m = read_model(r);
  if (!r.finished()) return std::nullopt;
  if (std::memcmp(r.checksum().data(), header + 52, 32) != 0) return std::nullopt;
  if (!sound_model(m)) return std::nullopt;
  return m;
}

}  // namespace

std::optional<PreparedModel> load_cached_model(const std::string& dir, const Sha256::Digest& key) {
  if constexpr (!kLittleEndian) return std::nullopt;
  try {
    const std::string path = cache_entry_path(dir, key);
    std::optional<PreparedModel> m = read_entry(path, key);
    if (m) {
      std::error_code ec;
      fs::last_write_time(path, fs::file_time_type::clock::now(), ec);
    }
    return m;
  } catch (const std::exception&) {  // bad_alloc for a model larger than memory: a miss
    return std::nullopt;
  }
}

}  // namespace machcut

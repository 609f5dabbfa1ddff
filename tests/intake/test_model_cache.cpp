// Tests of the prepared-model cache (slicing/intake/model_cache.cpp) and its use by
// prepare_model (slicing/intake/model.cpp): SHA-256 against published values and coreutils,
// exact round trips, keys, refusal of damaged or foreign entries, the size bound, failures.
#include <catch2/catch.hpp>

#include <algorithm>
#include <bit>
#include <chrono>
#include <cstdint>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <limits>
#include <numbers>
#include <optional>
#include <random>
#include <string>
#include <vector>

#include <unistd.h>

#include "machcut/intake/model.h"
#include "machcut/intake/model_cache.h"
#include "test_support.h"

namespace fs = std::filesystem;
using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::Contains;
using Catch::Matchers::StartsWith;

namespace {

// The tests set their own limits: a user's MACHCUT_CACHE_MAX_MB=0 must not turn the cache off.
const bool kDefaultLimit = (::unsetenv("MACHCUT_CACHE_MAX_MB"), true);

std::string sha256_hex(const std::string& s) {
  Sha256 h;
  h.update(s.data(), s.size());
  return to_hex(h.finish());
}

// A fresh, empty folder for one test (inside the test temp folder).
std::string fresh_dir(const std::string& name) {
  const fs::path dir = fs::path(temp_path("cache_tests")) / name;
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir.string();
}

void write_bytes(const std::string& path, const std::string& bytes) {
  std::ofstream f(path, std::ios::binary | std::ios::trunc);
  f.write(bytes.data(), static_cast<std::streamsize>(bytes.size()));
}

// Sets an environment variable for one scope (nullptr: unset), then restores it.
class ScopedEnv {
 public:
  ScopedEnv(const char* name, const char* value) : name_(name) {
    if (const char* old = std::getenv(name)) old_ = old;
    if (value)
      ::setenv(name, value, 1);
    else
      ::unsetenv(name);
  }
  ~ScopedEnv() {
    if (old_)
      ::setenv(name_.c_str(), old_->c_str(), 1);
    else
      ::unsetenv(name_.c_str());
  }

 private:
  std::string name_;
  std::optional<std::string> old_;
};

Mesh named(Mesh m, const std::string& name) {
  m.shell_names = {name};
  return m;
}

// Three files that exercise every part of a PreparedModel: two overlapping boxes (overlap
// pair, union) and an open sphere apart from them (boundary samples, a hole, warnings).
std::vector<std::string> rich_files(const std::string& dir) {
  Mesh sphere = make_sphere({10, 0, 0}, 1.0, 12, 24);
  sphere.triangles.erase(sphere.triangles.begin() + 30);
  sphere.shell.erase(sphere.shell.begin() + 30);
  return {write_stl_ascii(named(make_box({0, 0, 0}, {2, 2, 2}), "a"), dir + "/a.stl"),
          write_stl_ascii(named(make_box({1.5, 0.5, 0.5}, {2.5, 1.5, 1.5}), "b"), dir + "/b.stl"),
          write_stl_ascii(sphere, dir + "/open.stl")};
}

ModelSetup cached(const std::string& dir) {
  ModelSetup s;
  s.use_cache = true;
  s.cache_dir = dir;
  return s;
}

bool from_cache(const PreparedModel& m) {
  return !m.notes.empty() && m.notes.front().starts_with("prepared model from the cache");
}

// Bitwise equality of doubles (and so of NaN payloads and signed zeros).
bool same(double a, double b) {
  return std::bit_cast<std::uint64_t>(a) == std::bit_cast<std::uint64_t>(b);
}
bool same(const Vec3& a, const Vec3& b) {
  return same(a.x, b.x) && same(a.y, b.y) && same(a.z, b.z);
}
bool same(const std::vector<Vec3>& a, const std::vector<Vec3>& b) {
  if (a.size() != b.size()) return false;
  for (std::size_t i = 0; i < a.size(); ++i)
    if (!same(a[i], b[i])) return false;
  return true;
}
bool same(const std::vector<ShellPair>& a, const std::vector<ShellPair>& b) {
  if (a.size() != b.size()) return false;
  for (std::size_t i = 0; i < a.size(); ++i)
    if (a[i].a != b[i].a || a[i].b != b[i].b) return false;
  return true;
}

void check_same_mesh(const Mesh& a, const Mesh& b) {
  CHECK(same(a.positions, b.positions));
  CHECK(a.triangles == b.triangles);
  CHECK(a.shell == b.shell);
  CHECK(a.shell_names == b.shell_names);
}

// Every field of two prepared models, doubles bit for bit.
void check_same_model(const PreparedModel& a, const PreparedModel& b) {
  CHECK(a.files == b.files);
  check_same_mesh(a.mesh, b.mesh);
  check_same_mesh(a.analysis, b.analysis);
  const HealthReport &ha = a.health, &hb = b.health;
  REQUIRE(ha.shells.size() == hb.shells.size());
  for (std::size_t i = 0; i < ha.shells.size(); ++i) {
    const ShellHealth &sa = ha.shells[i], &sb = hb.shells[i];
    CHECK(sa.name == sb.name);
    CHECK(sa.triangles == sb.triangles);
    CHECK(same(sa.volume, sb.volume));
    CHECK(sa.closed == sb.closed);
    CHECK(sa.oriented == sb.oriented);
    CHECK(sa.boundary_edges == sb.boundary_edges);
    CHECK(sa.nonmanifold_edges == sb.nonmanifold_edges);
    CHECK(sa.degenerate_triangles == sb.degenerate_triangles);
    CHECK(sa.flipped_faces == sb.flipped_faces);
    CHECK(sa.inverted == sb.inverted);
  }
  CHECK(ha.triangles == hb.triangles);
  CHECK(ha.vertices == hb.vertices);
  CHECK(ha.closed == hb.closed);
  CHECK(ha.boundary_edges == hb.boundary_edges);
  CHECK(same(ha.boundary_samples, hb.boundary_samples));
  CHECK(ha.nonmanifold_edges == hb.nonmanifold_edges);
  CHECK(same(ha.nonmanifold_samples, hb.nonmanifold_samples));
  CHECK(ha.degenerate_triangles == hb.degenerate_triangles);
  CHECK(same(ha.bounds.lo, hb.bounds.lo));
  CHECK(same(ha.bounds.hi, hb.bounds.hi));
  CHECK(same(ha.length, hb.length));
  CHECK(same(ha.wetted_area, hb.wetted_area));
  CHECK(same(ha.volume, hb.volume));
  CHECK(ha.volume_is_union == hb.volume_is_union);
  CHECK(ha.overlaps_checked == hb.overlaps_checked);
  CHECK(same(ha.intersecting, hb.intersecting));
  CHECK(same(ha.contained, hb.contained));
  CHECK(ha.self_intersecting == hb.self_intersecting);
  REQUIRE(a.holes.size() == b.holes.size());
  for (std::size_t i = 0; i < a.holes.size(); ++i) {
    CHECK(a.holes[i].loop == b.holes[i].loop);
    CHECK(same(a.holes[i].projected_area, b.holes[i].projected_area));
    CHECK(a.holes[i].shell == b.holes[i].shell);
  }
  CHECK(a.notes == b.notes);
  CHECK(a.warnings == b.warnings);
  CHECK(a.usable == b.usable);
  CHECK(a.reason == b.reason);
  CHECK(a.united == b.united);
}

// A model with every field set to something other than its default, within the index rules.
PreparedModel synthetic_model() {
  PreparedModel m;
  m.files = {"one.stl", "", "two parts.obj"};
  m.mesh.positions = {{0, 0, 0}, {1, -0.0, 0}, {0, 1, 1e-300}, {0, 0, 1}};
  m.mesh.triangles = {{0, 1, 2}, {0, 2, 3}, {1, 3, 2}};
  m.mesh.shell = {0, 1, 1};
  m.mesh.shell_names = {"one.stl", "two parts.obj#1"};
  m.analysis.positions = {{5, 6, 7}, {8, 9, 10}, {11, 12, 13}};
  m.analysis.triangles = {{2, 1, 0}};
  m.analysis.shell = {0};
  m.analysis.shell_names = {"union"};
  ShellHealth s;
  s.name = "one.stl";
  // Counts far above the entry's size: they are numbers, not lengths of stored arrays.
  s.triangles = 7'000'000'000;
  s.volume = -0.0;
  s.closed = true;
  s.oriented = false;
  s.boundary_edges = 3'000'000;
  s.nonmanifold_edges = 4'000'000;
  s.degenerate_triangles = 5'000'000;
  s.flipped_faces = 6'000'000;
  s.inverted = true;
  m.health.shells = {s, s};
  m.health.shells[1].name = "two parts.obj#1";
  m.health.shells[1].volume = std::numeric_limits<double>::quiet_NaN();
  m.health.triangles = 11'000'000;
  m.health.vertices = 12'000'000;
  m.health.closed = true;
  m.health.boundary_edges = 13'000'000;
  m.health.boundary_samples = {{1, 2, 3}, {4, 5, 6}};
  m.health.nonmanifold_edges = 14'000'000;
  m.health.nonmanifold_samples = {{-1, -2, -3}};
  m.health.degenerate_triangles = 15'000'000;
  m.health.bounds = {{-1, -2, -3}, {1, 2, 3}};
  m.health.length = 2.5;
  m.health.wetted_area = std::numbers::pi;
  m.health.volume = 1.0 / 3.0;
  m.health.volume_is_union = true;
  m.health.overlaps_checked = true;
  m.health.intersecting = {{0, 1}};
  m.health.contained = {{1, 0}, {0, 1}};
  m.health.self_intersecting = {1};
  m.holes = {{{0, 1, 2, 3}, 0.125, 1}, {{3, 2}, 1e-20, 0}};
  m.notes = {"note 1", "nóte 2 with UTF-8 m²"};
  m.warnings = {"w"};
  m.usable = true;
  m.reason = "reason text";
  m.united = true;
  return m;
}

Sha256::Digest fake_key(std::uint8_t b) {
  Sha256::Digest k{};
  k.fill(b);
  return k;
}

// Rewrites the header's payload checksum to match the payload (a forger's best effort).
void reseal(std::string& bytes) {
  Sha256 h;
  h.update(bytes.data() + kModelCacheHeaderBytes, bytes.size() - kModelCacheHeaderBytes);
  const Sha256::Digest d = h.finish();
  std::memcpy(bytes.data() + 52, d.data(), 32);
}

void set_u64(std::string& bytes, std::size_t offset, std::uint64_t v) {
  std::memcpy(bytes.data() + offset, &v, 8);
}

void set_mtime(const std::string& path, std::chrono::hours age) {
  fs::last_write_time(path, fs::file_time_type::clock::now() - age);
}

}  // namespace

TEST_CASE("SHA-256 gives the published digests", "[cache][sha256]") {
  // Source: NIST FIPS 180-2 (2002) appendix B examples, the same in FIPS 180-4 (from memory;
  // the same values come from coreutils sha256sum).
  CHECK(sha256_hex("abc") == "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  CHECK(sha256_hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq") ==
        "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
  CHECK(sha256_hex(std::string(1000000, 'a')) ==
        "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
  // The empty message (NIST CSRC example values, from memory).
  CHECK(sha256_hex("") == "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
}

TEST_CASE("SHA-256 agrees with coreutils sha256sum at every padding case", "[cache][sha256]") {
  // Source: an independent implementation — GNU coreutils sha256sum (Debian essential). Lengths
  // 0..130 cover one and two padding blocks (55, 56, 63, 64 bytes, FIPS 180-4 §5.1.1); pieces
  // of 1..7 bytes check that incremental updates equal one update.
  std::mt19937 rng(12345);
  std::string all;
  for (int i = 0; i < 130; ++i) all += static_cast<char>(rng() & 0xff);
  const std::string path = temp_path("sha_input.bin"), out = temp_path("sha_output.txt");
  for (std::size_t n = 0; n <= all.size(); ++n) {
    INFO("length " << n);
    const std::string msg = all.substr(0, n);
    write_bytes(path, msg);
    REQUIRE(std::system(("sha256sum " + path + " > " + out).c_str()) == 0);
    const std::string expected = read_file(out).substr(0, 64);
    CHECK(sha256_hex(msg) == expected);
    Sha256 h;
    for (std::size_t i = 0, step = 1; i < n; i += step, step = step % 7 + 1)
      h.update(msg.data() + i, std::min(step, n - i));
    CHECK(to_hex(h.finish()) == expected);
  }
}

TEST_CASE("the cache folder follows XDG_CACHE_HOME, then HOME", "[cache]") {
  // Source: XDG Base Directory Specification 0.8 — $XDG_CACHE_HOME, default $HOME/.cache;
  // relative paths are ignored (from memory).
  {
    ScopedEnv x("XDG_CACHE_HOME", "/some/cache"), h("HOME", "/home/someone");
    CHECK(default_cache_dir() == "/some/cache/machcut");
  }
  {
    ScopedEnv x("XDG_CACHE_HOME", "relative/cache"), h("HOME", "/home/someone");
    CHECK(default_cache_dir() == "/home/someone/.cache/machcut");
  }
  {
    ScopedEnv x("XDG_CACHE_HOME", ""), h("HOME", "/home/someone");
    CHECK(default_cache_dir() == "/home/someone/.cache/machcut");
  }
  {
    ScopedEnv x("XDG_CACHE_HOME", nullptr), h("HOME", nullptr);
    CHECK(default_cache_dir().empty());
    // No folder: prepare_model prepares without a cache (and says nothing about it).
    const std::string path = write_stl_ascii(make_box({0, 0, 0}, {1, 1, 1}), "cache_nohome.stl");
    ModelSetup s;
    s.use_cache = true;
    const PreparedModel m = prepare_model({path}, s);
    CHECK(m.usable);
    for (const std::string& n : m.notes) CHECK_THAT(n, !Contains("cache"));
  }
}

TEST_CASE("MACHCUT_CACHE_MAX_MB sets the size limit in MiB", "[cache]") {
  {
    ScopedEnv e("MACHCUT_CACHE_MAX_MB", nullptr);
    CHECK(cache_size_limit() == 2ull * 1024 * 1024 * 1024);  // 2 GiB default (model_cache.h)
  }
  {
    ScopedEnv e("MACHCUT_CACHE_MAX_MB", "5");
    CHECK(cache_size_limit() == 5ull * 1024 * 1024);
  }
  for (const char* bad : {"abc", "-3", "12x", ""}) {
    ScopedEnv e("MACHCUT_CACHE_MAX_MB", bad);
    std::string note;
    CHECK(cache_size_limit(&note) == kDefaultCacheMaxBytes);
    CHECK_THAT(note, Contains("MACHCUT_CACHE_MAX_MB"));
  }
  {
    // 0 turns the cache off: nothing is written.
    ScopedEnv e("MACHCUT_CACHE_MAX_MB", "0");
    const std::string dir = fresh_dir("limit_zero");
    const std::string path = write_stl_ascii(make_box({0, 0, 0}, {1, 1, 1}), "cache_zero.stl");
    CHECK(prepare_model({path}, cached(dir)).usable);
    CHECK(fs::is_empty(dir));
  }
}

TEST_CASE("a prepared model comes back from the cache field for field", "[cache]") {
  const std::string dir = fresh_dir("round_trip");
  const std::vector<std::string> files = rich_files(dir);
  const std::string cache = dir + "/cache";
  std::vector<std::string> stages;
  ModelSetup setup = cached(cache);
  setup.progress = [&](const std::string& stage, double) { stages.push_back(stage); };
  const PreparedModel first = prepare_model(files, setup);
  // The model covers what the cache must carry (checked, so the round trip is not vacuous).
  REQUIRE(first.usable);
  REQUIRE(first.united);
  REQUIRE(first.holes.size() == 1);
  REQUIRE_FALSE(first.health.boundary_samples.empty());
  REQUIRE_FALSE(first.health.intersecting.empty());
  REQUIRE_FALSE(first.warnings.empty());
  CHECK_FALSE(from_cache(first));
  CHECK(std::find(stages.begin(), stages.end(), "reading cache") != stages.end());
  CHECK(std::find(stages.begin(), stages.end(), "import") != stages.end());

  stages.clear();
  PreparedModel second = prepare_model(files, setup);
  REQUIRE(from_cache(second));
  CHECK_THAT(second.notes.front(), Contains(cache));
  // A hit skips the preparation: no import or union stage.
  CHECK(std::find(stages.begin(), stages.end(), "reading cache") != stages.end());
  CHECK(std::find(stages.begin(), stages.end(), "import") == stages.end());
  second.notes.erase(second.notes.begin());
  check_same_model(first, second);
  // The same as a preparation without the cache, apart from the timing in the union note.
  const PreparedModel fresh = prepare_model(files, ModelSetup{});
  CHECK(fresh.notes.size() == first.notes.size());
  check_same_mesh(fresh.analysis, second.analysis);
}

TEST_CASE("store and load keep every field of a synthetic model bit for bit", "[cache]") {
  const std::string dir = fresh_dir("synthetic");
  const PreparedModel m = synthetic_model();
  REQUIRE(store_cached_model(dir, fake_key(7), m, 1 << 20).empty());
  const auto back = load_cached_model(dir, fake_key(7));
  REQUIRE(back);
  check_same_model(m, *back);
  CHECK_FALSE(load_cached_model(dir, fake_key(8)));  // another key: a miss
  // An unusable model is stored as it is, too.
  PreparedModel bad = m;
  bad.usable = false;
  bad.reason = "the model is flat";
  REQUIRE(store_cached_model(dir, fake_key(9), bad, 1 << 20).empty());
  const auto bad_back = load_cached_model(dir, fake_key(9));
  REQUIRE(bad_back);
  CHECK_FALSE(bad_back->usable);
  CHECK(bad_back->reason == "the model is flat");
}

TEST_CASE("a changed byte, file order or option gives another key", "[cache]") {
  const std::string dir = fresh_dir("keys");
  const std::string a = write_stl_ascii(make_box({0, 0, 0}, {1, 1, 1}), dir + "/a.stl");
  const std::string b = write_stl_ascii(make_box({3, 0, 0}, {4, 1, 1}), dir + "/b.stl");
  const ModelSetup base;
  const auto key = model_cache_key({a, b}, base);
  REQUIRE(key);
  // What does not change the preparation keeps the key.
  ModelSetup other_cache = base;
  other_cache.use_cache = true;
  other_cache.cache_dir = "/elsewhere";
  other_cache.progress = [](const std::string&, double) {};
  CHECK(model_cache_key({a, b}, other_cache) == key);
  CHECK(model_cache_key({b, a}, base) != key);
  CHECK(model_cache_key({a}, base) != key);
  std::vector<ModelSetup> changed(6, base);
  changed[0].import.unit = LengthUnit::mm;
  changed[1].import.axes.flow = {0, -1};
  changed[2].import.axes.up = {1, 1};
  changed[3].unite = false;
  changed[4].import.max_file_bytes = 1u << 20;
  changed[5].import.fast_binary_stl = false;
  for (std::size_t i = 0; i < changed.size(); ++i) {
    INFO("option " << i);
    CHECK(model_cache_key({a, b}, changed[i]) != key);
  }
  // A file over the size limit or missing: no key (the import reports it).
  ModelSetup tiny = base;
  tiny.import.max_file_bytes = 10;
  CHECK_FALSE(model_cache_key({a, b}, tiny));
  CHECK_FALSE(model_cache_key({a, dir + "/missing.stl"}, base));
  CHECK_FALSE(model_cache_key({dir}, base));

  // One byte changed in a file: a miss, and the model is prepared from the new bytes.
  const std::string cache = dir + "/cache";
  REQUIRE_FALSE(from_cache(prepare_model({a, b}, cached(cache))));
  REQUIRE(from_cache(prepare_model({a, b}, cached(cache))));
  std::string text = read_file(b);
  const std::size_t at = text.find("vertex 4");
  REQUIRE(at != std::string::npos);
  text[at + 7] = '5';  // one corner moves from x = 4 to x = 5
  write_bytes(b, text);
  const PreparedModel changed_model = prepare_model({a, b}, cached(cache));
  CHECK_FALSE(from_cache(changed_model));
  CHECK(model_cache_key({a, b}, base) != key);
  ModelSetup mm = cached(cache);
  mm.import.unit = LengthUnit::mm;
  CHECK_FALSE(from_cache(prepare_model({a, b}, mm)));
}

TEST_CASE("damaged, truncated or foreign entries are refused and rebuilt", "[cache]") {
  const std::string dir = fresh_dir("damage");
  const std::string path = write_stl_ascii(make_box({0, 0, 0}, {2, 1, 1}), dir + "/box.stl");
  const std::string cache = dir + "/cache";
  const ModelSetup setup = cached(cache);
  const PreparedModel original = prepare_model({path}, setup);
  const auto key = model_cache_key({path}, setup);
  REQUIRE(key);
  const std::string entry = cache_entry_path(cache, *key);
  const std::string good = read_file(entry);
  REQUIRE(good.size() > kModelCacheHeaderBytes);
  REQUIRE(load_cached_model(cache, *key));

  // Payload offsets from the layout (model_cache.h): the file list first, then the mesh
  // positions (count + 24 bytes each), then the triangles (count + 12 bytes each).
  std::size_t files_bytes = 8;
  for (const std::string& f : original.files) files_bytes += 8 + f.size();
  const std::size_t payload = kModelCacheHeaderBytes;
  const std::size_t first_corner =
      payload + files_bytes + 8 + 24 * original.mesh.positions.size() + 8;

  std::mt19937 rng(2024);
  std::string random_bytes(good.size(), '\0');
  for (char& c : random_bytes) c = static_cast<char>(rng() & 0xff);

  struct Damage {
    const char* what;
    std::string bytes;
  };
  std::vector<Damage> damages;
  damages.push_back({"empty file", ""});
  damages.push_back({"header only, cut short", good.substr(0, kModelCacheHeaderBytes - 1)});
  damages.push_back({"truncated payload", good.substr(0, good.size() / 2)});
  damages.push_back({"one byte short", good.substr(0, good.size() - 1)});
  damages.push_back({"one byte more", good + "x"});
  {
    std::string b = good;
    b[payload + (b.size() - payload) / 2] ^= 0x01;
    damages.push_back({"flipped payload byte", b});
  }
  damages.push_back({"random bytes", random_bytes});
  {
    std::string b = good;
    b[0] = 'X';
    damages.push_back({"another magic", b});
  }
  {
    std::string b = good;
    const std::uint32_t v = kModelCacheVersion + 1;
    std::memcpy(b.data() + 8, &v, 4);
    damages.push_back({"another format version", b});
  }
  {
    std::string b = good;
    b[12] ^= 0x80;
    damages.push_back({"another key", b});
  }
  {
    std::string b = good;
    set_u64(b, 44, 1ull << 62);
    damages.push_back({"forged huge payload length", b});
  }
  {
    // A count larger than the file, checksum made to match: refused before allocating.
    std::string b = good;
    set_u64(b, payload, 1ull << 60);
    reseal(b);
    damages.push_back({"forged huge count, resealed", b});
  }
  {
    std::string b = good;
    const std::uint32_t v = 0xfffffff0u;
    std::memcpy(b.data() + first_corner, &v, 4);
    reseal(b);
    damages.push_back({"triangle corner out of range, resealed", b});
  }
  {
    // The first position's x coordinate made NaN.
    std::string b = good;
    const double nan = std::numeric_limits<double>::quiet_NaN();
    std::memcpy(b.data() + payload + files_bytes + 8, &nan, 8);
    reseal(b);
    damages.push_back({"non-finite position, resealed", b});
  }
  for (const Damage& d : damages) {
    INFO(d.what);
    write_bytes(entry, d.bytes);
    CHECK_NOTHROW(load_cached_model(cache, *key));
    CHECK_FALSE(load_cached_model(cache, *key));
    const PreparedModel rebuilt = prepare_model({path}, setup);
    CHECK_FALSE(from_cache(rebuilt));
    check_same_mesh(rebuilt.analysis, original.analysis);
    // The rebuild overwrote the entry with a sound one.
    CHECK(read_file(entry) == good);
    CHECK(from_cache(prepare_model({path}, setup)));
  }
  // An entry whose indices are out of range is refused even when written by the cache itself.
  PreparedModel broken = synthetic_model();
  broken.holes[0].loop.push_back(99);
  REQUIRE(store_cached_model(cache, fake_key(1), broken, 1 << 30).empty());
  CHECK_FALSE(load_cached_model(cache, fake_key(1)));
  broken = synthetic_model();
  broken.mesh.shell[0] = 2;  // only two shell names
  REQUIRE(store_cached_model(cache, fake_key(2), broken, 1 << 30).empty());
  CHECK_FALSE(load_cached_model(cache, fake_key(2)));
  broken = synthetic_model();
  broken.health.contained.push_back({0, 2});
  REQUIRE(store_cached_model(cache, fake_key(3), broken, 1 << 30).empty());
  CHECK_FALSE(load_cached_model(cache, fake_key(3)));
  broken = synthetic_model();
  broken.health.shells.pop_back();  // one health shell per mesh shell
  REQUIRE(store_cached_model(cache, fake_key(4), broken, 1 << 30).empty());
  CHECK_FALSE(load_cached_model(cache, fake_key(4)));
}

TEST_CASE("the folder is trimmed to the limit, least recently used first", "[cache]") {
  const std::string dir = fresh_dir("evict");
  const PreparedModel m = synthetic_model();
  REQUIRE(store_cached_model(dir, fake_key(1), m, 1 << 30).empty());
  const std::uint64_t size = fs::file_size(cache_entry_path(dir, fake_key(1)));
  for (std::uint8_t k = 2; k <= 4; ++k)
    REQUIRE(store_cached_model(dir, fake_key(k), m, 1 << 30).empty());
  // Ages: entry 1 oldest ... entry 4 newest; then a hit makes entry 1 the most recent.
  for (std::uint8_t k = 1; k <= 4; ++k)
    set_mtime(cache_entry_path(dir, fake_key(k)), std::chrono::hours(10 - k));
  REQUIRE(load_cached_model(dir, fake_key(1)));
  // Files that are not entries stay; a temporary file of a write interrupted days ago goes.
  write_bytes(dir + "/notes.txt", std::string(10 * size, 'n'));
  const std::string stale = cache_entry_path(dir, fake_key(9)) + ".tmp123_0";
  write_bytes(stale, "partial");
  set_mtime(stale, std::chrono::hours(48));

  // Room for three entries: storing a fifth removes the two least recently used (2 and 3).
  REQUIRE(store_cached_model(dir, fake_key(5), m, 3 * size + size / 2).empty());
  CHECK(fs::exists(cache_entry_path(dir, fake_key(1))));
  CHECK_FALSE(fs::exists(cache_entry_path(dir, fake_key(2))));
  CHECK_FALSE(fs::exists(cache_entry_path(dir, fake_key(3))));
  CHECK(fs::exists(cache_entry_path(dir, fake_key(4))));
  CHECK(fs::exists(cache_entry_path(dir, fake_key(5))));
  CHECK(fs::exists(dir + "/notes.txt"));
  CHECK_FALSE(fs::exists(stale));
  std::uint64_t total = 0;
  for (const auto& e : fs::directory_iterator(dir))
    if (e.path().extension() == kModelCacheExtension) total += e.file_size();
  CHECK(total <= 3 * size + size / 2);

  // A limit below one entry keeps none, not even the new one.
  trim_cache(dir, size - 1);
  for (std::uint8_t k = 1; k <= 5; ++k) CHECK_FALSE(fs::exists(cache_entry_path(dir, fake_key(k))));
  CHECK(fs::exists(dir + "/notes.txt"));
}

TEST_CASE("an unwritable cache folder costs one note, never the result", "[cache]") {
  const std::string dir = fresh_dir("unwritable");
  const std::string path = write_stl_ascii(make_box({0, 0, 0}, {1, 1, 1}), dir + "/box.stl");
  // A folder inside a regular file cannot be made, whoever runs the test (root included).
  write_bytes(dir + "/plain_file", "x");
  const ModelSetup setup = cached(dir + "/plain_file/cache");
  const PreparedModel m = prepare_model({path}, setup);
  CHECK(m.usable);
  int cache_notes = 0;
  for (const std::string& n : m.notes) cache_notes += n.find("cache") != std::string::npos;
  CHECK(cache_notes == 1);
  CHECK_THAT(m.notes.back(), StartsWith("prepared-model cache not written"));
  check_same_mesh(m.analysis, prepare_model({path}, ModelSetup{}).analysis);
  CHECK_FALSE(store_cached_model(dir + "/plain_file/cache", fake_key(1), m, 1 << 20).empty());
  CHECK_FALSE(load_cached_model(dir + "/plain_file/cache", fake_key(1)));
  CHECK_NOTHROW(trim_cache(dir + "/plain_file/cache", 0));
  // Nothing but the two files was left behind.
  std::size_t entries = 0;
  for (const auto& e : fs::directory_iterator(dir)) entries += e.is_regular_file() ? 1 : 0;
  CHECK(entries == 2);
}

// The prepared-model cache: a PreparedModel (model.h) stored whole in one binary file per input
// set, so that a second command on the same files skips import, repair and union. prepare_model
// uses it when ModelSetup::use_cache is set; these functions are its parts.
//
// Folder: $XDG_CACHE_HOME/machcut, else $HOME/.cache/machcut (default_cache_dir()). One entry
// per key, named by the key in hex with the extension kModelCacheExtension. The folder is held
// to a size limit (default 2 GiB, MACHCUT_CACHE_MAX_MB overrides) by removing the entries used
// least recently (their modification time; a hit touches it).
//
// Entry layout (little-endian):
//   offset  0: magic "MCUTPREP" (8 bytes)
//   offset  8: format version, u32 (kModelCacheVersion)
//   offset 12: key, 32 bytes (model_cache_key)
//   offset 44: payload length, u64 (= file size − kModelCacheHeaderBytes)
//   offset 52: SHA-256 of the payload, 32 bytes
//   offset 84: payload: the PreparedModel field by field (counts as u64, doubles as their bits)
// An entry is trusted only when every part checks out (load_cached_model); anything else is a
// miss, and the caller prepares the model again and overwrites the entry.
#pragma once

#include <array>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "machcut/intake/model.h"

namespace machcut {

// SHA-256 (NIST FIPS 180-4, 2015, §6.2), incremental: update() any number of times, then
// finish() once. Used for the cache key and the payload checksum (no hash library is in the
// project's dependencies).
class Sha256 {
 public:
  using Digest = std::array<std::uint8_t, 32>;
  void update(const void* data, std::size_t bytes);
  Digest finish();  // pads and returns the digest; the object must not be used afterwards

 private:
  void compress(const std::uint8_t* block);
  std::array<std::uint32_t, 8> h_{0x6a09e667u, 0xbb67ae85u, 0x3c6ef372u, 0xa54ff53au,
                                  0x510e527fu, 0x9b05688cu, 0x1f83d9abu, 0x5be0cd19u};
  std::array<std::uint8_t, 64> block_{};
  std::size_t used_ = 0;     // bytes in block_
  std::uint64_t total_ = 0;  // message length so far, bytes
};

// Lower-case hex of a digest (64 characters).
std::string to_hex(const Sha256::Digest& digest);

// Bump whenever the entry layout or anything prepare_model computes changes, so that entries
// written by other builds are never read (the project version is part of the key as well).
inline constexpr std::uint32_t kModelCacheVersion = 3;  // 2: wrapped shells; 3: parts, left out
inline constexpr std::size_t kModelCacheHeaderBytes = 84;
inline constexpr const char* kModelCacheExtension = ".mcprep";
inline constexpr std::uint64_t kDefaultCacheMaxBytes = 2ull << 30;  // 2 GiB

// $XDG_CACHE_HOME/machcut when XDG_CACHE_HOME is set to an absolute path (the XDG Base Directory
// Specification ignores relative ones), else $HOME/.cache/machcut when HOME is set and not
// empty, else "" (no caching). Does not create the folder.
std::string default_cache_dir();

// The folder size limit, bytes: MACHCUT_CACHE_MAX_MB (a whole number of MiB, 0 = the cache is
// off) when set, else kDefaultCacheMaxBytes. An unreadable value gives the default and, when
// `note` is given, one line saying so.
std::uint64_t cache_size_limit(std::string* note = nullptr);

// The key of an input set: SHA-256 over the format version, the project version, each file's
// path as given (in order) with its length and bytes, and every ModelSetup field that changes the
// result (units, flow and up axes, max file size, STL reader, unite). The progress callback and
// the cache fields do not count. nullopt when a file cannot be read or is larger than
// setup.import.max_file_bytes (the import then reports it), and on big-endian hosts (the
// payload is the little-endian memory image). Reads every byte once: for an
// 800k-triangle file (~40–60 MB) a fraction of a second, against seconds for preparing it.
// `progress` (may be empty) gets the fraction of bytes hashed.
std::optional<Sha256::Digest> model_cache_key(const std::vector<std::string>& files,
                                              const ModelSetup& setup,
                                              const std::function<void(double)>& progress = {});

// dir/<hex key><kModelCacheExtension>.
std::string cache_entry_path(const std::string& dir, const Sha256::Digest& key);

// The entry for `key` in `dir`, when it is sound: magic, version, key, payload length equal to
// the file size less the header, SHA-256 of the payload, every count within the bytes left
// (checked before allocating), the payload consumed exactly, booleans 0 or 1, positions finite,
// every index in range (triangle corners < positions, shell ids < shell names, one health shell
// per mesh shell, overlap pairs and self-intersecting shells < shells, hole loops < mesh
// positions, hole shells < shells). nullopt for a missing, truncated, damaged or foreign file;
// never throws for its contents. A hit sets the entry's modification time to now (least
// recently used eviction).
std::optional<PreparedModel> load_cached_model(const std::string& dir, const Sha256::Digest& key);

// Writes `model` as the entry for `key` into `dir` (created if missing) atomically: a temporary
// file in `dir`, renamed over the entry once complete. Then trims the folder to `max_bytes`
// (trim_cache). Returns "" on success, else one line saying why not (unwritable folder, disk
// full, ...); nothing is left behind on failure. Never throws.
std::string store_cached_model(const std::string& dir, const Sha256::Digest& key,
                               const PreparedModel& model, std::uint64_t max_bytes);

// Removes entries of `dir` (files named <64 hex><kModelCacheExtension>), the least recently
// modified first, until their sizes add up to at most `max_bytes`; also removes temporary files
// of interrupted writes older than a day. Other files are left alone. Never throws.
void trim_cache(const std::string& dir, std::uint64_t max_bytes);

}  // namespace machcut

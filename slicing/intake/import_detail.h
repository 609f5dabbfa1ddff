// Private to the core: the file checks, the reader isolation and the direct binary-STL reader
// behind import_meshes.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "machcut/common/mesh.h"

namespace machcut::detail {

enum class StlKind { ascii, binary };

// Decides how an .stl file of `size` bytes is stored, from its first bytes, and refuses a
// binary file whose size does not match its header: size must be 84 + 50·count exactly.
// A file is ASCII only when it starts with "solid" and its first 512 bytes are plain text
// (a binary header may also start with "solid"; Assimp 5.2 then reads it as ASCII and finds
// zero triangles — measured here). Throws InputError naming `path`.
StlKind classify_stl(const std::string& path, std::uint64_t size);

// Calls `triangle` with the 3 corners (file units, file axes, float → double) of each record
// of a binary STL already accepted by classify_stl, in file order. Streams in 3.2 MB chunks:
// no soup is held. Throws InputError on read failure or a NaN/infinite coordinate.
void read_binary_stl(const std::string& path, std::uint64_t size,
                     const std::function<void(const Vec3* corners)>& triangle);

// Incremental weld (the engine of weld_soup): triangles go in one at a time, vertices with
// bitwise-equal coordinates (after −0 → +0) are shared, triangles whose corners weld together
// are dropped and counted. The hash table starts at a size for `expected_triangles` of a
// closed mesh (V ≈ F/2) and doubles when half full, so memory follows the welded vertex count,
// not the corner count.
class Welder {
 public:
  explicit Welder(std::size_t expected_triangles);
  void add(Vec3 a, Vec3 b, Vec3 c);
  // The triangles added from now on belong to the part named `name` (a name given before is
  // the same part again; "" is the part of triangles whose file gives no name: the default).
  void set_part(const std::string& name);
  std::size_t added() const { return added_; }
  std::size_t dropped() const { return added_ - mesh_.triangles.size(); }
  // The welded mesh with part labels, not shells: shell[f] is the part of triangle f and
  // shell_names the part names in order of first use ({""} when no part was named). Leaves the
  // Welder empty.
  Mesh take();

 private:
  std::uint32_t find_or_add(Vec3 p);
  void grow();
  std::vector<std::uint64_t> slots_;  // upper 32 bits: hash tag; lower 32: vertex id
  std::size_t mask_ = 0;
  Mesh mesh_;
  std::size_t added_ = 0;
  std::uint32_t part_ = 0;
  std::vector<std::string> part_names_{""};
};

// Strict checks of PLY, OFF and GLB files before Assimp reads them, so that what Assimp 5.2 would
// crash on, hang on, silently drop or misread is refused with a clear line instead (all
// measured here): the header grammar (a PLY header line such as "vertex end_header" makes
// Assimp loop forever); declared counts against the file size (a forged count is a memory
// blow-up or, for OFF, a hang); the body structure (binary PLY list counts and sizes walked to
// the end of the data, ASCII lines holding exactly the declared values); number syntax ("1,5"
// with a decimal comma, "1e39" in an integer field); coordinates within the single-precision
// range Assimp stores (|v| <= 3.4e38); faces with no corners (a PLY face of count 0 aborts
// Assimp's triangulation) or, in OFF, more than the 9 corners its reader takes; vertex indices
// past the vertex list (Assimp silently clamps OFF indices). GLB: the header and the chunk
// lengths against the file size (Assimp zero-fills a buffer of the declared JSON length first).
// Other extensions: no-op. Reads the file once through a read-only mapping. Throws InputError
// naming `path`.
void check_before_assimp(const std::string& path, const std::string& ext, std::uint64_t size);

// ------------------------------------------------------------------ reader isolation --

// What a reader found besides the data it stored.
struct ReadCounts {
  std::size_t vertices_read = 0;       // as stored in the file (3 per STL face)
  std::size_t ignored_primitives = 0;  // points and lines
};

// Hands a reader's result to the parent process: the parts, one after another, make the
// result's bytes. Called once (also for an empty result). The parts must stay in place until
// the reader returns and after it: the child keeps them until the parent has copied them
// (the reader leaves them to the child's _exit, as it does Assimp's scene).
using ResultStore = std::function<void(const std::vector<std::span<const std::byte>>& parts)>;

// A reader: parses its file, calls `store` once with its result; the layout of the bytes is
// agreed between the reader and its consumer. Throws InputError for a file it cannot use.
using IsolatedReader = std::function<ReadCounts(const ResultStore& store)>;

// A reader's result as its consumer takes it: `size` bytes, read in order by `read(dst, n)`
// (copies the next n bytes to dst; throws InputError when they cannot be had).
struct ResultSource {
  std::uint64_t size = 0;
  std::function<void(std::byte* dst, std::size_t n)> read;
};

// Receives a reader's result and its counts.
using ResultConsumer = std::function<void(const ResultSource& result, const ReadCounts& counts)>;

// Limits for a reader run in a child process.
struct ReaderLimits {
  std::uint64_t memory_bytes = 0;  // address space the child may add to what it inherits
  double seconds = 0.0;            // processor time (whole seconds, rounded up)
  double wall_seconds = 0.0;       // wall-clock time; 0: 3 × seconds + 10 s
  bool through_pipe = false;       // the result through a pipe even where it could be copied
                                   // from the child's memory (tests of the fallback)
};

// Default limits for a file of `size` bytes: 4 GiB + 16 × size of memory (Assimp 5.2 needs
// ~2.5× an ASCII file's size, measured here, plus the result handed back); 30 s + 1 s per MB
// of processor time (Assimp reads 20-60 MB/s here).
ReaderLimits default_reader_limits(std::uint64_t size);

// Runs `reader` in a child process (fork; no exec, so it also works inside a library such as
// the Python module) with `limits` on address space (RLIMIT_AS), processor time (RLIMIT_CPU)
// and wall-clock time (the parent kills it), then calls `consume` here with the result, copied
// once, straight from the child's memory into the consumer's arrays (process_vm_readv; through
// a pipe where the system refuses that). The child runs only the reader (no thread pool; glibc
// resets its allocator locks across fork) and leaves with _exit once its result is taken. A
// crash, abort, hang or failed allocation in the child becomes one InputError
// "PATH: the FORMAT reader failed (signal 11, SIGSEGV)" / "(out of memory: over the 4.5 GB
// limit)" / "(took longer than 40 s)"; an InputError the reader throws is rethrown here as it
// was. `format` names the reader in messages ("PLY").
// Reader processes whose result has been taken and that are leaving: waited for (reaped) when
// this goes out of scope, so that their teardown overlaps the caller's work meanwhile. (A
// thread that waits instead made a later fork hang under AddressSanitizer, seen in testing.)
class LeavingChildren {
 public:
  LeavingChildren() = default;
  ~LeavingChildren();
  LeavingChildren(const LeavingChildren&) = delete;
  LeavingChildren& operator=(const LeavingChildren&) = delete;
  void add(int pid) { pids_.push_back(pid); }

 private:
  std::vector<int> pids_;
};

// `leaving`: where the child is left to be reaped; null: it is reaped before this returns.
void read_isolated(const std::string& path, const std::string& format, const ReaderLimits& limits,
                   const IsolatedReader& reader, const ResultConsumer& consume,
                   LeavingChildren* leaving = nullptr);

// Asks for transparent huge pages on the 2 MiB-aligned part of [p, p + bytes) (madvise
// MADV_HUGEPAGE; nothing happens when the kernel does not offer them). Where each page fault is
// expensive (in a virtual machine whose page-table updates trap: ~16 µs per 4 KiB page measured
// on the machine this was written on) the first touch of a large array costs more than its copy.
void advise_huge_pages(void* p, std::size_t bytes);

// A third-party message made fit for one line: control characters become spaces (runs of
// white space collapse), each double-quoted run of input keeps at most `max_quote` characters
// ("..." marks the cut) and the whole at most `max_total` (Assimp 5.2 quotes the rest of the
// file when a number does not parse: 63,342 characters on one line, measured).
std::string tidy_message(std::string_view text, std::size_t max_quote = 60,
                         std::size_t max_total = 200);

}  // namespace machcut::detail

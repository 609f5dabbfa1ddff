// Writing results: checked writes, atomic file output, stdout for "-", several outputs
// committed together.
#pragma once

#include <string>
#include <vector>

namespace machcut {

// Writes `content` to `path`:
//  - "-": standard output (std::cout is flushed first), every write checked;
//  - a new name, or an existing regular file (also through a symbolic link, which stays):
//    atomically — a temporary file in the same folder, then renamed over the target, which
//    keeps its permission bits;
//  - an existing character device or FIFO (/dev/null, a terminal, a shell's >(...)), and the
//    links to open descriptors /dev/stdout, /dev/stderr, /dev/fd/N, /proc/…: opened and
//    written in place, never replaced (a regular file behind such a link is appended to; a
//    FIFO that nobody reads is refused at once instead of waiting).
// Throws InputError naming the path with the reason, and leaves no temporary file, for: any
// of `inputs` (also through links), a folder, a block device, a socket, a dangling symbolic
// link, a read-only existing file, a missing output folder, and any failed open, write or
// close ("write failed: No space left on device"). Standard output errors name "standard
// output".
void write_output(const std::string& path, const std::string& content,
                  const std::vector<std::string>& inputs = {});

// One output of a command: where it goes (as for write_output) and what it holds.
struct OutputFile {
  std::string path;
  std::string content;
};

// Writes several outputs all or nothing: checks every target (check_distinct_outputs, then
// the refusals of write_output) before writing a byte, writes every file output to its
// temporary, then the in-place targets (devices, FIFOs, standard output) in the given order,
// then renames the temporaries into place. Any failure before the renames removes the
// temporaries, so no file output is created or changed, and throws InputError. With
// `create_folders`, missing folders on the way to an output are created first and removed
// again (when still empty) if the outputs cannot be written: a folder of outputs appears only
// complete. (Devices and standard output cannot be taken back once written; a rename that fails
// after others succeeded — not seen in practice, all are in their own folders — leaves those.)
void write_outputs(const std::vector<OutputFile>& outputs,
                   const std::vector<std::string>& inputs = {}, bool create_folders = false);

// Throws InputError when two of `paths` name the same file: spelled alike after making them
// absolute and resolving links and "..", or the same existing file under two names (hard
// links). Empty paths are skipped; "-" (standard output) counts like a file; character
// devices (/dev/null) may repeat. `labels` (optional, one per path, e.g. "--csv") name the
// outputs in the message: "out.csv: --csv and --json both write to it".
void check_distinct_outputs(const std::vector<std::string>& paths,
                            const std::vector<std::string>& labels = {});

// Flushes std::cout and C's stdout; throws InputError("standard output", "write failed: …")
// when a write to standard output has failed since the start (the streams remember it), so a
// command that prints its results can end with this check.
void flush_stdout();

// Formats a double for CSV/JSON: 15 significant digits (finer than the engine's 1e-9 relative
// accuracy, without the round-off noise of %.17g).
std::string format_number(double v);

}  // namespace machcut

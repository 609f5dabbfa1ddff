// What every machcut command shares: model options, loading, exit codes, progress.
#pragma once

#include <CLI/CLI.hpp>

#include <string>
#include <vector>

#include "machcut/intake/import.h"
#include "machcut/common/mesh.h"

namespace machcut::cli {

// Exit codes (documented in README.md):
enum ExitCode {
  kExitOk = 0,
  kExitUnusable = 1,   // input read, but the model is not usable for the analysis (reason printed)
  kExitBadInput = 2,   // a file or option is wrong (one line naming it)
  kExitInternal = 3,   // an unexpected internal error (a bug: please report)
  kExitPartial = 4,    // some results given, others not (e.g. D/q at some Mach numbers only)
};

// Options that select and map the model; registered on every command that reads meshes.
struct ModelOptions {
  std::vector<std::string> files;
  std::string units = "m";
  std::string flow = "+x";
  std::string up = "+z";
  bool sum = false;     // plain sum of overlapping shells instead of their union
  bool quiet = false;   // no progress bar, no notes (warnings still go to stderr)
  bool no_cache = false;  // neither read nor write the prepared-model cache
  bool strict = false;
  double wrap_alpha = 0.0, wrap_offset = 0.0;
  std::vector<std::string> skip, only;  // --skip, --only (repeatable)
};
void add_model_options(CLI::App* cmd, ModelOptions& options);

// How the ends of the area curves are closed for wave drag (study.h: EndSetup).
struct EndOptions {
  std::vector<std::string> captures;  // "NAME" or "NAME=AREA" (m²)
  bool no_wake = false;
};
void add_end_options(CLI::App* cmd, EndOptions& options);

// Progress bar on stderr when it is a terminal; silent otherwise or when quiet.
class Progress {
 public:
  Progress(std::string label, bool quiet);
  ~Progress();
  void update(double fraction);  // 0..1
  void done();

 private:
  std::string label_;
  bool active_ = false;
  int last_ = -1;
};

// Checks before any long computation that `path` can receive an output: "-" (stdout) always
// can; otherwise its folder must exist and it must not be one of `inputs`. Throws InputError
// naming the path (the same refusals as write_output, which checks again when writing).
void check_output_path(const std::string& path, const std::vector<std::string>& inputs);

// check_output_path for each non-empty path of `outputs` (pairs of option name and path), and
// no two of them on one file or both on stdout. Throws InputError naming the option.
void check_outputs(const std::vector<std::pair<std::string, std::string>>& outputs,
                   const std::vector<std::string>& inputs);

// Prints "machcut: warning: ..." on stderr.
void warn(const std::string& line);
// Prints a note on stderr (unless quiet).
void note(const ModelOptions& options, const std::string& line);

}  // namespace machcut::cli

#include "cli_common.h"

#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <iostream>

#include "cli_commands.h"
#include "machcut/common/errors.h"

namespace machcut::cli {

void add_model_options(CLI::App* cmd, ModelOptions& o) {
  cmd->add_option("files", o.files, "Mesh files (STL, OBJ, PLY, OFF, glTF/GLB, COLLADA, AMF, X3D); together one model")
      ->required()
      ->check(CLI::ExistingFile);
  cmd->add_option("--units", o.units, "Length unit of the input: m, mm, cm, in, ft (outputs are SI)")
      ->capture_default_str();
  cmd->add_option("--flow", o.flow, "File axis pointing from nose to tail: +x, -x, +y, -y, +z, -z")
      ->capture_default_str();
  cmd->add_option("--up", o.up, "File axis pointing up (glTF files are y-up: use --up +y)")
      ->capture_default_str();
  cmd->add_flag("--sum", o.sum, "Sum overlapping shells instead of uniting them");
  cmd->add_flag("-q,--quiet", o.quiet, "No progress bar or notes (warnings still shown)");
  cmd->add_flag("--strict", o.strict,
                "Refuse a shell that is open beyond simple holes, intersects itself, is non-manifold "
                "or non-orientable instead of replacing it by its alpha wrap");
  cmd->add_option("--skip", o.skip,
                  "Leave out a part: FILE:PART, PART, a shell FILE:PART#k or every part of FILE. "
                  "Repeatable")
      ->allow_extra_args(false);
  cmd->add_option("--only", o.only,
                  "Use only these parts (names as for --skip). Repeatable")
      ->allow_extra_args(false);
  cmd->add_option("--wrap-alpha", o.wrap_alpha,
                  "Alpha of the alpha wrap of broken shells, m (default 1/100 of the shell's size)");
  cmd->add_option("--wrap-offset", o.wrap_offset, "Offset of the alpha wrap, m (default alpha/10)");
  cmd->add_flag("--no-cache", o.no_cache,
                "Neither read nor write the prepared-model cache ($XDG_CACHE_HOME/machcut, else "
                "~/.cache/machcut)");
}

void add_end_options(CLI::App* cmd, EndOptions& o) {
  cmd->add_option("--capture", o.captures,
                  "Flow-through shells NAME (a shell, every shell of a part FILE:PART or PART, or of "
                  "a FILE): subtract the "
                  "stream tube captured by their flat inlet faces; NAME=AREA: subtract AREA m² "
                  "from those shells' own areas instead. Repeatable")
      ->allow_extra_args(false);
  cmd->add_flag("--no-wake", o.no_wake,
                "Do not continue flat aft faces (bases, nozzle exits) by constant-area wakes");
}

Progress::Progress(std::string label, bool quiet) : label_(std::move(label)) {
  active_ = !quiet && isatty(STDERR_FILENO);
}

Progress::~Progress() { done(); }

void Progress::update(double fraction) {
  if (!active_) return;
  const int pct = static_cast<int>(fraction * 100.0 + 0.5);
  if (pct == last_) return;
  last_ = pct;
  const int width = 30;
  const int fill = pct * width / 100;
  std::fprintf(stderr, "\r%-12s [%.*s%*s] %3d%%", label_.c_str(), fill,
               "##############################", width - fill, "", pct);
  std::fflush(stderr);
}

void Progress::done() {
  if (!active_) return;
  std::fprintf(stderr, "\r%*s\r", 60, "");
  std::fflush(stderr);
  active_ = false;
}

void check_output_path(const std::string& path, const std::vector<std::string>& inputs) {
  namespace fs = std::filesystem;
  if (path == "-") return;
  std::error_code ec;
  for (const std::string& in : inputs)
    if (fs::exists(path, ec) && fs::equivalent(path, in, ec))
      throw InputError(path, "refusing to overwrite an input file");
  const fs::path target(path);
  const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  if (!fs::is_directory(dir, ec)) throw InputError(path, "output folder does not exist");
  if (fs::is_directory(target, ec)) throw InputError(path, "is a folder, not a file name");
}

void check_outputs(const std::vector<std::pair<std::string, std::string>>& outputs,
                   const std::vector<std::string>& inputs) {
  namespace fs = std::filesystem;
  for (std::size_t i = 0; i < outputs.size(); ++i) {
    const auto& [option, path] = outputs[i];
    if (path.empty()) continue;
    check_output_path(path, inputs);
    for (std::size_t k = 0; k < i; ++k) {
      const auto& [other, earlier] = outputs[k];
      if (earlier.empty()) continue;
      std::error_code ec;
      const bool same = earlier == path || (path != "-" && earlier != "-" &&
                                            fs::weakly_canonical(earlier, ec) == fs::weakly_canonical(path, ec));
      if (same)
        throw InputError(option, path == "-" ? other + " and " + option + " cannot both write to stdout ('-')"
                                             : "'" + path + "' is also given to " + other + "; give each output its own file");
    }
  }
}

void warn(const std::string& line) { std::cerr << "machcut: warning: " << line << "\n"; }

void note(const ModelOptions& options, const std::string& line) {
  if (!options.quiet) std::cerr << "machcut: " << line << "\n";
}

}  // namespace machcut::cli

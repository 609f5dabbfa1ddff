// Registration of the machcut subcommands; one file per command (cmd_*.cpp).
#pragma once

#include <CLI/CLI.hpp>

#include <stdexcept>
#include <string>

#include "machcut/common/errors.h"

namespace machcut::cli {

using machcut::UnusableModel;  // common/errors.h

// Thrown after the outputs are written when some of the requested results could not be given
// (exit code 4, kExitPartial).
class PartialResult : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

void register_commands(CLI::App& app);

}  // namespace machcut::cli

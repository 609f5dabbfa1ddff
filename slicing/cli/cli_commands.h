// Registration of the machcut subcommands; one file per command (cmd_*.cpp).
#pragma once

#include <CLI/CLI.hpp>

#include <stdexcept>
#include <string>

#include "machcut/common/errors.h"

namespace machcut::cli {

using machcut::UnusableModel;  // common/errors.h

void register_commands(CLI::App& app);

}  // namespace machcut::cli

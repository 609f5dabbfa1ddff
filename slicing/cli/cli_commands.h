// Registration of the machcut subcommands; one file per command (cmd_*.cpp).
#pragma once

#include <CLI/CLI.hpp>

#include <stdexcept>
#include <string>

namespace machcut::cli {

// Thrown by a command when the input was read but the model is not usable for the analysis.
class UnusableModel : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

void register_commands(CLI::App& app);

}  // namespace machcut::cli

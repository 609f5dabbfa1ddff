#include "cli_commands.h"

namespace machcut::cli {

// One registration function per command file (cmd_*.cpp).

void register_commands(CLI::App& app) {
  (void)app;
}

}  // namespace machcut::cli

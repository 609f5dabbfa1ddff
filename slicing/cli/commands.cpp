#include "cli_commands.h"

namespace machcut::cli {

// One registration function per command file (cmd_*.cpp).
void add_inspect_command(CLI::App& app);
void add_area_command(CLI::App& app);
void add_drag_command(CLI::App& app);
void add_jumps_command(CLI::App& app);
void add_compare_command(CLI::App& app);
void add_report_command(CLI::App& app);
void add_sensitivity_command(CLI::App& app);
void add_reshape_command(CLI::App& app);

void register_commands(CLI::App& app) {
  add_inspect_command(app);
  add_area_command(app);
  add_drag_command(app);
  add_jumps_command(app);
  add_compare_command(app);
  add_report_command(app);
  add_sensitivity_command(app);
  add_reshape_command(app);
  (void)app;
}

}  // namespace machcut::cli

// machcut: command-line front end. Parses options, calls the core, prints. No physics here.
#include <CLI/CLI.hpp>

#include <exception>
#include <iostream>

#include "cli_commands.h"
#include "cli_common.h"
#include "machcut/common/errors.h"

int main(int argc, char** argv) {
  using namespace machcut::cli;
  CLI::App app{
      "machcut — cross-sectional area distributions and zero-lift wave drag of aircraft meshes.\n"
      "Results are preliminary design estimates (linear theory, zero lift); confirm them with\n"
      "validated analysis, test and the applicable codes and licensed practice.",
      "machcut"};
  app.require_subcommand(1);
  app.set_version_flag("--version", "machcut 0.1.0");
  register_commands(app);
  // One line per error, as for every other bad input.
  app.failure_message([](const CLI::App*, const CLI::Error& e) {
    return std::string("machcut: ") + e.what() + " (see --help)\n";
  });
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? kExitOk : kExitBadInput;
  } catch (const machcut::InputError& e) {
    std::cerr << "machcut: " << e.what() << "\n";
    return kExitBadInput;
  } catch (const PartialResult& e) {
    std::cerr << "machcut: " << e.what() << "\n";
    return kExitPartial;
  } catch (const UnusableModel& e) {
    // An empty message: the reason was printed already (inspect prints it first, then its report).
    if (*e.what()) std::cerr << "machcut: " << e.what() << "\n";
    return kExitUnusable;
  } catch (const std::bad_alloc&) {
    std::cerr << "machcut: out of memory\n";
    return kExitInternal;
  } catch (const std::exception& e) {
    std::cerr << "machcut: internal error: " << e.what() << "\n";
    return kExitInternal;
  }
  return kExitOk;
}

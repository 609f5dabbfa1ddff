#define CATCH_CONFIG_RUNNER
#include <catch2/catch.hpp>

#include <cstdlib>

int main(int argc, char* argv[]) {
  // The section engine's invariant checks (section.h: section_checks_enabled) in every test and
  // in the CLI the tests run as a child process (it inherits the environment).
  setenv("MACHCUT_CHECK_SECTIONS", "1", 0);
  return Catch::Session().run(argc, argv);
}

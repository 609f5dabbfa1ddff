// The viewer's three ways to run: an interactive window, one screenshot, a frame-time benchmark.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "app_state.h"

namespace machcut::view {

struct AppOptions {
  std::vector<std::string> files;
  Controls controls;
  std::optional<double> station;      // m; default: the middle of the station range
  std::string screenshot;             // PNG path: render one frame and exit
  int width = 1440, height = 900;     // window / screenshot size, pixels
  int bench_frames = 0;               // > 0: benchmark mode, frames per scenario
  std::size_t generated_triangles = 0;  // > 0: the generated test configuration, no files
  double timeout_s = 300.0;           // screenshot: longest wait for the results
  std::string state_file;             // window: write the viewer's state here as JSON on change
};

// Exit codes as the CLI: 0 ok, 2 bad input (a message on stderr), 3 internal error.
int run_window(const AppOptions& o);
int run_screenshot(const AppOptions& o);
int run_bench(const AppOptions& o);

}  // namespace machcut::view

// Writing results: atomic file output, stdout for "-".
#pragma once

#include <string>
#include <vector>

namespace machcut {

// Writes `content` to `path` atomically (temporary file in the same folder, then rename), or
// to stdout when path is "-". Refuses (InputError) to write over any of `inputs`.
void write_output(const std::string& path, const std::string& content,
                  const std::vector<std::string>& inputs = {});

// Formats a double for CSV/JSON: 15 significant digits (finer than the engine's 1e-9 relative
// accuracy, without the round-off noise of %.17g).
std::string format_number(double v);

}  // namespace machcut

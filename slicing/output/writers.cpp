#include "machcut/output/writers.h"

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <random>

#include "machcut/common/errors.h"

namespace machcut {

namespace fs = std::filesystem;

void write_output(const std::string& path, const std::string& content,
                  const std::vector<std::string>& inputs) {
  if (path == "-") {
    std::cout << content;
    std::cout.flush();
    return;
  }
  std::error_code ec;
  for (const std::string& in : inputs) {
    if (fs::exists(path, ec) && fs::equivalent(path, in, ec))
      throw InputError(path, "refusing to overwrite an input file");
  }
  const fs::path target(path);
  const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  if (!fs::is_directory(dir, ec)) throw InputError(path, "output folder does not exist");
  std::random_device rd;
  const fs::path tmp = dir / ("." + target.filename().string() + ".tmp" + std::to_string(rd()));
  {
    std::ofstream f(tmp, std::ios::binary);
    if (!f) throw InputError(path, "cannot create output file");
    f.write(content.data(), static_cast<std::streamsize>(content.size()));
    f.flush();
    if (!f) {
      f.close();
      fs::remove(tmp, ec);
      throw InputError(path, "write failed (disk full?)");
    }
  }
  fs::rename(tmp, target, ec);
  if (ec) {
    fs::remove(tmp, ec);
    throw InputError(path, "cannot move output into place: " + ec.message());
  }
}

std::string format_number(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.15g", v);
  return buf;
}

}  // namespace machcut

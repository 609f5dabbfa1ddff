#include "machcut/common/shell_names.h"

#include <filesystem>

namespace machcut {

namespace {

// A shell name without its "#k" (k = 1, 2, ...); any other name as it is (a '#' may be part of
// a file name).
std::string without_index(const std::string& name) {
  const std::size_t hash = name.rfind('#');
  if (hash == std::string::npos || hash + 1 == name.size() ||
      name.find_first_not_of("0123456789", hash + 1) != std::string::npos)
    return name;
  return name.substr(0, hash);
}

}  // namespace

std::string shell_part(const std::string& shell_name) { return without_index(shell_name); }

bool shell_selected(const std::string& shell_name, const std::string& selector) {
  if (selector.empty()) return false;
  if (shell_name == selector) return true;
  const std::string base = without_index(shell_name);  // FILE or FILE:PART
  if (base == selector) return true;
  const std::string file = std::filesystem::path(selector).filename().string();
  for (const std::string& f : {selector, file})
    if (!f.empty() && (base == f || (base.size() > f.size() && base.compare(0, f.size(), f) == 0 && base[f.size()] == ':')))
      return true;
  // The file by its name when the shell's file is named by a path ("parts/pod.stl#1").
  const std::string shell_file = std::filesystem::path(base.substr(0, base.find(':'))).filename().string();
  if (!file.empty() && shell_file == file) return true;
  // The part alone: what follows a ':' (a file name may hold ':' too, so try each), or one of
  // the '+'-joined parts there.
  for (std::size_t colon = base.find(':'); colon != std::string::npos; colon = base.find(':', colon + 1)) {
    const std::string tail = base.substr(colon + 1);
    if (tail == selector) return true;
    std::size_t at = 0;
    for (std::size_t plus = tail.find('+'); ; plus = tail.find('+', at)) {
      if (tail.compare(at, plus == std::string::npos ? std::string::npos : plus - at, selector) == 0 &&
          (plus == std::string::npos ? tail.size() - at : plus - at) == selector.size())
        return true;
      if (plus == std::string::npos) break;
      at = plus + 1;
    }
  }
  return false;
}

}  // namespace machcut

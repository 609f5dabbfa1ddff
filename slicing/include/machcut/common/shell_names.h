// Shell names: "FILE", "FILE#k", "FILE:PART", "FILE:PART#k", "FILE:A+B" (import.h:
// import_meshes names them) and the selectors of --capture, --skip and --only.
#pragma once

#include <string>

namespace machcut {

// The part a shell belongs to: its name without the "#k" (k = 1, 2, ...): "FILE:PART" or
// "FILE". A '#' followed by anything but digits is part of the name.
std::string shell_part(const std::string& shell_name);

// Whether `selector` (as given to --capture, --skip, --only) names the shell `shell_name`
// (import.h's naming): the shell itself ("wing.obj:flap#2"), its part ("wing.obj:flap"), the
// part alone ("flap"; also one of the parts of a shell named "FILE:A+B"), or its file (the
// file name "wing.obj" or a path ending in it). An empty selector names nothing.
bool shell_selected(const std::string& shell_name, const std::string& selector);

}  // namespace machcut

// libFuzzer target: the bytes of a mesh file → import → health check and hole repair → Mach-plane
// sections. The first byte picks the file type (byte % 6: STL, OBJ, PLY, OFF, glTF, GLB); the
// rest is the file. The reader runs in this process
// (ImportOptions::isolate_reader = false) so that a crash inside Assimp reaches the fuzzer
// instead of becoming an error line. To keep each run short the union of overlapping shells is
// off and a broken shell is refused rather than alpha-wrapped (ModelSetup::strict; the wrap of
// a 12-triangle shell took 1.6 s in a Release build, over 10 s instrumented). InputError (a file refused with a message) is the
// expected way out for bad input; anything else that escapes — another exception, a crash, a
// sanitizer report, a hang — is a finding.
//
// Build and run: see fuzz/README.md.
#include <unistd.h>

#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <string>

#include "machcut/common/errors.h"
#include "machcut/intake/model.h"
#include "machcut/sections/section.h"

namespace {

// The formats machcut checks itself before Assimp. COLLADA, AMF and X3D go to Assimp's readers
// unchecked and rely on the reader's child process (import_guard.cpp) to contain a crash: the
// in-process fuzzer would only find Assimp's own faults there.
constexpr const char* kExtensions[] = {".stl", ".obj", ".ply", ".off", ".gltf", ".glb"};
constexpr std::size_t kTypes = sizeof kExtensions / sizeof kExtensions[0];

// A private folder for this process's input files: a glTF file may name other files beside it.
const std::filesystem::path& work_folder() {
  static const std::filesystem::path dir = [] {
    std::string pattern = (std::filesystem::temp_directory_path() / "machcut_fuzz_XXXXXX").string();
    if (!::mkdtemp(pattern.data())) std::abort();
    return std::filesystem::path(pattern);
  }();
  return dir;
}

std::string write_input(const std::uint8_t* data, std::size_t size) {
  const std::string path = (work_folder() / (std::string("input") + kExtensions[data[0] % kTypes])).string();
  std::FILE* f = std::fopen(path.c_str(), "wb");
  if (!f) std::abort();
  if (size > 1 && std::fwrite(data + 1, 1, size - 1, f) != size - 1) std::abort();
  if (std::fclose(f) != 0) std::abort();
  return path;
}

// Areas at a few stations and one full section, normal planes and Mach 1.5 rolled 30°.
void cut(const machcut::Mesh& mesh) {
  const machcut::SectionEngine engine(mesh);
  for (const machcut::MachPlanes planes : {machcut::MachPlanes{1.0, 0.0}, machcut::MachPlanes{1.5, 30.0}}) {
    const machcut::StationRange range = engine.range(planes);
    if (!(range.hi > range.lo)) continue;
    const std::vector<double> stations = machcut::make_stations(range, 7, machcut::Spacing::cosine);
    (void)engine.areas(planes, stations);
    (void)engine.section(planes, 0.5 * (range.lo + range.hi));
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  if (size == 0) return 0;
  const std::string path = write_input(data, size);
  machcut::ModelSetup setup;
  setup.import.isolate_reader = false;
  setup.unite = false;
  setup.strict = true;
  try {
    const machcut::PreparedModel model = machcut::prepare_model({path}, setup);
    if (model.usable) cut(model.analysis);
  } catch (const machcut::InputError&) {
    // refused with a message: the expected outcome for most inputs
  }
  return 0;
}

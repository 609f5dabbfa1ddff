// Tests for slicing/output/mesh_export.cpp: every format machcut reads, written and read back
// through machcut's own import (slicing/intake/import.cpp).
#include <catch2/catch.hpp>

#include <cmath>
#include <filesystem>
#include <fstream>

#include "machcut/common/errors.h"
#include "machcut/intake/import.h"
#include "machcut/output/mesh_export.h"
#include "test_support.h"

using namespace machcut;
namespace fs = std::filesystem;

TEST_CASE("export_mesh: each format reads back with the same triangles and volume",
          "[output][mesh_export]") {
  // A closed parabolic spindle r = 0.4·4u(1 − u) over 0..4 m, 24 stations × 16 segments.
  std::vector<double> x, r;
  for (int i = 0; i <= 24; ++i) {
    const double u = i / 24.0;
    x.push_back(4.0 * u);
    r.push_back(0.4 * 4.0 * u * (1.0 - u));
  }
  const Mesh body = test::make_body_of_revolution(x, r, 16);
  const double volume = signed_volume(body);
  REQUIRE(volume > 0.0);
  const fs::path dir = test::temp_path("mesh_export");
  fs::remove_all(dir);
  fs::create_directories(dir);
  struct Case {
    std::string ext;
    bool binary;
  };
  for (const Case& c :
       {Case{".stl", false}, Case{".stl", true}, Case{".obj", false}, Case{".ply", false},
        Case{".ply", true}, Case{".off", false}, Case{".gltf", false}, Case{".glb", false},
        Case{".dae", false}, Case{".amf", false}, Case{".x3d", false}}) {
    INFO(c.ext << (c.binary ? " binary" : ""));
    MeshExportOptions o;
    o.binary = c.binary;
    o.amf_unit = "meter";
    const std::string bytes = export_mesh(body, c.ext, "spindle", o);
    const fs::path path = dir / ((c.binary ? "spindle_bin" : "spindle") + c.ext);
    std::ofstream(path, std::ios::binary) << bytes;
    if (c.ext == ".ply") CHECK((bytes.find("format binary") != std::string::npos) == c.binary);
    if (c.ext == ".gltf")
      CHECK(bytes.find("data:application/octet-stream;base64,") != std::string::npos);
    const Mesh back = import_meshes({path.string()}, ImportOptions{});
    CHECK(back.triangles.size() == body.triangles.size());
    CHECK(back.positions.size() == body.positions.size());
    // Same volume to single precision (Assimp's exporters store floats: 6e-8 relative per
    // coordinate; the text writers 15 digits). 1e-6: float rounding summed over the facets.
    CHECK(std::fabs(signed_volume(back) / volume - 1.0) < 1e-6);
  }
  CHECK_THROWS_AS(export_mesh(body, ".3ds", "spindle"), InputError);
}

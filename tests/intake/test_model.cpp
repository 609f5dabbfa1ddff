// Tests of prepare_model (slicing/intake/model.cpp) from files, and of `machcut inspect`
// (slicing/cli/cmd_inspect.cpp, slicing/cli/cli_model.cpp) through the CLI.
#include <nlohmann/json.hpp>
#include <catch2/catch.hpp>

#include <fstream>

#include "machcut/intake/model.h"
#include "test_support.h"

using namespace machcut;
using namespace machcut::test;
using Catch::Matchers::Contains;
using Catch::Matchers::WithinRel;

namespace {

Mesh named(Mesh m, const std::string& name) {
  m.shell_names = {name};
  return m;
}

Mesh sheet_along_flow() {
  Mesh m;
  m.positions = {{0, 0, 0}, {1, 0, 0}, {1, 1, 0}, {0, 1, 0}};
  m.triangles = {{0, 1, 2}, {0, 2, 3}};
  m.shell = {0, 0};
  m.shell_names = {"sheet"};
  return m;
}

}  // namespace

TEST_CASE("prepare_model reads files, maps units and records the mapping", "[model]") {
  // Source: exact unit factor 1 mm = 0.001 m (SI); box 2000 × 1000 × 500 mm = 1 m³.
  const std::string path = write_stl_ascii(make_box({0, 0, 0}, {2000, 1000, 500}), "model_mm.stl");
  ModelSetup setup;
  setup.import.unit = LengthUnit::mm;
  std::vector<std::string> stages;
  setup.progress = [&](const std::string& stage, double) { stages.push_back(stage); };
  const PreparedModel pm = prepare_model({path}, setup);
  REQUIRE(pm.usable);
  CHECK_THAT(pm.health.volume, WithinRel(1.0, 1e-12));
  CHECK_THAT(pm.health.length, WithinRel(2.0, 1e-12));
  REQUIRE_FALSE(pm.notes.empty());
  CHECK_THAT(pm.notes.front(), Contains("model x"));
  CHECK_FALSE(stages.empty());
  CHECK(pm.files == std::vector<std::string>{path});
}

TEST_CASE("inspect: closed model, JSON keys and exit 0", "[cli][inspect]") {
  // Source: elementary geometry — box 4 × 2 × 1 m: volume 8 m³, area 28 m².
  const std::string path = write_stl_ascii(named(make_box({0, 0, 0}, {4, 2, 1}), "box"), "inspect_box.stl");
  const RunResult r = run_cli("inspect " + path + " --json -");
  REQUIRE(r.exit_code == 0);
  const auto j = nlohmann::json::parse(r.out);
  CHECK_THAT(j["volume"].get<double>(), WithinRel(8.0, 1e-12));
  CHECK_THAT(j["wetted_area"].get<double>(), WithinRel(28.0, 1e-12));
  CHECK(j["closed"].get<bool>());
  CHECK(j["boundary_edges"].get<int>() == 0);
  CHECK(j["usable"].get<bool>());
  REQUIRE(j["shells"].size() == 1);
  CHECK_THAT(j["shells"][0]["volume"].get<double>(), WithinRel(8.0, 1e-12));
  CHECK(j["shells"][0]["closed"].get<bool>());
  for (const char* key : {"triangles", "vertices", "nonmanifold_edges", "degenerate_triangles",
                          "bounds", "length", "intersecting", "contained", "holes", "caution"})
    CHECK(j.contains(key));
}

TEST_CASE("inspect: readable report on stdout, JSON to a file", "[cli][inspect]") {
  const std::string path = write_stl_ascii(make_box({0, 0, 0}, {1, 1, 1}), "inspect_text.stl");
  const std::string json = temp_path("inspect_text.json");
  const RunResult r = run_cli("inspect " + path + " --json " + json);
  REQUIRE(r.exit_code == 0);
  CHECK_THAT(r.out, Contains("volume 1 m³"));
  CHECK_THAT(r.out, Contains("usable yes"));
  std::ifstream f(json);
  CHECK(nlohmann::json::parse(f)["closed"].get<bool>());
}

TEST_CASE("inspect: open mesh is warned and its hole reported", "[cli][inspect]") {
  Mesh sphere = make_sphere({0, 0, 0}, 1.0, 16, 32);
  sphere.triangles.erase(sphere.triangles.begin() + 40);
  sphere.shell.erase(sphere.shell.begin() + 40);
  const std::string path = write_stl_ascii(sphere, "inspect_open.stl");
  const RunResult r = run_cli("inspect " + path + " --json -");
  REQUIRE(r.exit_code == 0);
  CHECK_THAT(r.err, Contains("warning"));
  CHECK_THAT(r.err, Contains("open"));
  const auto j = nlohmann::json::parse(r.out);
  CHECK_FALSE(j["closed"].get<bool>());
  CHECK(j["boundary_edges"].get<int>() == 3);  // one missing triangle (definition)
  CHECK(j["holes"].size() == 1);
}

TEST_CASE("inspect: flat model is refused with exit 1", "[cli][inspect]") {
  const std::string path = write_stl_ascii(sheet_along_flow(), "inspect_flat.stl");
  const RunResult r = run_cli("inspect " + path);
  CHECK(r.exit_code == 1);
  CHECK_THAT(r.err, Contains("flat"));
  CHECK_THAT(r.out, Contains("usable no"));
}

TEST_CASE("inspect: a hole large against the sections is closed with its bound and a warning", "[cli][inspect]") {
  // A cube missing one end triangle: 0.5 m² of hole against a 1 m² largest section.
  Mesh cube = make_box({0, 0, 0}, {1, 1, 1});
  for (std::size_t i = 0; i < cube.triangles.size(); ++i) {
    bool end = true;
    for (std::uint32_t v : cube.triangles[i]) end = end && cube.positions[v].x == 1.0;
    if (end) {
      cube.triangles.erase(cube.triangles.begin() + static_cast<std::ptrdiff_t>(i));
      cube.shell.erase(cube.shell.begin() + static_cast<std::ptrdiff_t>(i));
      break;
    }
  }
  const std::string path = write_stl_ascii(cube, "inspect_broken.stl");
  const RunResult r = run_cli("inspect " + path + " --json -");
  CHECK(r.exit_code == 0);
  CHECK_THAT(r.err, Contains("mostly the fans' guess"));
  const auto j = nlohmann::json::parse(r.out);
  CHECK(j["usable"].get<bool>());
  REQUIRE(j["holes"].size() == 1);
  // Source: elementary geometry — the missing half of the 1 m² end face projects to 0.5 m².
  CHECK_THAT(j["holes"][0]["projected_area"].get<double>(), WithinRel(0.5, 1e-12));
}

TEST_CASE("inspect: overlapping shells united, or summed with --sum", "[cli][inspect]") {
  // Source: elementary geometry — boxes of 8 m³ and 1 m³ overlapping in 0.5 m³.
  const std::string a = write_stl_ascii(named(make_box({0, 0, 0}, {2, 2, 2}), "a"), "inspect_a.stl");
  const std::string b = write_stl_ascii(named(make_box({1.5, 0.5, 0.5}, {2.5, 1.5, 1.5}), "b"), "inspect_b.stl");
  const RunResult u = run_cli("inspect " + a + " " + b + " --json -");
  REQUIRE(u.exit_code == 0);
  const auto ju = nlohmann::json::parse(u.out);
  CHECK_THAT(ju["volume"].get<double>(), WithinRel(8.5, 1e-9));
  CHECK(ju["united"].get<bool>());
  CHECK(ju["intersecting"].size() == 1);
  const RunResult s = run_cli("inspect " + a + " " + b + " --sum --json -");
  REQUIRE(s.exit_code == 0);
  CHECK_THAT(nlohmann::json::parse(s.out)["volume"].get<double>(), WithinRel(9.0, 1e-12));
  CHECK_THAT(s.err, Contains("twice"));
}

TEST_CASE("inspect: bad options and files exit 2 naming them", "[cli][inspect]") {
  const std::string path = write_stl_ascii(make_box({0, 0, 0}, {1, 1, 1}), "inspect_opts.stl");
  const RunResult units = run_cli("inspect " + path + " --units parsec");
  CHECK(units.exit_code == 2);
  CHECK_THAT(units.err, Contains("--units"));
  const RunResult axes = run_cli("inspect " + path + " --flow +x --up -x");
  CHECK(axes.exit_code == 2);
  CHECK_THAT(axes.err, Contains("--up"));
  const RunResult missing = run_cli("inspect " + temp_path("no_such_file.stl"));
  CHECK(missing.exit_code == 2);
  CHECK(run_cli("inspect --help").exit_code == 0);
}

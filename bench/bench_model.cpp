// Benchmark: model preparation (health, orientation, overlap check) on a 1M-triangle closed
// body, and the union of two overlapping spheres at growing sizes. Baseline measured in the same
// run: one signed-volume pass over the same mesh (the cheapest thing that touches every
// triangle). Prints health cost as a multiple of that pass and the union cost per triangle.
#include <benchmark/benchmark.h>

#include <cmath>
#include <cstdio>
#include <map>
#include <utility>
#include <vector>

#include "machcut/intake/holes.h"
#include "test_support.h"

namespace {

// A closed body of revolution: 500 rings × 1000 segments ≈ 1M triangles, one shell.
const machcut::Mesh& body_1m() {
  static const machcut::Mesh mesh = machcut::test::make_slender_body(501, 1000, 0.0);
  return mesh;
}

// Two UV spheres of radius 1 whose centres are 1 apart: about 4·rings² triangles in all.
machcut::Mesh two_spheres(int rings) {
  return machcut::concatenate({machcut::test::make_sphere({0, 0, 0}, 1.0, rings, 2 * rings),
                               machcut::test::make_sphere({0, 1, 0}, 1.0, rings, 2 * rings)});
}

void BM_VolumePass_1M(benchmark::State& state) {
  for (auto _ : state) benchmark::DoNotOptimize(machcut::signed_volume(body_1m()));
}

void BM_PrepareMesh_1M(benchmark::State& state) {
  for (auto _ : state) {
    state.PauseTiming();
    machcut::Mesh copy = body_1m();  // prepare_model moves its mesh in: copy outside the timing
    state.ResumeTiming();
    const machcut::PreparedModel pm = machcut::prepare_mesh(std::move(copy), {});
    benchmark::DoNotOptimize(pm.health.volume);
  }
  state.counters["triangles"] = static_cast<double>(body_1m().triangles.size());
}

void BM_UniteTwoSpheres(benchmark::State& state) {
  const machcut::Mesh m = two_spheres(static_cast<int>(state.range(0)));
  for (auto _ : state) {
    const machcut::PreparedModel pm = machcut::prepare_mesh(m, {});
    benchmark::DoNotOptimize(pm.analysis.triangles.size());
  }
  state.counters["triangles"] = static_cast<double>(m.triangles.size());
}

class RatioReporter : public benchmark::ConsoleReporter {
 public:
  std::map<std::string, double> seconds;
  std::map<std::string, double> triangles;
  void ReportRuns(const std::vector<Run>& runs) override {
    for (const Run& r : runs) {
      seconds[r.benchmark_name()] = r.GetAdjustedRealTime() * 1e-3;  // ms → s
      auto it = r.counters.find("triangles");
      if (it != r.counters.end()) triangles[r.benchmark_name()] = it->second;
    }
    ConsoleReporter::ReportRuns(runs);
  }
};

}  // namespace

BENCHMARK(BM_VolumePass_1M)->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_PrepareMesh_1M)->Unit(benchmark::kMillisecond)->Iterations(3)->UseRealTime();
BENCHMARK(BM_UniteTwoSpheres)->Arg(32)->Arg(64)->Arg(128)->Arg(256)
    ->Unit(benchmark::kMillisecond)->Iterations(1)->UseRealTime();

int main(int argc, char** argv) {
  benchmark::Initialize(&argc, argv);
  (void)body_1m();  // build the test mesh before any timing
  RatioReporter rep;
  benchmark::RunSpecifiedBenchmarks(&rep);
  double pass = 0, prep = 0;
  for (const auto& [name, s] : rep.seconds) {
    if (name.rfind("BM_VolumePass_1M", 0) == 0) pass = s;
    if (name.rfind("BM_PrepareMesh_1M", 0) == 0) prep = s;
  }
  if (pass > 0 && prep > 0)
    std::printf("health: prepare_mesh on %.0f triangles takes %.1fx one volume pass (%.3f s)\n",
                static_cast<double>(body_1m().triangles.size()), prep / pass, prep);
  for (const auto& [name, s] : rep.seconds)
    if (name.rfind("BM_UniteTwoSpheres", 0) == 0 && rep.triangles.count(name))
      std::printf("union: %s: %.0f triangles, %.3f s, %.2f µs per triangle, %.1fx the 1M health\n",
                  name.c_str(), rep.triangles[name], s, 1e6 * s / rep.triangles[name],
                  prep > 0 ? s / prep : 0.0);
  return 0;
}

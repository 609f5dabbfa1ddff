// Benchmark: exact Mach-plane areas of a 1M-triangle mesh at 200 stations × 36 roll angles,
// machcut's SectionEngine against CGAL's Polygon_mesh_slicer (AABB tree built once, loop areas
// summed) as the baseline measured in the same run. Checks that both agree, prints the ratio.
#include <CGAL/Exact_predicates_inexact_constructions_kernel.h>
#include <CGAL/Polygon_mesh_slicer.h>
#include <CGAL/Surface_mesh.h>
#include <benchmark/benchmark.h>

#include <cmath>
#include <cstdio>
#include <map>
#include <vector>

#include "machcut/sections/section.h"
#include "test_support.h"

namespace {

using K = CGAL::Exact_predicates_inexact_constructions_kernel;
using SurfaceMesh = CGAL::Surface_mesh<K::Point_3>;
using Polyline = std::vector<K::Point_3>;

constexpr double kMach = 1.4;
constexpr int kStations = 200;
constexpr int kRolls = 36;

// A slender closed body of revolution with a wavy radius: 500 rings × 1000 segments ≈ 1M
// triangles, no overlapping shells, no holes (so every section is a single simple loop).
const machcut::Mesh& bench_mesh() {
  static const machcut::Mesh mesh = machcut::test::make_slender_body(501, 1000, 0.05);
  return mesh;
}

std::vector<double> rolls() {
  std::vector<double> r;
  for (int i = 0; i < kRolls; ++i) r.push_back(360.0 * (i + 0.5) / kRolls);
  return r;
}

std::vector<double> stations_for(const machcut::StationRange& range) {
  // Interior stations only (the ends have zero area and a degenerate apex section).
  std::vector<double> s = machcut::make_stations(range, kStations + 2, machcut::Spacing::uniform);
  return {s.begin() + 1, s.end() - 1};
}

std::vector<std::vector<double>> engine_areas(const machcut::SectionEngine& engine) {
  const auto r = rolls();
  return engine.areas_for_rolls(kMach, r, stations_for);
}

SurfaceMesh to_cgal(const machcut::Mesh& m) {
  SurfaceMesh sm;
  std::vector<SurfaceMesh::Vertex_index> v;
  for (const auto& p : m.positions) v.push_back(sm.add_vertex({p.x, p.y, p.z}));
  for (const auto& t : m.triangles) sm.add_face(v[t[0]], v[t[1]], v[t[2]]);
  return sm;
}

// Projected (y-z) area of the section: |shoelace| of every closed polyline, summed.
double polyline_area(const std::vector<Polyline>& lines) {
  double total = 0.0;
  for (const Polyline& l : lines) {
    double twice = 0.0;
    for (std::size_t i = 0; i + 1 < l.size(); ++i)
      twice += l[i].y() * l[i + 1].z() - l[i].z() * l[i + 1].y();
    total += 0.5 * std::abs(twice);
  }
  return total;
}

std::vector<std::vector<double>> cgal_areas(CGAL::Polygon_mesh_slicer<SurfaceMesh, K>& slicer,
                                            const machcut::SectionEngine& engine) {
  const double beta = std::sqrt(kMach * kMach - 1);
  std::vector<std::vector<double>> out;
  for (double roll : rolls()) {
    const double t = roll * M_PI / 180.0;
    const auto st = stations_for(engine.range({kMach, roll}));
    std::vector<double> a;
    for (double X : st) {
      std::vector<Polyline> lines;
      slicer(K::Plane_3(1.0, -beta * std::cos(t), -beta * std::sin(t), -X),
             std::back_inserter(lines));
      a.push_back(polyline_area(lines));
    }
    out.push_back(a);
  }
  return out;
}

void BM_Engine_36Rolls(benchmark::State& state) {
  const machcut::SectionEngine engine(bench_mesh());
  for (auto _ : state) benchmark::DoNotOptimize(engine_areas(engine));
  state.counters["triangles"] = static_cast<double>(bench_mesh().triangles.size());
}

void BM_CgalSlicer_36Rolls(benchmark::State& state) {
  const machcut::SectionEngine engine(bench_mesh());
  SurfaceMesh sm = to_cgal(bench_mesh());
  CGAL::Polygon_mesh_slicer<SurfaceMesh, K> slicer(sm);  // AABB tree built once
  for (auto _ : state) benchmark::DoNotOptimize(cgal_areas(slicer, engine));
}

// Captures each benchmark's real time so main() can print the ratio.
class RatioReporter : public benchmark::ConsoleReporter {
 public:
  std::map<std::string, double> seconds;
  void ReportRuns(const std::vector<Run>& runs) override {
    for (const Run& r : runs)
      seconds[r.benchmark_name()] = r.GetAdjustedRealTime() * 1e-3;  // ms → s
    ConsoleReporter::ReportRuns(runs);
  }
};

}  // namespace

BENCHMARK(BM_Engine_36Rolls)->Unit(benchmark::kMillisecond)->MinTime(2.0)->UseRealTime();
BENCHMARK(BM_CgalSlicer_36Rolls)->Unit(benchmark::kMillisecond)->Iterations(1)->UseRealTime();

int main(int argc, char** argv) {
  // Agreement first: both engines on the same planes ("--no-check" skips it, for profiling).
  bool check = true;
  for (int i = 1; i < argc; ++i)
    if (std::string(argv[i]) == "--no-check") {
      check = false;
      for (int j = i; j + 1 < argc; ++j) argv[j] = argv[j + 1];
      --argc;
      break;
    }
  if (check) {
    const machcut::SectionEngine engine(bench_mesh());
    SurfaceMesh sm = to_cgal(bench_mesh());
    CGAL::Polygon_mesh_slicer<SurfaceMesh, K> slicer(sm);
    const auto a = engine_areas(engine);
    const auto b = cgal_areas(slicer, engine);
    double worst = 0.0;
    for (std::size_t r = 0; r < a.size(); ++r)
      for (std::size_t i = 0; i < a[r].size(); ++i)
        worst = std::max(worst, std::abs(a[r][i] - b[r][i]) / std::max(b[r][i], 1e-300));
    std::printf("agreement: max relative difference engine vs CGAL slicer = %.3g over %d x %d "
                "sections (%zu triangles)\n",
                worst, kRolls, kStations, bench_mesh().triangles.size());
    if (worst > 1e-9) {
      std::printf("FAILED: engine and CGAL slicer disagree\n");
      return 1;
    }
  }
  benchmark::Initialize(&argc, argv);
  RatioReporter reporter;
  benchmark::RunSpecifiedBenchmarks(&reporter);
  const double e = reporter.seconds["BM_Engine_36Rolls/min_time:2.000/real_time"];
  const double c = reporter.seconds["BM_CgalSlicer_36Rolls/iterations:1/real_time"];
  if (e > 0 && c > 0)
    std::printf("speed: engine %.3f s, CGAL slicer %.3f s for 36 rolls x 200 stations: "
                "engine is %.1fx faster\n", e, c, c / e);
  return 0;
}

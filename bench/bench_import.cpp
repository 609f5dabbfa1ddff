// Loading speed: import_meshes (read + unit/axis mapping + weld + shells) of a 1M-triangle
// closed binary STL, against Assimp's ReadFile of the same file (no post-processing: the
// least Assimp can do) as the baseline measured in the same run. Prints the ratios.
// Target (issue "Core"): load + weld of 1M triangles under 1.5 s. BM_ImportPly*: the same
// sphere as PLY read through Assimp in this process and in the reader's child process (issue
// 13: the isolation should cost under 10% of the load time; measure it with
// --benchmark_filter=Ply --benchmark_repetitions=9 --benchmark_enable_random_interleaving=true:
// the median of interleaved repetitions, as the machine's load drifts between runs).
#include <benchmark/benchmark.h>
#include <malloc.h>

#include <assimp/Importer.hpp>
#include <assimp/scene.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <map>
#include <numbers>
#include <string>

#include "machcut/intake/import.h"

namespace {

// UV sphere of radius 1 m, `rings` × `segments`, as a binary STL: 2·segments·(rings − 1)
// triangles (one per pole quad); 501 × 1000 gives exactly 1 000 000. Outward-oriented.
std::string write_sphere_stl(int rings, int segments) {
  const auto path = (std::filesystem::temp_directory_path() / "machcut_bench_sphere_1m.stl").string();
  auto point = [&](int i, int j, float* out) {
    const double t = std::numbers::pi * i / rings;
    const double p = 2 * std::numbers::pi * (j % segments) / segments;
    const bool pole = i == 0 || i == rings;
    out[0] = static_cast<float>(-std::cos(t));
    out[1] = pole ? 0.f : static_cast<float>(std::sin(t) * std::cos(p));
    out[2] = pole ? 0.f : static_cast<float>(std::sin(t) * std::sin(p));
  };
  std::string bytes(80, ' ');
  const auto count = static_cast<std::uint32_t>(2 * segments * (rings - 1));
  bytes.append(reinterpret_cast<const char*>(&count), 4);  // little-endian host (x86-64)
  auto put = [&](const float* a, const float* b, const float* c) {
    const float rec[12] = {0, 0, 0, a[0], a[1], a[2], b[0], b[1], b[2], c[0], c[1], c[2]};
    bytes.append(reinterpret_cast<const char*>(rec), sizeof rec);
    bytes.append(2, '\0');
  };
  for (int i = 0; i < rings; ++i)
    for (int j = 0; j < segments; ++j) {
      float a[3], b[3], c[3], d[3];
      point(i, j, a), point(i, j + 1, b), point(i + 1, j + 1, c), point(i + 1, j, d);
      if (i != 0) put(a, b, c);
      if (i != rings - 1) put(a, c, d);
    }
  std::ofstream(path, std::ios::binary) << bytes;
  return path;
}

const std::string& sphere_path() {
  static const std::string path = write_sphere_stl(501, 1000);
  return path;
}

// The same sphere as a binary little-endian PLY with shared vertices (read through Assimp, so
// in the reader's child process unless ImportOptions::isolate_reader is off): 1 000 000
// triangles, 499 002 vertices.
std::string write_sphere_ply(int rings, int segments) {
  const auto path = (std::filesystem::temp_directory_path() / "machcut_bench_sphere_1m.ply").string();
  auto id = [&](int i, int j) -> std::int32_t {  // vertex index of ring i (0 and rings: poles)
    if (i == 0) return 0;
    if (i == rings) return 1 + (rings - 1) * segments;
    return 1 + (i - 1) * segments + (j % segments);
  };
  const int vertices = 2 + (rings - 1) * segments, faces = 2 * segments * (rings - 1);
  std::string bytes = "ply\nformat binary_little_endian 1.0\nelement vertex " + std::to_string(vertices) +
                      "\nproperty float x\nproperty float y\nproperty float z\nelement face " +
                      std::to_string(faces) + "\nproperty list uchar int vertex_indices\nend_header\n";
  auto put_point = [&](int i, int j) {
    const double t = std::numbers::pi * i / rings, p = 2 * std::numbers::pi * j / segments;
    const bool pole = i == 0 || i == rings;
    const float xyz[3] = {static_cast<float>(-std::cos(t)),
                          pole ? 0.f : static_cast<float>(std::sin(t) * std::cos(p)),
                          pole ? 0.f : static_cast<float>(std::sin(t) * std::sin(p))};
    bytes.append(reinterpret_cast<const char*>(xyz), sizeof xyz);  // little-endian host
  };
  put_point(0, 0);
  for (int i = 1; i < rings; ++i)
    for (int j = 0; j < segments; ++j) put_point(i, j);
  put_point(rings, 0);
  auto put_face = [&](std::int32_t a, std::int32_t b, std::int32_t c) {
    const std::int32_t f[3] = {a, b, c};
    bytes.push_back(3);
    bytes.append(reinterpret_cast<const char*>(f), sizeof f);
  };
  for (int i = 0; i < rings; ++i)
    for (int j = 0; j < segments; ++j) {
      if (i != 0) put_face(id(i, j), id(i, j + 1), id(i + 1, j + 1));
      if (i != rings - 1) put_face(id(i, j), id(i + 1, j + 1), id(i + 1, j));
    }
  std::ofstream(path, std::ios::binary) << bytes;
  return path;
}

const std::string& sphere_ply_path() {
  static const std::string path = write_sphere_ply(501, 1000);
  return path;
}

// Cost of the reader isolation (import_guard.cpp): the PLY read in the child process and the
// welded mesh copied back from its memory (process_vm_readv), against the same read in this
// process. The command line reads a file once per process, on fresh pages; so that repeated in-process
// reads do not run on pages the previous one left, the heap's free pages go back to the
// system before each (malloc_trim, untimed), as the isolated read does before its fork.
void run_ply(benchmark::State& state, bool isolate) {
  machcut::ImportOptions options;
  options.isolate_reader = isolate;
  for (auto _ : state) {
    state.PauseTiming();
    ::malloc_trim(0);
    state.ResumeTiming();
    machcut::Mesh m = machcut::import_meshes({sphere_ply_path()}, options);
    if (m.triangles.size() != 1000000 || machcut::shell_count(m) != 1)
      state.SkipWithError("unexpected mesh");
    benchmark::DoNotOptimize(m);
  }
}

void BM_ImportPlyInProcess(benchmark::State& state) { run_ply(state, false); }
void BM_ImportPlyIsolated(benchmark::State& state) { run_ply(state, true); }

void BM_AssimpReadFile(benchmark::State& state) {
  for (auto _ : state) {
    Assimp::Importer importer;
    const aiScene* scene = importer.ReadFile(sphere_path(), 0);
    if (!scene) state.SkipWithError(importer.GetErrorString());
    benchmark::DoNotOptimize(scene);
  }
}

void run_import(benchmark::State& state, bool fast) {
  machcut::ImportOptions options;
  options.fast_binary_stl = fast;
  for (auto _ : state) {
    machcut::Mesh m = machcut::import_meshes({sphere_path()}, options);
    if (m.triangles.size() != 1000000 || machcut::shell_count(m) != 1)
      state.SkipWithError("unexpected mesh");
    benchmark::DoNotOptimize(m);
  }
}

void BM_ImportMeshes(benchmark::State& state) { run_import(state, true); }
void BM_ImportMeshesViaAssimp(benchmark::State& state) { run_import(state, false); }

void BM_WeldOnly(benchmark::State& state) {
  const machcut::Mesh ref = machcut::import_meshes({sphere_path()}, {});
  std::vector<machcut::Vec3> soup;
  for (const machcut::Tri& t : ref.triangles)
    for (std::uint32_t v : t) soup.push_back(ref.positions[v]);
  for (auto _ : state) benchmark::DoNotOptimize(machcut::weld_soup(soup));
}

BENCHMARK(BM_AssimpReadFile)->Unit(benchmark::kMillisecond)->Iterations(5);
BENCHMARK(BM_ImportMeshes)->Unit(benchmark::kMillisecond)->Iterations(5);
BENCHMARK(BM_ImportMeshesViaAssimp)->Unit(benchmark::kMillisecond)->Iterations(5);
BENCHMARK(BM_WeldOnly)->Unit(benchmark::kMillisecond)->Iterations(5);
// Wall time: the isolated read spends its CPU in the child, which the CPU column does not see.
BENCHMARK(BM_ImportPlyInProcess)->Unit(benchmark::kMillisecond)->Iterations(5)->UseRealTime();
BENCHMARK(BM_ImportPlyIsolated)->Unit(benchmark::kMillisecond)->Iterations(5)->UseRealTime();

// Keeps each benchmark's mean wall time so main can print the ratios.
class RatioReporter : public benchmark::ConsoleReporter {
 public:
  void ReportRuns(const std::vector<Run>& runs) override {
    for (const Run& r : runs)
      if (r.run_type == Run::RT_Iteration && r.iterations > 0)
        times[r.benchmark_name()].push_back(r.real_accumulated_time / r.iterations);
    ConsoleReporter::ReportRuns(runs);
  }
  // The median over repetitions (--benchmark_repetitions=N; on a shared or virtual machine run
  // several, with --benchmark_enable_random_interleaving=true so that both reads see the same
  // spells of load).
  std::map<std::string, double> medians() const {
    std::map<std::string, double> m;
    for (auto [name, t] : times) {
      std::sort(t.begin(), t.end());
      m[name] = t.size() % 2 ? t[t.size() / 2] : 0.5 * (t[t.size() / 2 - 1] + t[t.size() / 2]);
    }
    return m;
  }
  std::map<std::string, std::vector<double>> times;
};

}  // namespace

int main(int argc, char** argv) {
  benchmark::Initialize(&argc, argv);
  sphere_path();  // write the files before timing (1 000 000 triangles, 50 000 084 bytes)
  sphere_ply_path();
  RatioReporter reporter;
  benchmark::RunSpecifiedBenchmarks(&reporter);
  const auto s = reporter.medians();
  const auto base = s.find("BM_AssimpReadFile/iterations:5");
  if (base != s.end())
    for (const auto& [name, t] : s)
      std::printf("%-40s %8.3f s  = %5.2f x Assimp ReadFile (%.3f s)\n", name.c_str(), t,
                  t / base->second, base->second);
  const auto mine = s.find("BM_ImportMeshes/iterations:5");
  if (mine != s.end())
    std::printf("load + weld + shells of 1M triangles: %.3f s (target < 1.5 s): %s\n",
                mine->second, mine->second < 1.5 ? "met" : "NOT met");
  const auto in = s.find("BM_ImportPlyInProcess/iterations:5/real_time");
  const auto iso = s.find("BM_ImportPlyIsolated/iterations:5/real_time");
  if (in != s.end() && iso != s.end())
    std::printf("reader isolation on a 1M-triangle PLY: %.3f s vs %.3f s in process: %+.1f%% "
                "(target < 10%%): %s\n", iso->second, in->second,
                100.0 * (iso->second / in->second - 1.0),
                iso->second < 1.1 * in->second ? "met" : "NOT met");
  std::filesystem::remove(sphere_path());
  std::filesystem::remove(sphere_ply_path());
  return 0;
}

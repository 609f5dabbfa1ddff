// Benchmark: a converged wave-drag sweep M = 1.0–2.0 (step 0.1, tolerance 0.5%) on the demo
// aircraft (models/demo/baseline/*.obj, prepared and united as the CLI does; wakes behind the
// flat aft faces and the nacelles' capture tubes as in scripts/demo.sh), by the exact slope
// grid (slope_grid.h) with adaptive roll quadrature, against the classic fixed-count practice
// measured in the same run as the baseline: 36 uniform roll angles × 129 cosine stations per
// Mach, Eminton–Lord drag, no error control. Reports the ratio and the counts used.
#include <benchmark/benchmark.h>

#include <tbb/parallel_for.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <vector>

#include "machcut/drag/eminton_lord.h"
#include "machcut/intake/model.h"
#include "machcut/sections/section.h"
#include "machcut/drag/ends.h"
#include "machcut/drag/wave_drag.h"

namespace {

struct Demo {
  machcut::Mesh analysis;
  machcut::Mesh tubes;
};

const Demo& demo() {
  static const Demo d = [] {
    std::vector<std::string> files;
    const std::filesystem::path dir = std::filesystem::path(MACHCUT_SOURCE_DIR) / "models/demo/baseline";
    for (const auto& e : std::filesystem::directory_iterator(dir))
      if (e.path().extension() == ".obj") files.push_back(e.path().string());
    std::sort(files.begin(), files.end());
    machcut::ModelSetup setup;
    const machcut::PreparedModel m = machcut::prepare_model(files, setup);
    std::printf("demo model: %zu files, %zu triangles analysed\n", files.size(),
                m.analysis.triangles.size());
    const double x_far = machcut::far_station(m.analysis);
    std::vector<machcut::Mesh> parts{machcut::flat_face_tubes(m.analysis, +1, x_far).mesh};
    for (std::uint32_t s = 0; s < m.mesh.shell_names.size(); ++s)
      if (m.mesh.shell_names[s].find("nacelles.obj") != std::string::npos)
        parts.push_back(machcut::flat_face_tubes(machcut::extract_shell(m.mesh, s), -1, x_far).mesh);
    return Demo{m.analysis, machcut::concatenate(parts)};
  }();
  return d;
}

const machcut::SectionEngine& demo_engine() {
  static const machcut::SectionEngine engine(demo().analysis);
  return engine;
}

double g_baseline_s = 0.0;  // seconds per sweep of the fixed-count baseline, this run
double g_sweep_s = 0.0;     // seconds per converged sweep, this run

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

std::vector<double> sweep() {
  std::vector<double> m;
  for (int k = 0; k <= 10; ++k) m.push_back(1.0 + 0.1 * k);
  return m;
}

void BM_ConvergedSweep(benchmark::State& state) {
  const machcut::SectionEngine& engine = demo_engine();
  int rolls = 0, stations = 0, converged = 0;
  for (auto _ : state) {
    const auto t0 = std::chrono::steady_clock::now();
    const machcut::WaveDragModel model(engine, {}, {}, demo().tubes);
    rolls = stations = converged = 0;
    for (double mach : sweep()) {
      const machcut::MachDrag d = model.at_mach(mach);
      benchmark::DoNotOptimize(d.drag_area);
      rolls += d.roll_evaluations;
      stations = std::max(stations, d.stations);
      converged += d.converged ? 1 : 0;
    }
    g_sweep_s = seconds_since(t0);
  }
  state.counters["roll_evaluations"] = rolls;
  state.counters["max_cells"] = stations;
  state.counters["machs_converged"] = converged;

}

// The baseline: D/q = mean over 36 uniform roll angles of the Eminton–Lord drag at 129
// cosine stations (the same areas, tubes included), no error control.
void BM_FixedCountBaseline(benchmark::State& state) {
  const machcut::SectionEngine& engine = demo_engine();
  std::vector<double> rolls;
  for (int i = 0; i < 36; ++i) rolls.push_back(360.0 * (i + 0.5) / 36);
  for (auto _ : state) {
    const auto t0 = std::chrono::steady_clock::now();
    const machcut::WaveDragModel model(engine, {}, {}, demo().tubes);
    for (double mach : sweep()) {
      std::vector<double> d(rolls.size());
      tbb::parallel_for(std::size_t{0}, rolls.size(), [&](std::size_t k) {
        const auto x = machcut::make_stations(engine.range({mach, rolls[k]}), 129,
                                              machcut::Spacing::cosine);
        d[k] = machcut::eminton_lord_fit(x, model.areas(mach, rolls[k], x)).drag_area;
      });
      benchmark::DoNotOptimize(d.data());
    }
    g_baseline_s = seconds_since(t0);
  }
  state.counters["roll_evaluations"] = 36 * 11;
}

}  // namespace

BENCHMARK(BM_FixedCountBaseline)->Unit(benchmark::kMillisecond)->Iterations(3);
BENCHMARK(BM_ConvergedSweep)->Unit(benchmark::kMillisecond)->Iterations(3);
int main(int argc, char** argv) {
  benchmark::Initialize(&argc, argv);
  benchmark::RunSpecifiedBenchmarks();
  if (g_baseline_s > 0.0 && g_sweep_s > 0.0)
    std::printf("converged sweep: %.2f s = %.2f × the fixed 36-roll × 129-station baseline (%.2f s)\n",
                g_sweep_s, g_sweep_s / g_baseline_s, g_baseline_s);
  benchmark::Shutdown();
  return 0;
}

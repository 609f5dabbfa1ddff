// The viewer's worker: four threads that call the core off the UI thread and hand results
// back. "heavy" loads models and computes area curves; "light" computes the section outline at
// the cursor, so scrubbing never waits for a curve; "drag" computes D/q (seconds on big models)
// without holding up either; "sensitivity" computes the drag sensitivity when it is asked
// for. Requests of one kind replace older pending
// ones (latest wins). Results carry the model generation; take() drops stale ones.
#pragma once

#include <atomic>
#include <condition_variable>
#include <cstdint>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <thread>
#include <vector>

#include "app_state.h"
#include "display_mesh.h"
#include "machcut/sections/section.h"
#include "machcut/study/study.h"

namespace machcut::view {

struct LoadJob {
  std::vector<std::string> files;
  Controls controls;                  // units, axes, union
  std::size_t generated_triangles = 0;  // > 0: use the generated test configuration instead
};

struct LoadOutcome {
  bool ok = false;
  std::string error;                  // one line naming the file, when !ok
  std::vector<std::string> files;
  ModelSummary summary;
  std::vector<ShellView> shells;
  std::vector<std::string> notes;
  std::vector<std::string> warnings;
  HealthView health;
  std::shared_ptr<const DisplayMesh> display;
};

// The health the viewer shows for a prepared model: the core's health lines, the boundary
// (holes' loops and edges still open) and non-manifold edges as segments on the mesh shown
// (PreparedModel::mesh), the wrapped parts and, for a model that cannot be analysed, the reason.
HealthView health_view(const PreparedModel& model);

struct WorkerOutput {
  std::optional<LoadOutcome> load;
  std::vector<std::shared_ptr<const CurveResult>> curves;
  std::shared_ptr<const Section> section;
  std::shared_ptr<const DragResult> drag;
  std::shared_ptr<const SensitivityView> sensitivity;
};

// The drag sensitivity at `mach` as the viewer paints it: Study::sensitivity on the vertices of
// the engine's mesh (study.engine().mesh(), the numbering the core's result follows), the
// colours clipped at kSensitivityClipQuantile of |s| over the vertices with area. A model with
// no finite drag at that Mach gives ok = false and the core's reason. Pure.
std::shared_ptr<const SensitivityView> compute_sensitivity(const Study& study, double mach);

struct WorkerStatus {
  bool busy = false;      // loading or a curve queued or running
  float progress = 0.0f;  // 0..1 of the running job (approximate)
  std::string label;
  bool drag_busy = false; // drag queued or running
  float drag_progress = 0.0f;
  std::string drag_label;
  bool sensitivity_busy = false;  // sensitivity queued or running
};

// Computes one curve and its companions (Sears–Haack, slope, steps) with the core's study, the
// same call `machcut area` makes. Pure.
std::shared_ptr<const CurveResult> compute_curve(const Study& study, const CurveKey& key);

class Worker {
 public:
  // Models above 2 × lod_triangles triangles get a simplified copy for orbiting.
  explicit Worker(std::size_t lod_triangles = 120000);
  ~Worker();
  Worker(const Worker&) = delete;
  Worker& operator=(const Worker&) = delete;

  void load(LoadJob job);                               // cancels everything pending
  void request_curve(const CurveKey& key);
  void request_section(const MachPlanes& planes, double station);
  void request_drag(double mach, int stations);
  // The drag sensitivity at `mach`; a newer request supersedes an older one (a computation
  // already running finishes, its result is dropped).
  void request_sensitivity(double mach);
  static bool drag_available() { return true; }
  // The study of the loaded model (null before the first successful load).
  std::shared_ptr<const Study> study() const;

  WorkerOutput take();
  WorkerStatus status() const;
  bool idle() const;  // nothing pending or running (both threads)

 private:
  void heavy_loop();
  void light_loop();
  void drag_loop();
  void sensitivity_loop();
  void run_load(const LoadJob& job, std::uint64_t generation);
  void run_drag(double mach, int stations, std::uint64_t generation);
  void set_progress(const std::string& label, float fraction);
  bool cancelled(std::uint64_t generation) const { return generation_.load() != generation; }

  std::size_t lod_triangles_;
  mutable std::mutex mutex_;
  std::condition_variable heavy_cv_, light_cv_;
  bool stop_ = false;
  std::optional<LoadJob> load_job_;
  std::optional<CurveKey> curve_job_;
  std::optional<std::pair<MachPlanes, double>> section_job_;
  std::optional<std::pair<double, int>> drag_job_;
  std::optional<double> sensitivity_job_;
  bool sensitivity_running_ = false;
  std::atomic<std::uint64_t> sensitivity_serial_{0};
  bool heavy_running_ = false, light_running_ = false, drag_running_ = false;
  std::atomic<std::uint64_t> drag_serial_{0};  // bumped by each drag request: cancels older ones
  std::shared_ptr<const Study> study_;
  std::atomic<std::uint64_t> generation_{0};
  WorkerOutput out_;
  std::uint64_t out_generation_ = 0;
  float progress_ = 0.0f;
  std::string label_;
  std::string drag_label_;
  float drag_progress_ = 0.0f;
  std::thread heavy_, light_, drag_, sensitivity_;
};

}  // namespace machcut::view

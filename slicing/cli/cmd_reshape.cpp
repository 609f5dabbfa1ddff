// machcut reshape: moves the surface of named parts to lower the roll-averaged wave drag at a
// design Mach number (study/reshape.h, docs/method.md §8.8), writes the reshaped part files and
// the drag before and after, re-analysed from the written files.
#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <set>

#include "cli_commands.h"
#include "cli_common.h"
#include "cli_model.h"
#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/design/equivalent_body.h"
#include "machcut/intake/import.h"
#include "machcut/output/mesh_export.h"
#include "machcut/output/writers.h"
#include "machcut/study/reshape.h"

namespace machcut::cli {

namespace {

namespace fs = std::filesystem;

struct ReshapeCliOptions {
  ModelOptions model;
  EndOptions ends;
  std::vector<std::string> parts;
  double mach = 0.0;
  std::string out;
  std::vector<std::string> keep;
  double min_area = 0.0, max_area = 0.0;
  std::string volume = "keep";
  int modes = 64;
  int iterations = 8;
};

// The file each part comes from: the input whose file name its shells carry.
std::string file_of_shell(const std::string& shell, const std::vector<std::string>& files) {
  const std::string base =
      shell.substr(0, shell.rfind('#') == std::string::npos ? shell.size() : shell.rfind('#'));
  for (const std::string& f : files)
    if (fs::path(f).filename().string() == base || fs::path(f).filename().string() == shell)
      return f;
  return {};
}

// Model axes and metres → the file's axes and unit (the inverse of the import's mapping: each
// model coordinate is ± one file coordinate).
Mesh to_file_frame(Mesh m, const ImportOptions& import) {
  const Vec3 ex = apply_axes(import.axes, {1, 0, 0}), ey = apply_axes(import.axes, {0, 1, 0}),
             ez = apply_axes(import.axes, {0, 0, 1});
  const double k = 1.0 / metres_per_unit(import.unit);
  for (Vec3& p : m.positions) p = Vec3{dot(ex, p), dot(ey, p), dot(ez, p)} * k;
  return m;
}

std::string lower_extension(const std::string& path) {
  std::string ext = fs::path(path).extension().string();
  for (char& c : ext) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return ext;
}

// How a part file is written back (mesh_export.h): binary when the input PLY says so in its
// header, or the input STL has the binary layout (84 bytes + 50 per triangle counted in the
// header); the AMF unit attribute from the unit the file was read in.
MeshExportOptions export_options(const std::string& path, const ImportOptions& import) {
  MeshExportOptions e;
  const std::string ext = lower_extension(path);
  std::ifstream in(path, std::ios::binary);
  std::string head(512, '\0');
  in.read(head.data(), static_cast<std::streamsize>(head.size()));
  head.resize(static_cast<std::size_t>(in.gcount()));
  if (ext == ".ply") {
    e.binary = head.find("format binary") != std::string::npos;
  } else if (ext == ".stl" && head.size() >= 84) {
    std::uint32_t count = 0;
    for (int k = 3; k >= 0; --k)
      count = (count << 8) | static_cast<unsigned char>(head[80 + static_cast<std::size_t>(k)]);
    std::error_code ec;
    e.binary = fs::file_size(path, ec) == 84 + 50 * static_cast<std::uintmax_t>(count);
  }
  switch (import.unit) {
    case LengthUnit::m:
      e.amf_unit = "meter";
      break;
    case LengthUnit::mm:
      e.amf_unit = "millimeter";
      break;
    case LengthUnit::in:
      e.amf_unit = "inch";
      break;
    case LengthUnit::ft:
      e.amf_unit = "feet";
      break;
    case LengthUnit::cm:
      break;  // AMF has no centimetre: no attribute
  }
  return e;
}

nlohmann::json drag_json(const MachDrag& d) {
  return d.ok ? nlohmann::json(d.drag_area) : nlohmann::json(nullptr);
}

void run_reshape(const ReshapeCliOptions& o) {
  checked_mach(o.mach, "--mach");
  if (o.volume != "keep" && o.volume != "free")
    throw InputError("--volume", "use keep or free, not '" + o.volume + "'");
  if (o.out.empty()) throw InputError("--out", "name the folder for the reshaped parts");
  if (fs::exists(o.out) && !fs::is_directory(o.out))
    throw InputError(o.out, "--out must be a folder");
  const auto study = open_study(o.model, &o.ends);
  const StudySetup setup = study_setup(study_options(o.model, &o.ends));
  // The files to write: every input holding a named part, in its own format.
  const std::vector<std::uint32_t> shells = part_shells(study->model().mesh, o.parts);
  std::set<std::string> part_files;
  for (std::uint32_t s : shells) {
    const std::string f = file_of_shell(study->model().mesh.shell_names[s], study->model().files);
    if (f.empty())
      throw InputError("--part",
                       "cannot tell which file holds " + study->model().mesh.shell_names[s]);
    part_files.insert(f);
  }
  for (const std::string& f : part_files) {
    // A missing --out folder is created when writing (and holds no input).
    if (fs::is_directory(o.out))
      check_output_path((fs::path(o.out) / fs::path(f).filename()).string(), o.model.files);
  }
  ReshapeRequest q;
  q.mach = o.mach;
  q.parts = o.parts;
  q.keep = o.keep;
  q.min_area = o.min_area;
  q.max_area = o.max_area;
  q.keep_volume = o.volume == "keep";
  q.modes = o.modes;
  q.iterations = o.iterations;
  ReshapeResult r;
  {
    Progress bar("reshape", o.model.quiet);
    q.progress = [&](double f) { bar.update(f); };
    r = reshape(*study, q);
  }
  for (const std::string& line : r.notes) note(o.model, line);

  // Every shell of each part file, moved, in the file's frame.
  std::vector<OutputFile> outputs;
  std::vector<std::string> written, after_files;
  for (const std::string& f : part_files) {
    std::vector<Mesh> pieces;
    for (std::uint32_t s = 0; s < shell_count(r.mesh); ++s)
      if (file_of_shell(r.mesh.shell_names[s], {f}) == f)
        pieces.push_back(extract_shell(r.mesh, s));
    const Mesh m = to_file_frame(concatenate(pieces), setup.model.import);
    const std::string path = (fs::path(o.out) / fs::path(f).filename()).string();
    outputs.push_back({path, export_mesh(m, lower_extension(f), fs::path(f).stem().string(),
                                         export_options(f, setup.model.import))});
    written.push_back(path);
  }
  for (const std::string& f : o.model.files)
    after_files.push_back(part_files.count(f) ? (fs::path(o.out) / fs::path(f).filename()).string()
                                              : f);
  write_outputs(outputs, o.model.files, true);

  // Re-analysis from the written files, with the same options.
  ModelOptions after_model = o.model;
  after_model.files = after_files;
  after_model.quiet = true;
  const auto after = open_study(after_model, &o.ends);
  std::vector<double> machs = checked_machs({1.0, 1.2, 1.6, 2.0, o.mach}, "--mach");
  nlohmann::json j;
  j["files"] = o.model.files;
  j["parts"] = o.parts;
  j["written"] = written;
  j["design_mach"] = o.mach;
  j["volume_before"] = r.volume_before;
  j["volume_after"] = r.volume_after;
  j["max_displacement"] = r.max_displacement;
  j["iterations"] = r.iterations;
  j["self_intersecting"] = r.self_intersecting;
  j["unmet"] = r.unmet;
  j["notes"] = r.notes;
  j["results"] = nlohmann::json::array();
  std::printf("reshaped %s (%d steps, largest move %.4g m), written to %s\n",
              o.parts.front().c_str(), r.iterations, r.max_displacement, o.out.c_str());
  std::printf("parts' volume %.6g m³ → %.6g m³\n", r.volume_before, r.volume_after);
  std::printf("%6s %14s %14s %9s\n", "Mach", "D/q before m²", "D/q after m²", "change");
  for (double m : machs) {
    const MachDrag b = study->drag_at(m), a = after->drag_at(m);
    j["results"].push_back(
        {{"mach", m}, {"drag_area_before", drag_json(b)}, {"drag_area_after", drag_json(a)}});
    if (b.ok && a.ok)
      std::printf("%6.3f %14.6g %14.6g %+8.2f%%%s\n", m, b.drag_area, a.drag_area,
                  100.0 * (a.drag_area / b.drag_area - 1.0), m == o.mach ? "  (design)" : "");
    else
      std::printf("%6.3f %14s %14s\n", m, b.ok ? readable_number(b.drag_area).c_str() : "—",
                  a.ok ? readable_number(a.drag_area).c_str() : "—");
  }
  j["caution"] = kCaution;
  write_output((fs::path(o.out) / "reshape.json").string(), j.dump(2) + "\n", o.model.files);
  std::printf("%s\n", kCaution);
  flush_stdout();
  // The files are written; a constraint the result does not meet makes it a partial result.
  if (!r.unmet.empty()) {
    std::string list;
    for (const std::string& u : r.unmet) list += (list.empty() ? "" : "; ") + u;
    throw PartialResult("reshaped parts written, but not every constraint is met: " + list);
  }
}

}  // namespace

void add_reshape_command(CLI::App& app) {
  auto o = std::make_shared<ReshapeCliOptions>();
  CLI::App* cmd = app.add_subcommand(
      "reshape",
      "Moves the surface of the named part(s) along its normals (a smooth field, topology kept)\n"
      "to lower the roll-averaged wave drag D/q at the design Mach, keeping the parts' volume\n"
      "and the kept stations; writes the reshaped part files and reshape.json to --out with\n"
      "D/q before and after, re-analysed from the written files. Preliminary design estimate.");
  add_model_options(cmd, o->model);
  cmd->add_option("--part", o->parts,
                  "Part to change: a file name (all its shells) or FILE#k; repeatable")
      ->required();
  cmd->add_option("--mach", o->mach, "Design Mach number (1 to 20)")->required();
  cmd->add_option("--out", o->out,
                  "Folder for the reshaped part files (same names and formats) and reshape.json")
      ->required();
  cmd->add_option("--keep", o->keep,
                  "Keep the model's M 1 area at station X (m), or set it: X:AREA; repeatable");
  cmd->add_option(
      "--min-area", o->min_area,
      "Smallest M 1 area of the model where it reaches it over the parts' stations, m²");
  cmd->add_option("--max-area", o->max_area,
                  "Largest M 1 area of the model over the parts' stations, m²");
  cmd->add_option("--volume", o->volume, "keep: the parts keep their volume; free: it may change")
      ->capture_default_str();
  cmd->add_option("--modes", o->modes, "Sine modes of the displacement along each part")
      ->check(CLI::Range(2, 200))
      ->capture_default_str();
  cmd->add_option("--iterations", o->iterations, "Most re-analysed steps")
      ->check(CLI::Range(1, 100))
      ->capture_default_str();
  add_end_options(cmd, o->ends);
  cmd->callback([o] { run_reshape(*o); });
}

}  // namespace machcut::cli

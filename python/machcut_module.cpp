// The machcut Python module: the core's Study (study.h) with the CLI's option names and
// defaults, results as numpy arrays in SI units, errors as Python exceptions carrying the CLI's
// one-line message.
//
//   import machcut
//   s = machcut.Study(["wing.stl", "body.stl"], units="mm", flow="+x", up="+z")
//   a = s.area(mach=1.6, roll=30.0, stations=201)  # dict of numpy arrays
//   d = s.drag([1.2, 1.6, 2.0])                      # list of dicts
#include <pybind11/numpy.h>
#include <pybind11/pybind11.h>
#include <pybind11/stl.h>

#include <cmath>
#include <memory>
#include <string>
#include <vector>

#include "machcut/common/errors.h"
#include "machcut/common/limits.h"
#include "machcut/study/study.h"

namespace py = pybind11;
using namespace machcut;

namespace {

py::array_t<double> array(const std::vector<double>& v) {
  py::array_t<double> a(static_cast<py::ssize_t>(v.size()));
  std::copy(v.begin(), v.end(), a.mutable_data());
  return a;
}

py::object value_or_none(bool ok, double v) { return ok ? py::object(py::float_(v)) : py::none(); }

// The Python face of a Study; the GIL is released while the core computes.
class PyStudy {
 public:
  PyStudy(std::vector<std::string> files, const std::string& units, const std::string& flow,
          const std::string& up, bool sum, std::vector<std::string> capture, bool no_wake, bool cache,
          std::vector<std::string> skip, std::vector<std::string> only) {
    StudyOptions o;
    o.files = std::move(files);
    o.units = units;
    o.flow = flow;
    o.up = up;
    o.sum = sum;
    o.captures = std::move(capture);
    o.no_wake = no_wake;
    o.cache = cache;
    o.skip = std::move(skip);
    o.only = std::move(only);
    const StudySetup setup = study_setup(o);
    py::gil_scoped_release release;
    PreparedModel model = prepare_model(setup.files, setup.model);
    if (!model.usable) throw UnusableModel("model not usable: " + model.reason);
    study_ = std::make_unique<Study>(std::move(model), setup.ends);
  }

  py::dict area(double mach, double roll, int stations, const std::string& spacing,
                std::vector<double> at) const {
    if (spacing != "uniform" && spacing != "cosine")
      throw InputError("--spacing", "'" + spacing + "' is not a spacing; use uniform or cosine");
    AreaRequest q;
    q.mach = mach;
    q.roll_deg = roll;
    q.stations = stations;
    q.spacing = spacing == "cosine" ? Spacing::cosine : Spacing::uniform;
    q.at = std::move(at);
    AreaResult r;
    {
      py::gil_scoped_release release;
      r = study_->area(q);
    }
    py::dict d;
    d["mach"] = r.curve.mach;
    d["roll_deg"] = r.curve.roll_deg;
    d["united"] = r.curve.united;
    d["x"] = array(r.curve.x);
    d["area"] = array(r.curve.area);
    if (!r.curve.error_bound.empty()) d["error_bound"] = array(r.curve.error_bound);
    py::dict parts;
    for (std::size_t s = 0; s < r.curve.per_shell.size(); ++s) parts[py::str(r.part_names[s])] = array(r.curve.per_shell[s]);
    d["parts"] = parts;
    d["caution"] = kCaution;
    return d;
  }

  py::list drag(const std::vector<double>& machs, double tol, int rolls, int cells, int max_cells,
                double length_floor, double time_budget, bool no_symmetry) const {
    if (machs.empty()) throw InputError("--mach", "no Mach number given");
    for (double m : machs) checked_mach(m, "--mach");
    if (!(tol > 0.0 && tol < 0.5)) throw InputError("--tol", "use a relative tolerance in (0, 0.5)");
    if (max_cells < cells)
      throw InputError("--max-cells", "must be at least --cells (" + std::to_string(cells) + ")");
    if (!(length_floor >= 0.0) || !std::isfinite(length_floor))
      throw InputError("--length-floor", "give a cell length in m (> 0), not " + readable_number(length_floor));
    if (!(time_budget > 0.0 && time_budget <= 86400.0))
      throw InputError("--time-budget", "give seconds per Mach number in (0, 86400], not " + readable_number(time_budget));
    WaveDragOptions o;
    o.length_floor = length_floor;
    o.time_budget = time_budget;
    o.rel_tol = tol;
    o.initial_rolls = rolls;
    o.cells = cells;
    o.max_cells = max_cells;
    o.use_symmetry = !no_symmetry;
    DragSweep sweep;
    {
      py::gil_scoped_release release;
      sweep = study_->drag(machs, o);
    }
    py::list out;
    for (const MachDrag& r : sweep.results) {
      py::dict d;
      d["mach"] = r.mach;
      d["drag_area"] = value_or_none(r.ok, r.drag_area);
      d["error_estimate"] = r.error_estimate;
      d["converged"] = r.converged;
      d["ok"] = r.ok;
      d["status"] = drag_status(r);
      d["cells"] = r.stations;
      d["roll_evaluations"] = r.roll_evaluations;
      d["sears_haack_ratio"] = value_or_none(r.ok && sweep.measures.sears_haack_drag_area > 0,
                                             r.drag_area / sweep.measures.sears_haack_drag_area);
      d["resolution_limited"] = r.resolution_limited;
      d["time_limited"] = r.time_limited;
      d["length_floor"] = r.length_floor;
      d["cell_size"] = r.cell_size;
      d["growth_per_halving"] = r.growth_per_halving;
      py::list features;
      for (const ValidityFeature& f : r.features) {
        py::dict v;
        v["part"] = f.part;
        v["x_from"] = f.x_from;
        v["x_to"] = f.x_to;
        v["frontal_area"] = f.frontal_area;
        v["drag_share"] = value_or_none(std::isfinite(f.drag_share), f.drag_share);
        v["growth_per_halving"] = f.growth;
        features.append(v);
      }
      d["features"] = features;
      d["advice"] = r.advice;
      if (!r.problem.empty()) d["problem"] = r.problem;
      py::list roll_deg, roll_dq;
      for (const RollSample& s : r.rolls) {
        roll_deg.append(s.roll_deg);
        roll_dq.append(value_or_none(s.ok, s.drag_area));
      }
      d["roll_deg"] = roll_deg;
      d["roll_drag_area"] = roll_dq;
      out.append(d);
    }
    return out;
  }

  py::dict sensitivity(double mach, int cells, int rolls) const {
    SensitivityOptions o;
    o.cells = cells;
    o.rolls = rolls;
    SurfaceSensitivity r;
    {
      py::gil_scoped_release release;
      r = study_->sensitivity(mach, o);
    }
    const Mesh& mesh = study_->engine().mesh();
    py::array_t<double> xyz({static_cast<py::ssize_t>(mesh.positions.size()), py::ssize_t{3}});
    py::array_t<double> nrm({static_cast<py::ssize_t>(mesh.positions.size()), py::ssize_t{3}});
    auto p = xyz.mutable_unchecked<2>();
    auto n = nrm.mutable_unchecked<2>();
    for (std::size_t v = 0; v < mesh.positions.size(); ++v) {
      const auto i = static_cast<py::ssize_t>(v);
      p(i, 0) = mesh.positions[v].x, p(i, 1) = mesh.positions[v].y, p(i, 2) = mesh.positions[v].z;
      n(i, 0) = r.normal[v].x, n(i, 1) = r.normal[v].y, n(i, 2) = r.normal[v].z;
    }
    py::dict d;
    d["mach"] = r.mach;
    d["xyz"] = xyz;
    d["normal"] = nrm;
    d["vertex_area"] = array(r.vertex_area);
    d["sensitivity"] = array(r.per_volume);
    d["drag_area"] = r.drag_area;
    d["rolls"] = r.rolls;
    d["cells"] = r.cells;
    d["how"] = r.how;
    d["caution"] = kCaution;
    return d;
  }

  py::dict measures() const {
    const StudyMeasures& m = study_->measures();
    py::dict d;
    d["volume"] = m.volume;
    d["x0"] = m.x0;
    d["length"] = m.length;
    d["max_area"] = m.max_area;
    d["base_area"] = m.base_area;
    d["sears_haack_drag_area"] = m.sears_haack_drag_area;
    return d;
  }

  const Study& study() const { return *study_; }

 private:
  std::unique_ptr<Study> study_;
};

}  // namespace

PYBIND11_MODULE(machcut, m) {
  m.doc() =
      "machcut: cross-sectional area distributions and zero-lift wave drag of aircraft meshes.\n" +
      std::string(kCaution);
  auto input_error = py::register_exception<InputError>(m, "InputError", PyExc_ValueError);
  (void)input_error;
  py::register_exception<UnusableModel>(m, "UnusableModel", PyExc_RuntimeError);
  m.attr("CAUTION") = kCaution;
  m.attr("MIN_MACH") = kMinMach;
  m.attr("MAX_MACH") = kMaxMach;

  py::class_<PyStudy>(m, "Study",
                      "One model (several files together) and its analyses, as the machcut "
                      "command prepares it: import, repair, union of overlapping shells, ends "
                      "closed for wave drag. Options have the CLI's names and defaults.")
      .def(py::init<std::vector<std::string>, const std::string&, const std::string&, const std::string&,
                    bool, std::vector<std::string>, bool, bool, std::vector<std::string>,
                    std::vector<std::string>>(),
           py::arg("files"), py::kw_only(), py::arg("units") = "m", py::arg("flow") = "+x",
           py::arg("up") = "+z", py::arg("sum") = false, py::arg("capture") = std::vector<std::string>{},
           py::arg("no_wake") = false, py::arg("cache") = true,
           py::arg("skip") = std::vector<std::string>{}, py::arg("only") = std::vector<std::string>{})
      .def("area", &PyStudy::area, py::kw_only(), py::arg("mach"), py::arg("roll") = 0.0,
           py::arg("stations") = 201, py::arg("spacing") = "uniform", py::arg("at") = std::vector<double>{},
           "Area distribution at one Mach number and roll angle (degrees): a dict with 'x' (m), "
           "'area' (m², projected normal to the flow), 'parts' (each part's own area), and "
           "'error_bound' (m²) when the mesh had holes.")
      .def("drag", &PyStudy::drag, py::arg("machs"), py::kw_only(), py::arg("tol") = 0.005,
           py::arg("rolls") = 60, py::arg("cells") = 16384, py::arg("max_cells") = 65536,
           py::arg("length_floor") = 0.0, py::arg("time_budget") = 20.0, py::arg("no_symmetry") = false,
           "Zero-lift wave drag D/q (m²) at each Mach number: a list of dicts with 'mach', "
           "'drag_area' (None when there is no value), 'error_estimate', 'converged', 'status', "
           "'problem', 'resolution_limited' with 'growth_per_halving' and 'length_floor', "
           "'features' (surfaces steeper than the Mach angle: part, x range, frontal area, share "
           "of D/q) with 'advice', per-roll values.")
      .def("sensitivity", &PyStudy::sensitivity, py::arg("mach"), py::kw_only(), py::arg("cells") = 4096,
           py::arg("rolls") = 64,
           "Per vertex of the analysis mesh, d(D/q)/dV (1/m) for volume added by an outward normal "
           "displacement: a dict with 'xyz' (n×3, m), 'normal' (n×3), 'vertex_area' (m²), "
           "'sensitivity' (1/m), 'drag_area' (m²). sum(sensitivity * dn * vertex_area) predicts "
           "the change of D/q.")
      .def("measures", &PyStudy::measures, "Volume, length, largest and base area, Sears–Haack D/q (SI).")
      .def_property_readonly("part_names", [](const PyStudy& s) { return s.study().part_names(); })
      .def_property_readonly("notes", [](const PyStudy& s) {
        std::vector<std::string> n = s.study().model().notes;
        for (const std::string& e : s.study().end_notes()) n.push_back(e);
        return n;
      })
      .def_property_readonly("warnings", [](const PyStudy& s) { return s.study().model().warnings; })
      .def_property_readonly("united", [](const PyStudy& s) { return s.study().model().united; });
}

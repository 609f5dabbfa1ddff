// Closing the ends that do not close: constant-area wakes behind flat aft faces (a fuselage
// base, a nozzle exit) and captured stream tubes behind flat inlet faces, as closed shells
// whose Mach-plane areas are added to the model's (the section engine's areas of closed
// shells add, so a tube of inward orientation subtracts its area).
//
// - Wake: every face of the model whose outward normal is +x (facing downstream) is extruded
//   downstream to `x_far`. The model's area curve then continues past each base at constant
//   area instead of dropping (a step in S, for which von Kármán's integral is infinite); at
//   the model's tail the remaining base area is closed by the constant-area wake of eminton_lord.h —
//   the forebody drag of a body with a base, S′(l) = 0 (Ward 1955). Base drag itself is not
//   given by linear theory.
// - Capture (flow-through nacelles modelled as solids, common practice): every face of a
//   named shell whose outward normal is −x (an inlet face) is extruded downstream to x_far
//   with inward orientation: the captured stream tube, carried back at the inlet's area, is
//   subtracted. The nozzle face gets its wake (the jet) like any aft face.
#pragma once

#include <cstdint>
#include <set>
#include <string>
#include <vector>

#include "machcut/common/mesh.h"

namespace machcut {

// A station far enough downstream that no Mach plane up to Mach 20 that meets the model
// (x from the mesh's bounding box, radius from the x axis) reaches it: x_max + 2·20·r_max + l.
double far_station(const Mesh& mesh);

struct Tubes {
  Mesh mesh;              // closed prisms; wakes outward (+area), captures inward (−area)
  double face_area = 0.0; // total area of the faces extruded, m²
  int faces = 0;          // triangles extruded
};

// The shells of `mesh` that a capture names (mesh.h: shell_selected): a shell itself, every
// shell of a part ("FILE:PART" or "PART"), or every shell of a file (its path or name). Each is added to `taken`. Throws InputError
// naming --capture when none matches, or when one is in `taken` already (a shell captured
// twice would be subtracted twice).
std::vector<std::uint32_t> capture_shells(const Mesh& mesh, const std::string& name,
                                          std::set<std::uint32_t>& taken);

// Prisms behind the faces of `mesh` with outward normal within 1e-9 of +x (sign = +1: wakes)
// or −x (sign = −1: captures), extruded to x_far. Empty when there are none.
Tubes flat_face_tubes(const Mesh& mesh, int sign, double x_far);

}  // namespace machcut

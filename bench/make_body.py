#!/usr/bin/python3
"""Writes a finely tessellated closed body of revolution as an STL, for memory measurements.

The body is a Sears-Haack body (r(x) = R (1 - (2x/L - 1)^2)^(3/4); Sears 1947, Haack 1941),
L = 30 m, R = 1.5 m, x along the file's +x axis, cut into RINGS stations (cosine spacing, so
the pointed ends are resolved) and SIDES points around; its nose and tail are single vertices,
so the mesh is closed and 2-manifold, its faces wound outward. Triangles: 2 * SIDES * RINGS.

Usage: /usr/bin/python3 bench/make_body.py OUT.stl TRIANGLES [--ascii]
  TRIANGLES is rounded to the grid (SIDES = 1000 for 5M, about sqrt(TRIANGLES / 5) otherwise).
  Binary STL by default (50 bytes a triangle); --ascii writes ASCII STL (about 250 bytes one).
Needs python3-numpy (Debian). The file is not committed: bench/peak_memory.sh makes it in a
temporary folder.
"""
import math
import sys

import numpy as np


def body(triangles):
    sides = max(8, int(round(math.sqrt(triangles / 5.0))))
    rings = max(2, int(round(triangles / (2.0 * sides))))
    length, radius = 30.0, 1.5
    t = (np.arange(1, rings + 1) / (rings + 1.0))
    x = 0.5 * length * (1.0 - np.cos(math.pi * t))          # cosine spacing, ends excluded
    r = radius * (1.0 - (2.0 * x / length - 1.0) ** 2) ** 0.75
    phi = 2.0 * math.pi * np.arange(sides) / sides
    ring = np.empty((rings, sides, 3))
    ring[:, :, 0] = x[:, None]
    ring[:, :, 1] = r[:, None] * np.cos(phi)[None, :]
    ring[:, :, 2] = r[:, None] * np.sin(phi)[None, :]
    pts = np.concatenate([[[0.0, 0.0, 0.0]], ring.reshape(-1, 3), [[length, 0.0, 0.0]]])
    nose, tail = 0, len(pts) - 1

    def idx(i, j):  # ring i (0-based), side j (any integer)
        return 1 + i * sides + (j % sides)

    j = np.arange(sides)
    tris = []
    # The corners are listed so that the right-hand normal points inward (the body runs along
    # +x and phi turns from +y to +z); the last line swaps two corners to turn them outward.
    tris.append(np.stack([np.full(sides, nose), idx(0, j), idx(0, j + 1)], axis=1))
    for i in range(rings - 1):
        a, b, c, d = idx(i, j), idx(i + 1, j), idx(i + 1, j + 1), idx(i, j + 1)
        tris.append(np.stack([a, b, c], axis=1))
        tris.append(np.stack([a, c, d], axis=1))
    tris.append(np.stack([idx(rings - 1, j), np.full(sides, tail), idx(rings - 1, j + 1)], axis=1))
    tris = np.concatenate(tris)
    return pts, tris[:, [0, 2, 1]]


def write_binary(path, pts, tris):
    rec = np.dtype([("n", "<f4", 3), ("v", "<f4", (3, 3)), ("a", "<u2")])
    with open(path, "wb") as out:
        out.write(b"machcut bench body".ljust(80, b" "))
        out.write(np.uint32(len(tris)).tobytes())
        step = 1 << 20
        for k in range(0, len(tris), step):
            block = np.zeros(min(step, len(tris) - k), dtype=rec)
            block["v"] = pts[tris[k:k + step]]
            out.write(block.tobytes())


def write_ascii(path, pts, tris):
    with open(path, "w") as out:
        out.write("solid body\n")
        step = 1 << 16
        for k in range(0, len(tris), step):
            v = pts[tris[k:k + step]].reshape(-1, 9)
            out.write("".join(
                "facet normal 0 0 0\n outer loop\n"
                "  vertex %.9g %.9g %.9g\n  vertex %.9g %.9g %.9g\n  vertex %.9g %.9g %.9g\n"
                " endloop\nendfacet\n" % tuple(row) for row in v.tolist()))
        out.write("endsolid body\n")


if __name__ == "__main__":
    if len(sys.argv) < 3:
        sys.exit(__doc__)
    pts, tris = body(int(float(sys.argv[2])))
    (write_ascii if "--ascii" in sys.argv[3:] else write_binary)(sys.argv[1], pts, tris)
    print("%s: %d triangles, %d vertices" % (sys.argv[1], len(tris), len(pts)))

#!/usr/bin/env python3
"""Writes the fuzz seed corpus (fuzz/corpus/): tiny valid files of every format machcut reads.

Each seed starts with the byte that makes fuzz_import.cpp pick the file type (byte % 6:
0 STL, 1 OBJ, 2 PLY, 3 OFF, 4 glTF, 5 GLB: the formats machcut checks itself), followed by
the file. The shapes are a tetrahedron and a unit cube (outward triangles), small enough that every run is fast.
Usage: python3 fuzz/make_corpus.py   (rewrites fuzz/corpus/)
"""
import base64
import json
import os
import struct

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "corpus")

TET_V = [(0, 0, 0), (1, 0, 0), (0, 1, 0), (0, 0, 1)]
TET_F = [(0, 2, 1), (0, 1, 3), (0, 3, 2), (1, 2, 3)]
CUBE_V = [(0, 0, 0), (1, 0, 0), (1, 1, 0), (0, 1, 0), (0, 0, 1), (1, 0, 1), (1, 1, 1), (0, 1, 1)]
CUBE_F = [(0, 2, 1), (0, 3, 2), (4, 5, 6), (4, 6, 7), (0, 1, 5), (0, 5, 4),
          (1, 2, 6), (1, 6, 5), (2, 3, 7), (2, 7, 6), (3, 0, 4), (3, 4, 7)]
CUBE_QUADS = [(0, 3, 2, 1), (4, 5, 6, 7), (0, 1, 5, 4), (1, 2, 6, 5), (2, 3, 7, 6), (3, 0, 4, 7)]


def ascii_stl(v, f):
    s = "solid seed\n"
    for t in f:
        s += " facet normal 0 0 0\n  outer loop\n"
        s += "".join("   vertex %g %g %g\n" % v[i] for i in t)
        s += "  endloop\n endfacet\n"
    return (s + "endsolid seed\n").encode()


def binary_stl(v, f):
    b = b"seed".ljust(80, b" ") + struct.pack("<I", len(f))
    for t in f:
        b += struct.pack("<3f", 0, 0, 0) + b"".join(struct.pack("<3f", *v[i]) for i in t) + b"\0\0"
    return b


def obj(v, f):
    return ("".join("v %g %g %g\n" % p for p in v) +
            "".join("f " + " ".join(str(i + 1) for i in t) + "\n" for t in f)).encode()


def ply_header(fmt, nv, nf):
    return ("ply\nformat %s 1.0\ncomment seed\nelement vertex %d\nproperty float x\n"
            "property float y\nproperty float z\nelement face %d\n"
            "property list uchar int vertex_indices\nend_header\n" % (fmt, nv, nf)).encode()


def ply_ascii(v, f):
    return ply_header("ascii", len(v), len(f)) + (
        "".join("%g %g %g\n" % p for p in v) +
        "".join("%d %s\n" % (len(t), " ".join(map(str, t))) for t in f)).encode()


def ply_binary(v, f, big):
    e = ">" if big else "<"
    b = ply_header("binary_big_endian" if big else "binary_little_endian", len(v), len(f))
    b += b"".join(struct.pack(e + "3f", *p) for p in v)
    b += b"".join(struct.pack(e + "B%di" % len(t), len(t), *t) for t in f)
    return b


def off(v, f):
    return ("OFF\n# seed\n%d %d 0\n" % (len(v), len(f)) + "".join("%g %g %g\n" % p for p in v) +
            "".join("%d %s\n" % (len(t), " ".join(map(str, t))) for t in f)).encode()


def gltf_parts(v, f):
    """glTF 2.0 JSON (Khronos, glTF 2.0 specification, 2017) and its binary buffer."""
    pos = b"".join(struct.pack("<3f", *p) for p in v)
    idx = b"".join(struct.pack("<3H", *t) for t in f)
    idx += b"\0" * (-len(idx) % 4)
    buf = pos + idx
    doc = {
        "asset": {"version": "2.0"},
        "scene": 0,
        "scenes": [{"nodes": [0]}],
        "nodes": [{"mesh": 0, "translation": [0.5, 0, 0]}],
        "meshes": [{"primitives": [{"attributes": {"POSITION": 0}, "indices": 1}]}],
        "buffers": [{"byteLength": len(buf)}],
        "bufferViews": [{"buffer": 0, "byteOffset": 0, "byteLength": len(pos)},
                        {"buffer": 0, "byteOffset": len(pos), "byteLength": 2 * 3 * len(f)}],
        "accessors": [
            {"bufferView": 0, "componentType": 5126, "count": len(v), "type": "VEC3",
             "min": [min(p[k] for p in v) for k in range(3)],
             "max": [max(p[k] for p in v) for k in range(3)]},
            {"bufferView": 1, "componentType": 5123, "count": 3 * len(f), "type": "SCALAR"}],
    }
    return doc, buf


def gltf(v, f):
    doc, buf = gltf_parts(v, f)
    doc["buffers"][0]["uri"] = "data:application/octet-stream;base64," + base64.b64encode(buf).decode()
    return json.dumps(doc).encode()


def glb(v, f):
    doc, buf = gltf_parts(v, f)
    js = json.dumps(doc).encode()
    js += b" " * (-len(js) % 4)
    buf += b"\0" * (-len(buf) % 4)
    chunks = struct.pack("<I4s", len(js), b"JSON") + js + struct.pack("<I4s", len(buf), b"BIN\0") + buf
    return struct.pack("<4sII", b"glTF", 2, 12 + len(chunks)) + chunks


SEEDS = {
    "stl_ascii_tet": (0, ascii_stl(TET_V, TET_F)),
    "stl_binary_cube": (0, binary_stl(CUBE_V, CUBE_F)),
    "obj_cube_quads": (1, obj(CUBE_V, CUBE_QUADS)),
    "obj_tet": (1, obj(TET_V, TET_F)),
    "ply_ascii_cube": (2, ply_ascii(CUBE_V, CUBE_QUADS)),
    "ply_binary_le_tet": (2, ply_binary(TET_V, TET_F, False)),
    "ply_binary_be_cube": (2, ply_binary(CUBE_V, CUBE_F, True)),
    "off_cube": (3, off(CUBE_V, CUBE_QUADS)),
    "off_tet": (3, off(TET_V, TET_F)),
    "gltf_tet": (4, gltf(TET_V, TET_F)),
    "glb_cube": (5, glb(CUBE_V, CUBE_F)),
}

if __name__ == "__main__":
    os.makedirs(OUT, exist_ok=True)
    for name, (kind, data) in SEEDS.items():
        with open(os.path.join(OUT, name), "wb") as out:
            out.write(bytes([kind]) + data)
    print("%d seeds in %s" % (len(SEEDS), OUT))

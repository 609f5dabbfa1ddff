"""Tests of the machcut Python module: against closed forms, and against the machcut command
(the same study behind both: identical numbers)."""
import json
import math
import os
import subprocess

import numpy as np
import pytest

import machcut

CLI = os.environ.get("MACHCUT_CLI", "machcut")
SOURCE = os.environ.get("MACHCUT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))
DEMO = sorted(
    os.path.join(SOURCE, "models", "demo", "baseline", f)
    for f in os.listdir(os.path.join(SOURCE, "models", "demo", "baseline"))
    if f.endswith(".obj"))


def write_stl(path, triangles):
    with open(path, "w") as f:
        f.write("solid t\n")
        for a, b, c in triangles:
            n = np.cross(np.subtract(b, a), np.subtract(c, a))
            n = n / (np.linalg.norm(n) or 1.0)
            f.write(f"facet normal {n[0]} {n[1]} {n[2]}\n outer loop\n")
            for p in (a, b, c):
                f.write(f"  vertex {p[0]:.17g} {p[1]:.17g} {p[2]:.17g}\n")
            f.write(" endloop\nendfacet\n")
        f.write("endsolid t\n")


def box(x0, x1, h):
    """Closed box [x0, x1] × [−h, h]²: outward triangles."""
    v = [(x, y, z) for x in (x0, x1) for y in (-h, h) for z in (-h, h)]
    quads = [(0, 1, 3, 2), (4, 6, 7, 5), (0, 4, 5, 1), (2, 3, 7, 6), (0, 2, 6, 4), (1, 5, 7, 3)]
    tris = []
    for a, b, c, d in quads:
        tris += [(v[a], v[b], v[c]), (v[a], v[c], v[d])]
    return tris


def revolution(x, r, seg=96):
    """Closed body of revolution about the x axis, pointed ends (r[0] = r[-1] = 0)."""
    ring = lambda i: [(x[i], r[i] * math.cos(2 * math.pi * j / seg), r[i] * math.sin(2 * math.pi * j / seg))
                      for j in range(seg)]
    tris = []
    for i in range(len(x) - 1):
        a, b = ring(i), ring(i + 1)
        for j in range(seg):
            k = (j + 1) % seg
            if r[i] == 0:
                tris.append((a[0], b[k], b[j]))
            elif r[i + 1] == 0:
                tris.append((a[j], a[k], b[0]))
            else:
                tris += [(a[j], a[k], b[k]), (a[j], b[k], b[j])]
    return tris


@pytest.fixture(scope="module")
def box_file(tmp_path_factory):
    p = tmp_path_factory.mktemp("box") / "box.stl"
    write_stl(p, box(0.0, 2.0, 0.25))
    return str(p)


@pytest.fixture(scope="module")
def haack_file(tmp_path_factory):
    # Sears–Haack body S = S_max [4ξ(1−ξ)]^{3/2} (Sears 1947), l = 10 m, r_max = 0.5 m.
    n = 241
    xi = 0.5 * (1 - np.cos(np.pi * np.arange(n) / (n - 1)))
    r = 0.5 * (4 * xi * (1 - xi)) ** 0.75
    r[0] = r[-1] = 0.0
    p = tmp_path_factory.mktemp("haack") / "haack.stl"
    write_stl(p, revolution(10.0 * xi, r))
    return str(p)


def cli_json(*args):
    out = subprocess.run([CLI, *args, "--json", "-", "-q"], capture_output=True, text=True, check=True)
    return json.loads(out.stdout)


def test_box_section_is_its_cross_section(box_file):
    # Closed form: a normal cut through a box of half-height h has area (2h)² = 0.25 m².
    s = machcut.Study([box_file])
    a = s.area(mach=1.0, stations=11)
    assert isinstance(a["x"], np.ndarray) and a["x"].shape == (11,)
    inner = a["area"][1:-1]
    np.testing.assert_allclose(inner, 0.25, rtol=1e-12)
    assert list(a["parts"]) == s.part_names
    np.testing.assert_allclose(a["parts"][s.part_names[0]], a["area"], rtol=0, atol=1e-15)


def test_sears_haack_drag_matches_closed_form(haack_file):
    # Closed form: D/q = 128 V²/(π l⁴) (Sears 1947) for the body's own V and l; the faceted
    # body is within 1% of it (from the C++ suite's accuracy on the same shape, common practice
    # for a 96-segment mesh).
    s = machcut.Study([haack_file])
    m = s.measures()
    (d,) = s.drag([1.0])
    assert d["ok"] and d["drag_area"] is not None
    expected = 128 * m["volume"] ** 2 / (math.pi * m["length"] ** 4)
    assert d["drag_area"] == pytest.approx(expected, rel=0.01)
    assert m["sears_haack_drag_area"] == pytest.approx(expected, rel=1e-12)


def test_area_and_drag_identical_to_the_cli():
    # The same study behind both front ends: the numbers agree to 1e-12 (issue #9).
    s = machcut.Study(DEMO, capture=["nacelles.obj"])
    a = s.area(mach=1.6, roll=30.0, stations=101)
    c = cli_json("area", *DEMO, "--mach", "1.6", "--roll", "30", "--stations", "101")
    np.testing.assert_allclose(a["x"], c["x"], rtol=1e-12, atol=0)
    np.testing.assert_allclose(a["area"], c["area"], rtol=1e-12, atol=1e-15)
    for shell in c["shells"]:
        np.testing.assert_allclose(a["parts"][shell["name"]], shell["area"], rtol=1e-12, atol=1e-15)
    # A time budget no level reaches: where the refinement stops must not depend on the load.
    d = s.drag([1.2, 2.0], time_budget=3600)
    cd = cli_json("drag", *DEMO, "--mach", "1.2,2", "--capture", "nacelles.obj", "--time-budget", "3600")
    for py_row, cli_row in zip(d, cd["results"]):
        assert py_row["mach"] == cli_row["mach"]
        assert py_row["drag_area"] == pytest.approx(cli_row["drag_area"], rel=1e-12)
        assert py_row["error_estimate"] == pytest.approx(cli_row["error_estimate"], rel=1e-12)
        assert py_row["resolution_limited"] == cli_row["resolution_limited"]
        assert py_row["advice"] == cli_row["validity"]["advice"]
        cli_features = cli_row["validity"]["features"]
        assert [f["part"] for f in py_row["features"]] == [f["part"] for f in cli_features]
        for pf, cf in zip(py_row["features"], cli_features):
            assert pf["frontal_area"] == pytest.approx(cf["frontal_area"], rel=1e-12)
            assert pf["drag_share"] == pytest.approx(cf["drag_share"], rel=1e-9)


def test_errors_carry_the_cli_message(box_file, tmp_path):
    with pytest.raises(machcut.InputError, match=r"^--units: 'yd' is not a unit"):
        machcut.Study([box_file], units="yd")
    with pytest.raises(machcut.InputError, match=r"^--up: "):
        machcut.Study([box_file], flow="+z", up="+z")
    missing = str(tmp_path / "missing.stl")
    with pytest.raises(machcut.InputError, match="missing.stl"):
        machcut.Study([missing])
    s = machcut.Study([box_file])
    with pytest.raises(machcut.InputError, match=r"^--mach: Mach 0.5 is below 1"):
        s.area(mach=0.5)
    with pytest.raises(machcut.InputError, match=r"^--mach: Mach 25 is above 20"):
        s.drag([25.0])
    with pytest.raises(machcut.InputError, match=r"^--roll: "):
        s.area(mach=1.2, roll=float("nan"))
    # The CLI says the same words for the same mistake.
    cli = subprocess.run([CLI, "area", box_file, "--mach", "0.5"], capture_output=True, text=True)
    assert cli.returncode == 2
    assert "--mach: Mach 0.5 is below 1" in cli.stderr


def test_open_sheet_is_unusable(tmp_path):
    p = tmp_path / "sheet.stl"
    write_stl(p, [((0, 0, 0), (1, 0, 0), (1, 1, 0))])
    with pytest.raises((machcut.UnusableModel, machcut.InputError)):
        machcut.Study([str(p)])


def test_readme_example_runs(tmp_path):
    # The README's example, as a new user would run it from the top of a checkout (here a
    # scratch folder that links the models, so that area.png lands there), headless.
    pytest.importorskip("matplotlib")
    text = open(os.path.join(SOURCE, "README.md"), encoding="utf-8").read()
    start = text.index("```python\nimport matplotlib.pyplot as plt")
    code = text[start + len("```python\n"):text.index("```", start + 10)]
    os.symlink(os.path.join(os.path.abspath(SOURCE), "models"), tmp_path / "models")
    import sys
    subprocess.run([sys.executable, "-c", code], cwd=tmp_path, env=dict(os.environ, MPLBACKEND="Agg"), check=True)
    png = (tmp_path / "area.png").read_bytes()
    assert png.startswith(b"\x89PNG\r\n\x1a\n")


def test_sensitivity_arrays_and_sears_haack_uniformity(haack_file):
    # The Sears–Haack body is the least-drag body of its volume and length (Sears 1947; Haack
    # 1941), so at M 1 d(D/q)/dV is the Lagrange multiplier 2(D/q)/V = 256 V/(π l⁴) along it.
    # Area-weighted means over bands of 5 % of the length between 10 % and 90 % of it, 5 %
    # tolerance, as in tests/design/test_sensitivity.cpp (single vertices scatter at the facet
    # scale).
    s = machcut.Study([haack_file])
    m = s.measures()
    r = s.sensitivity(1.0, cells=16384)
    n = r["xyz"].shape[0]
    assert r["xyz"].shape == (n, 3) and r["normal"].shape == (n, 3)
    assert r["sensitivity"].shape == (n,) and r["vertex_area"].shape == (n,)
    band = np.clip((r["xyz"][:, 0] / m["length"] * 20).astype(int), 0, 19)
    expected = 256 * m["volume"] / (math.pi * m["length"] ** 4)
    for b in range(2, 18):
        w = r["vertex_area"][band == b]
        mean = np.sum(r["sensitivity"][band == b] * w) / np.sum(w)
        assert mean == pytest.approx(expected, rel=0.05), b
    with pytest.raises(ValueError, match="--mach"):
        s.sensitivity(0.5)


def test_skip_and_only_select_parts():
    # The demo's nacelles.obj names two objects ('o nacelle_starboard', 'o nacelle_port'):
    # parts "nacelles.obj:nacelle_port" and "nacelles.obj:nacelle_starboard" (README
    # "Conventions"); --only / only= keeps the named ones, --skip / skip= leaves them out.
    only = machcut.Study(DEMO, only=["nacelles.obj"], cache=False)
    assert sorted(only.area(mach=1.0, stations=11)["parts"]) == [
        "nacelles.obj:nacelle_port", "nacelles.obj:nacelle_starboard"]
    skip = machcut.Study(DEMO, skip=["nacelle_port"], cache=False)
    parts = skip.area(mach=1.0, stations=11)["parts"]
    assert "nacelles.obj:nacelle_starboard" in parts
    assert "nacelles.obj:nacelle_port" not in parts
    with pytest.raises(Exception, match="nosuch"):
        machcut.Study(DEMO, only=["nosuch"], cache=False)

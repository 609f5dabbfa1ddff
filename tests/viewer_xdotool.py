#!/usr/bin/env python3
"""Drives the real machcut-view window under Xvfb with synthetic input (xdotool), as a person
uses it: a click on the area plot moves the cursor and the Mach plane, the arrow keys step the
station, a left-drag orbits the view, Ctrl+O and a typed path open another file. After each
action it waits (polling, with a timeout) for the viewer's state file (--state-file) to show
the change, then saves a screenshot with F12 and checks it with viewer_png_check.

Usage: viewer_xdotool.py VIEWER PNG_CHECK WORK_DIR
Exit 77 (CTest: skipped) with a message when Xvfb or xdotool is missing.
"""
import json
import math
import os
import shutil
import signal
import subprocess
import sys
import time
import zlib

SKIP = 77
W, H = 1280, 800


def fail(msg):
    print("viewer_xdotool: FAIL: " + msg, file=sys.stderr)
    sys.exit(1)


def box_obj(path, lo, hi):
    """A closed box [lo, hi] as OBJ, triangles outward (counter-clockwise from outside)."""
    (x0, y0, z0), (x1, y1, z1) = lo, hi
    v = [(x0, y0, z0), (x1, y0, z0), (x1, y1, z0), (x0, y1, z0),
         (x0, y0, z1), (x1, y0, z1), (x1, y1, z1), (x0, y1, z1)]
    quads = [(1, 4, 3, 2), (5, 6, 7, 8), (1, 2, 6, 5), (2, 3, 7, 6), (3, 4, 8, 7), (4, 1, 5, 8)]
    with open(path, "w") as f:
        f.write("# box for the viewer input test\n")
        for p in v:
            f.write("v %g %g %g\n" % p)
        for a, b, c, d in quads:
            f.write("f %d %d %d\nf %d %d %d\n" % (a, b, c, a, c, d))


def read_png(path):
    """Decodes an 8-bit RGB or RGBA, non-interlaced PNG (what the viewer writes) into
    (width, height, rows of bytes, bytes per pixel). PNG specification, filters 0-4."""
    with open(path, "rb") as f:
        data = f.read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        fail(path + ": not a PNG")
    pos, idat, w = 8, b"", 0
    while pos < len(data):
        n = int.from_bytes(data[pos:pos + 4], "big")
        kind, body = data[pos + 4:pos + 8], data[pos + 8:pos + 8 + n]
        if kind == b"IHDR":
            w, h, depth, ctype, _, _, interlace = body[0:4], body[4:8], body[8], body[9], body[10], body[11], body[12]
            w, h = int.from_bytes(w, "big"), int.from_bytes(h, "big")
            if depth != 8 or ctype not in (2, 6) or interlace:
                fail(path + ": unexpected PNG format")
            bpp = 4 if ctype == 6 else 3
        elif kind == b"IDAT":
            idat += body
        pos += 12 + n
    raw = zlib.decompress(idat)
    stride = w * bpp
    rows, prev = [], bytearray(stride)
    for y in range(h):
        ftype, line = raw[y * (stride + 1)], bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        for i in range(stride):
            a = line[i - bpp] if i >= bpp else 0
            b = prev[i]
            c = prev[i - bpp] if i >= bpp else 0
            if ftype == 1:
                line[i] = (line[i] + a) & 255
            elif ftype == 2:
                line[i] = (line[i] + b) & 255
            elif ftype == 3:
                line[i] = (line[i] + (a + b) // 2) & 255
            elif ftype == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                line[i] = (line[i] + (a if pa <= pb and pa <= pc else b if pb <= pc else c)) & 255
        rows.append(bytes(line))
        prev = line
    return w, h, rows, bpp


def plane_centroid(path, rect):
    """Mean position of the Mach plane's amber pixels inside rect (x0, y0, x1, y1), and their
    count: the colour test of viewer_png_check."""
    w, h, rows, bpp = read_png(path)
    x0, y0, x1, y1 = (int(v) for v in rect)
    sx = sy = n = 0
    for y in range(max(0, y0), min(h, y1), 2):
        row = rows[y]
        for x in range(max(0, x0), min(w, x1), 2):
            r, g, b = row[bpp * x], row[bpp * x + 1], row[bpp * x + 2]
            if r > 180 and 100 < g < 200 and b < 110:
                sx, sy, n = sx + x, sy + y, n + 1
    if n < 20:
        fail("%s: no Mach plane in the model view (%d amber pixels)" % (path, n))
    return sx / n, sy / n, n


class Session:
    def __init__(self, viewer, check, work):
        self.viewer, self.check, self.work = viewer, check, work
        self.state_path = os.path.join(work, "state.json")
        self.xvfb = self.proc = None
        self.env = dict(os.environ)
        self.window = None
        self.shots = 0

    # ---- processes ------------------------------------------------------------------------
    def start_xvfb(self):
        r, w = os.pipe()
        self.xvfb = subprocess.Popen(["Xvfb", "-displayfd", str(w), "-screen", "0", "1400x900x24",
                                      "-nolisten", "tcp"], pass_fds=(w,), stderr=subprocess.DEVNULL)
        os.close(w)
        number = b""
        deadline = time.monotonic() + 30
        while not number.endswith(b"\n") and time.monotonic() < deadline:
            chunk = os.read(r, 16)
            if not chunk:
                break
            number += chunk
        os.close(r)
        if not number.strip():
            fail("Xvfb did not start")
        self.env["DISPLAY"] = ":" + number.decode().strip()
        self.env.pop("WAYLAND_DISPLAY", None)

    def start_viewer(self, model):
        if os.path.exists(self.state_path):
            os.remove(self.state_path)
        self.log = open(os.path.join(self.work, "viewer.log"), "w")
        self.proc = subprocess.Popen([self.viewer, "--state-file", self.state_path, "--size", "%dx%d" % (W, H),
                                      "--mach", "1.3", model], cwd=self.work, env=self.env,
                                     stdout=self.log, stderr=subprocess.STDOUT)

    def stop(self):
        for p in (self.proc, self.xvfb):
            if p and p.poll() is None:
                p.send_signal(signal.SIGTERM)
                try:
                    p.wait(timeout=10)
                except subprocess.TimeoutExpired:
                    p.kill()

    def xdo(self, *args):
        r = subprocess.run(["xdotool"] + [str(a) for a in args], env=self.env, capture_output=True, text=True,
                           timeout=60)
        if r.returncode != 0:
            fail("xdotool %s: %s" % (" ".join(map(str, args)), r.stderr.strip()))
        return r.stdout

    # ---- state ----------------------------------------------------------------------------
    def state(self):
        try:
            with open(self.state_path) as f:
                return json.load(f)
        except (OSError, ValueError):
            return None

    def wait(self, what, pred, timeout=120.0):
        """Polls the state file until pred(state) holds; fails with `what` after the timeout."""
        deadline = time.monotonic() + timeout
        while time.monotonic() < deadline:
            if self.proc.poll() is not None:
                fail("the viewer exited (%d) while waiting for %s" % (self.proc.returncode, what))
            s = self.state()
            if s is not None:
                try:
                    if pred(s):
                        return s
                except (KeyError, TypeError, IndexError):
                    pass
            time.sleep(0.02)
        fail("timed out waiting for %s; last state: %s" % (what, json.dumps(self.state())))

    def move(self, x, y):
        """Moves the pointer to window pixel (x, y) and waits until the viewer has seen it."""
        self.xdo("mousemove", "--window", self.window, int(round(x)), int(round(y)))
        self.wait("the pointer at (%d, %d)" % (x, y),
                  lambda s: abs(s["mouse"]["x"] - round(x)) < 1.5 and abs(s["mouse"]["y"] - round(y)) < 1.5)

    def screenshot(self, label):
        """F12: the viewer saves the window as PNG in its folder; the file is then checked."""
        want = self.shots + 1
        self.xdo("key", "F12")
        s = self.wait("screenshot %d" % want, lambda s: s["pngs"] == want and "saved" in s["message"])
        self.shots = want
        png = os.path.join(self.work, s["last_png"])
        self.last_shot = png
        named = os.path.join(self.work, "%02d-%s.png" % (want, label))
        shutil.copyfile(png, named)
        r = subprocess.run([self.check, "png", named, str(W), str(H)])
        if r.returncode != 0:
            fail("screenshot %s did not pass the check" % named)


def main():
    if len(sys.argv) != 4:
        print(__doc__, file=sys.stderr)
        return 2
    viewer, check, work = (os.path.abspath(a) for a in sys.argv[1:])
    missing = [t for t in ("Xvfb", "xdotool") if shutil.which(t) is None]
    if missing:
        print("viewer_xdotool: skipped: %s not installed (scripts/install-deps.sh installs them)" % ", ".join(missing))
        return SKIP
    os.makedirs(work, exist_ok=True)
    spindle = os.path.join(work, "spindle.obj")
    if subprocess.run([check, "obj", spindle]).returncode != 0:
        fail("cannot write " + spindle)
    box = os.path.join(work, "box.obj")
    box_obj(box, (0.0, -0.5, -0.4), (6.0, 0.5, 0.4))
    sheet = os.path.join(work, "sheet.obj")
    with open(sheet, "w") as f:
        f.write("# one flat square: reads, encloses no volume\nv 0 0 0\nv 0 1 0\nv 0 1 1\nv 0 0 1\nf 1 2 3\nf 1 3 4\n")
    ses = Session(viewer, check, work)
    try:
        ses.start_xvfb()
        ses.start_viewer(spindle)
        s = ses.wait("the model, its curve and section", lambda s: s["model_loaded"] and s["curve_ready"]
                     and s["section_station"] is not None and s["rects"]["plot"][2] > 0)
        ses.window = ses.xdo("search", "--sync", "--all", "--pid", ses.proc.pid, "--name", "^machcut-view$").split()[0]
        # Input goes to the focused window through XTEST, as from a real keyboard and mouse
        # (no window manager runs: the focus is set directly).
        ses.xdo("windowfocus", "--sync", ses.window)
        ses.screenshot("loaded")

        # 1. A click on the area plot, a quarter of the way along: cursor and plane move there.
        x0, y0, x1, y1 = s["rects"]["plot"]
        d0, d1 = s["rects"]["plot_x"]
        px, py = x0 + 0.25 * (x1 - x0), 0.5 * (y0 + y1)
        want = d0 + (round(px) - x0) / (x1 - x0) * (d1 - d0)
        tol = 1.5 * (d1 - d0) / (x1 - x0)  # a pixel and a half of station
        ses.move(px, py)
        ses.xdo("click", 1)
        s = ses.wait("the cursor at X = %.4f m after the click" % want, lambda s: abs(s["station"] - want) < tol)
        s = ses.wait("the plane's section at the cursor", lambda s: s["section_station"] == s["station"])
        print("click on the plot: station %.4f m (wanted %.4f m)" % (s["station"], want))
        ses.screenshot("plot-click")
        # The plane on the model moved with the cursor: its amber pixels moved on screen.
        before_c = plane_centroid(os.path.join(work, "01-loaded.png"), s["rects"]["model"])
        after_c = plane_centroid(os.path.join(work, "02-plot-click.png"), s["rects"]["model"])
        shift = math.hypot(after_c[0] - before_c[0], after_c[1] - before_c[1])
        if shift < 10:
            fail("the Mach plane moved %.1f pixels on the model for a 2.5 m cursor move" % shift)
        print("plane on the model moved %.0f pixels" % shift)

        # 2. Arrow keys: → twice (the first snaps to the station grid), ← once.
        step = s["station_step"]
        before = s["station"]
        ses.xdo("key", "Right")
        s = ses.wait("→ to move the cursor downstream", lambda s: s["station"] > before + 1e-9)
        if s["station"] - before > step * (1 + 1e-9):
            fail("→ moved the cursor by %g m, more than one station (%g m)" % (s["station"] - before, step))
        on_grid = s["station"]
        ses.xdo("key", "Right")
        s = ses.wait("a second → step", lambda s: abs(s["station"] - (on_grid + step)) < 1e-6 * step)
        ses.xdo("key", "Left")
        s = ses.wait("← back one station", lambda s: abs(s["station"] - on_grid) < 1e-6 * step)
        s = ses.wait("the section following the keys", lambda s: s["section_station"] == s["station"])
        print("arrow keys: station %.4f m, one station = %.4f m" % (s["station"], step))
        ses.screenshot("arrows")

        # 3. A left-drag across the model view orbits the camera.
        m0, m1, m2, m3 = s["rects"]["model"]
        cx, cy = 0.5 * (m0 + m2), 0.5 * (m1 + m3)
        yaw0, pitch0 = s["camera"]["yaw_deg"], s["camera"]["pitch_deg"]
        ses.move(cx, cy)
        ses.xdo("mousedown", 1)
        ses.wait("the left button down", lambda s: s["mouse"]["left"])
        for k in range(1, 6):
            ses.move(cx + 24 * k, cy + 6 * k)
        ses.xdo("mouseup", 1)
        s = ses.wait("the left button up", lambda s: not s["mouse"]["left"])
        dyaw = s["camera"]["yaw_deg"] - yaw0
        if abs(dyaw) < 5.0:
            fail("a 120-pixel drag turned the view by %.2f degrees only" % dyaw)
        if s["station"] != on_grid:
            fail("orbiting moved the cursor")
        print("drag: yaw %.1f -> %.1f deg, pitch %.1f -> %.1f deg" % (yaw0, s["camera"]["yaw_deg"], pitch0,
                                                                 s["camera"]["pitch_deg"]))
        ses.screenshot("orbit")
        # The view turned: the plane (fixed on the model) is seen elsewhere on screen.
        before_c = plane_centroid(os.path.join(work, "03-arrows.png"), s["rects"]["model"])
        after_c = plane_centroid(os.path.join(work, "04-orbit.png"), s["rects"]["model"])
        if math.hypot(after_c[0] - before_c[0], after_c[1] - before_c[1]) < 10 and abs(after_c[2] - before_c[2]) < 0.1 * before_c[2]:
            fail("the model view looks the same after the orbit drag")

        # 4. Ctrl+O, a typed path and Enter open another file.
        ses.xdo("key", "ctrl+o")
        ses.wait("the open dialog with its path field taking the keyboard",
                 lambda s: s["open_dialog"] and s["text_input"])
        ses.xdo("type", "--delay", 30, box)
        ses.wait("the path typed in the field", lambda s: s["open_path"] == box)
        # Enter is held until the viewer has opened the file (ImGui 1.86 reads keys per frame).
        ses.xdo("keydown", "Return")
        s = ses.wait("the typed file opened", lambda s: s["files"] == [box])
        ses.xdo("keyup", "Return")
        s = ses.wait("the box loaded with its curve", lambda s: s["model_loaded"] and s["triangles"] == 12
                     and s["curve_ready"] and not s["open_dialog"] and s["section_station"] is not None)
        print("opened %s: %d triangles" % (os.path.basename(box), s["triangles"]))
        ses.screenshot("opened")

        # 5. A model that reads but cannot be analysed (one flat square) still shows its mesh:
        # the core leaves a flat part out (PreparedModel::set_aside), so the sheet is the one part
        # left out, drawn grey, with the reason; no curve is computed.
        ses.xdo("key", "ctrl+o")
        ses.wait("the open dialog again", lambda s: s["open_dialog"] and s["text_input"])
        ses.xdo("type", "--delay", 30, sheet)
        ses.wait("the sheet's path typed", lambda s: s["open_path"] == sheet)
        ses.xdo("keydown", "Return")
        ses.wait("the sheet opened", lambda s: s["files"] == [sheet])
        ses.xdo("keyup", "Return")
        s = ses.wait("the sheet shown, not analysable", lambda s: s["model_loaded"]
                     and not s["analysable"] and not s["busy"])
        if "not usable" not in s["error"] or "flat" not in s["error"] or s["health"]["left_out"] != 1 \
                or s["curve_ready"]:
            fail("the unusable sheet: error %r, %d part(s) left out (1 expected), curve_ready %s"
                 % (s["error"], s["health"]["left_out"], s["curve_ready"]))
        print("sheet: %s" % s["error"])
        want = ses.shots + 1
        ses.xdo("key", "F12")
        s = ses.wait("screenshot %d" % want, lambda s: s["pngs"] == want and "saved" in s["message"])
        ses.shots = want
        # No area curve to check here (viewer_png_check wants one): only that the PNG decodes
        # at the window's size.
        w, h, _, _ = read_png(os.path.join(work, s["last_png"]))
        if (w, h) != (W, H):
            fail("sheet screenshot is %dx%d" % (w, h))
        shutil.copyfile(os.path.join(work, s["last_png"]), os.path.join(work, "%02d-unusable.png" % want))
    finally:
        ses.stop()
    print("viewer_xdotool: ok (%d screenshots in %s)" % (ses.shots, work))
    return 0


if __name__ == "__main__":
    sys.exit(main())

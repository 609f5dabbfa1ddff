#!/usr/bin/env bash
# Peak memory (maximum resident set size, GNU time) of `machcut drag` on a generated
# 5M-triangle closed body (binary STL, 250 MB of triangle data) and of `machcut inspect` on a
# ~480 MB ASCII STL of the same body, against the file's size. The files are made in a
# temporary folder by bench/make_body.py and deleted afterwards (nothing is committed).
# Usage: bash bench/peak_memory.sh [MACHCUT] [TRIANGLES]
#   MACHCUT defaults to build/release/slicing/machcut; TRIANGLES to 5000000.
# Needs /usr/bin/time (Debian package "time") and python3-numpy; takes a few minutes and
# about 1 GB of memory and disk. The reader runs in a child process: GNU time reports the
# larger of the two processes' peaks (getrusage RUSAGE_CHILDREN), not their sum.
set -euo pipefail
cd "$(dirname "$0")/.."
MACHCUT=${1:-build/release/slicing/machcut}
TRIS=${2:-5000000}
TMP=$(mktemp -d)
trap 'rm -rf "$TMP"' EXIT

peak() {  # prints "peak_kB" of the command, its output to $TMP/out
  /usr/bin/time -v "$@" > "$TMP/out" 2> "$TMP/time" || { cat "$TMP/time" >&2; exit 1; }
  awk '/Maximum resident set size/ {print $6}' "$TMP/time"
}

/usr/bin/python3 bench/make_body.py "$TMP/body.stl" "$TRIS"
size=$(stat -c %s "$TMP/body.stl")
kb=$(peak "$MACHCUT" drag "$TMP/body.stl" --mach 1.5 --no-cache)
awk -v kb="$kb" -v size="$size" 'BEGIN {
  printf "drag --mach 1.5 --no-cache, binary STL %.0f MB: peak %.0f MB = %.2f x the triangle data\n",
         size / 1e6, kb * 1024 / 1e6, kb * 1024 / size }'
rm -f "$TMP/body.stl"

# ASCII STL of about 480 MB: ~183 bytes a triangle as make_body.py writes them.
/usr/bin/python3 bench/make_body.py "$TMP/ascii.stl" 2620000 --ascii
size=$(stat -c %s "$TMP/ascii.stl")
kb=$(peak "$MACHCUT" inspect "$TMP/ascii.stl" --no-cache)
awk -v kb="$kb" -v size="$size" 'BEGIN {
  printf "inspect --no-cache, ASCII STL %.0f MB: peak %.0f MB = %.2f x the file size\n",
         size / 1e6, kb * 1024 / 1e6, kb * 1024 / size }'

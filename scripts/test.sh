#!/usr/bin/env bash
# Installs missing Debian packages, builds Release and runs the whole test suite, then builds
# again with AddressSanitizer + UndefinedBehaviorSanitizer and runs the suite once more.
# Usage: bash scripts/test.sh
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/install-deps.sh
JOBS=$(nproc)

echo "== Release build and tests"
cmake -S . -B build/release -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build build/release -j"$JOBS"
ctest --test-dir build/release --output-on-failure -j"$JOBS"

echo "== ASan + UBSan build and tests"
cmake -S . -B build/asan -DCMAKE_BUILD_TYPE=RelWithDebInfo -DMACHCUT_SANITIZE=ON \
  -DMACHCUT_BUILD_BENCH=OFF >/dev/null
cmake --build build/asan -j"$JOBS"
# Mesa's software rasteriser keeps allocations alive until exit; leaks are not checked.
ASAN_OPTIONS=detect_leaks=0:abort_on_error=1 UBSAN_OPTIONS=print_stacktrace=1 \
  ctest --test-dir build/asan --output-on-failure -j"$JOBS"
echo "== all tests passed (Release and ASan+UBSan)"

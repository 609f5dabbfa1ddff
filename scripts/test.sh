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
# The viewer's GL program is exercised by the Release pass (screenshots under xvfb and with no
# display); the sanitizer pass covers the core, the CLI and their tests.
cmake -S . -B build/asan -DCMAKE_BUILD_TYPE=RelWithDebInfo -DMACHCUT_SANITIZE=ON \
  -DMACHCUT_BUILD_BENCH=OFF -DMACHCUT_BUILD_VIEWER=OFF -DMACHCUT_BUILD_PYTHON=OFF >/dev/null
cmake --build build/asan -j"$JOBS"
# Leaks are not checked (TBB and Assimp keep process-lifetime allocations).
ASAN_OPTIONS=detect_leaks=0:abort_on_error=1 UBSAN_OPTIONS=print_stacktrace=1 \
  ctest --test-dir build/asan --output-on-failure -j"$JOBS"
echo "== all tests passed (Release and ASan+UBSan)"

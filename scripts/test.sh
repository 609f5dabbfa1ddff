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

echo "== Fuzz target: libFuzzer + ASan + UBSan, 60 s from the seed corpus (fuzz/README.md)"
cmake -S . -B build/fuzz -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCMAKE_C_COMPILER=clang \
  -DCMAKE_CXX_COMPILER=clang++ -DMACHCUT_BUILD_FUZZ=ON -DMACHCUT_SANITIZE=ON \
  -DMACHCUT_BUILD_TESTS=OFF -DMACHCUT_BUILD_VIEWER=OFF -DMACHCUT_BUILD_BENCH=OFF \
  -DMACHCUT_BUILD_PYTHON=OFF >/dev/null
cmake --build build/fuzz -j"$JOBS" --target fuzz_import
# New inputs go to a scratch folder (the committed seeds stay as they are); a finding is written
# to build/fuzz/crash-* (or timeout-*, oom-*) and fails this script.
mkdir -p build/fuzz/corpus
ASAN_OPTIONS=detect_leaks=0:abort_on_error=1 UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1 \
  build/fuzz/fuzz/fuzz_import -max_total_time=60 -timeout=10 -rss_limit_mb=4096 -max_len=65536 \
  -dict=fuzz/import.dict -artifact_prefix=build/fuzz/ -print_final_stats=1 \
  build/fuzz/corpus fuzz/corpus
echo "== all tests passed (Release and ASan+UBSan) and 60 s of fuzzing found nothing"

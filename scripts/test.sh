#!/usr/bin/env bash
# Sets up the machine, builds porofit and runs every test.
#   bash scripts/test.sh             Release build in build/, all CTest tests
#   bash scripts/test.sh --sanitize  AddressSanitizer + UBSan build in build-asan/, all CTest tests
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
bash scripts/setup.sh
jobs="$(nproc)"
if [ "${1:-}" = "--sanitize" ]; then
  dir=build-asan
  cmake -S . -B "$dir" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DPOROFIT_SANITIZE=ON -DPOROFIT_BUILD_BENCHMARKS=OFF
  export ASAN_OPTIONS="detect_leaks=1:abort_on_error=1:strict_string_checks=1"
  export UBSAN_OPTIONS="print_stacktrace=1:halt_on_error=1"
else
  dir=build
  cmake -S . -B "$dir" -DCMAKE_BUILD_TYPE=Release
fi
cmake --build "$dir" -j"$jobs"
ctest --test-dir "$dir" --output-on-failure -j"$jobs"

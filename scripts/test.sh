#!/usr/bin/env bash
# Sets up the machine, builds porofit and runs every test.
#   bash scripts/test.sh             Release build in build/, all CTest tests
#   bash scripts/test.sh --sanitize  clang AddressSanitizer + UBSan build in build-asan/, all CTest tests
#                                    (the tree scripts/fuzz.sh builds its fuzzers in)
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
bash scripts/setup.sh
jobs="$(nproc)"
if [ "${1:-}" = "--sanitize" ]; then
  source scripts/sanitize-build.sh
  dir="$sanitize_dir"
  cmake -S . -B "$dir" "${sanitize_cmake_args[@]}"
else
  dir=build
  cmake -S . -B "$dir" -DCMAKE_BUILD_TYPE=Release
fi
cmake --build "$dir" -j"$jobs"
ctest --test-dir "$dir" --output-on-failure -j"$jobs"

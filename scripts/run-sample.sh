#!/usr/bin/env bash
# Sets up the machine, builds porofit and fits the invented sample study into out/sample-study/.
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
bash scripts/setup.sh
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release
cmake --build build -j"$(nproc)" --target porofit
./build/apps/porofit/porofit fit samples/invented-field-study.yaml --out out/sample-study --overwrite

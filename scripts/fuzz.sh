#!/usr/bin/env bash
# Builds the libFuzzer harnesses (tests/fuzz/, in the clang ASan + UBSan tree
# build-asan/ that `scripts/test.sh --sanitize` also uses) and runs each for
# SECONDS (default 60), nproc harnesses at a time. Prints one line per
# harness (executions, coverage, crash inputs) and exits 1 if any harness
# found a crash, leak, out-of-memory or timeout. See docs/fuzzing.md.
#   bash scripts/fuzz.sh [SECONDS]
# Work files: build-asan/fuzz/{seeds,corpus,artifacts,logs}/<harness>/. The
# corpus grows from run to run; artifacts and logs are those of the last run.
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
seconds="${1:-60}"
bash scripts/setup.sh
source scripts/sanitize-build.sh
cmake -S . -B "$sanitize_dir" "${sanitize_cmake_args[@]}" >/dev/null
cmake --build "$sanitize_dir" -j"$(nproc)" --target porofit_fuzzers

work="$sanitize_dir/fuzz"
rm -rf "$work/seeds" "$work/artifacts" "$work/logs" "$work/tmp"
mkdir -p "$work/logs" "$work/tmp"
/usr/bin/python3 tests/fuzz/pack_seeds.py . "$work/seeds"

# harness  -max_len (bytes; the largest seed must fit)
harnesses=("study 65536" "csv 16384" "las 32768" "formula 4096")

run_one() {  # name max_len
  local name="$1" max_len="$2"
  local corpus="$work/corpus/$name" artifacts="$work/artifacts/$name"
  local dirs=("$corpus" "$work/seeds/$name")
  mkdir -p "$corpus" "$artifacts"
  [ -d "tests/fuzz/regressions/$name" ] && dirs+=("tests/fuzz/regressions/$name")
  # -fork=1 with -ignore_*: keep fuzzing after a finding, so one run lists them all.
  # An input that hangs the fork child is not always stopped by -timeout; the
  # outer limit ends the harness, and summary() reports it as failed.
  TMPDIR="$work/tmp" timeout -k 10 $((seconds + 120)) "$sanitize_dir/tests/fuzz/porofit_fuzz_$name" \
    -max_total_time="$seconds" -max_len="$max_len" -rss_limit_mb=2048 -timeout=30 \
    -fork=1 -ignore_crashes=1 -ignore_ooms=1 -ignore_timeouts=1 \
    -artifact_prefix="$artifacts/" "${dirs[@]}" >"$work/logs/$name.log" 2>&1 || true
}

summary() {  # name -> one line; returns 1 if the harness found anything
  local name="$1" status=0
  local log="$work/logs/$name.log" last execs cov findings
  last="$(grep -E '^#[0-9]+.*cov: [0-9]+' "$log" | tail -n 1 || true)"
  execs="$(sed -nE 's/^#([0-9]+).*/\1/p' <<<"$last")"
  cov="$(sed -nE 's/.*cov: ([0-9]+).*/\1/p' <<<"$last")"
  findings="$(find "$work/artifacts/$name" -type f \
              \( -name 'crash-*' -o -name 'leak-*' -o -name 'oom-*' -o -name 'timeout-*' \) | wc -l)"
  [ "$findings" -eq 0 ] || status=1
  [ -n "$execs" ] || status=1
  printf 'fuzz %-8s %4ss  executions %10s  cov %6s  crashes %3s  %s\n' \
    "$name" "$seconds" "${execs:-?}" "${cov:-?}" "$findings" \
    "$([ "$status" -eq 0 ] && echo ok || echo "FAILED (log: $log, inputs: $work/artifacts/$name/)")"
  return "$status"
}

running=0
for h in "${harnesses[@]}"; do
  run_one $h &
  running=$((running + 1))
  if [ "$running" -ge "$(nproc)" ]; then
    wait -n || true
    running=$((running - 1))
  fi
done
wait

failed=0
for h in "${harnesses[@]}"; do
  summary ${h%% *} || failed=1
done
exit "$failed"

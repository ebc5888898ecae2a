# Sourced by scripts/test.sh --sanitize and scripts/fuzz.sh, so that both use
# one build tree (build-asan/: clang, ASan + UBSan, libFuzzer harnesses) with
# the same settings and the fuzzers reuse the sanitizer build.
sanitize_dir=build-asan
sanitize_cmake_args=(-DCMAKE_CXX_COMPILER=clang++ -DCMAKE_BUILD_TYPE=RelWithDebInfo
                     -DPOROFIT_SANITIZE=ON -DPOROFIT_FUZZ=ON -DPOROFIT_BUILD_BENCHMARKS=OFF)
export ASAN_OPTIONS="detect_leaks=1:abort_on_error=1:strict_string_checks=1"
export UBSAN_OPTIONS="print_stacktrace=1:halt_on_error=1"

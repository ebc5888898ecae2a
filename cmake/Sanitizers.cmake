# POROFIT_SANITIZE=ON builds everything with AddressSanitizer and UBSan;
# POROFIT_FUZZ=ON does too (tests/fuzz/CMakeLists.txt adds the fuzzer flags).
if(POROFIT_SANITIZE OR POROFIT_FUZZ)
  set(_san -fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=undefined)
  add_compile_options(${_san})
  add_link_options(${_san})
  # Eigen turns off "malloc is already 16-byte aligned" when it sees
  # __SANITIZE_ADDRESS__ and then frees with its hand-made aligned allocator.
  # Ceres (a system library, built without sanitizers) allocates Eigen
  # matrices with plain malloc, so objects crossing the boundary (e.g.
  # GradientChecker::ProbeResults) would be freed the wrong way. glibc and
  # ASan both return 16-byte aligned blocks on x86-64, so keep Eigen's normal
  # setting, the one the system Ceres was built with.
  add_compile_definitions(EIGEN_MALLOC_ALREADY_ALIGNED=1)
endif()

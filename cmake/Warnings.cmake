# INTERFACE target carrying the project's warning flags; every porofit target links it.
add_library(porofit_warnings INTERFACE)
add_library(porofit::warnings ALIAS porofit_warnings)
target_compile_options(porofit_warnings INTERFACE
  $<$<CXX_COMPILER_ID:GNU,Clang>:-Wall -Wextra -Wpedantic -Wshadow -Wconversion -Wno-sign-conversion -Wnon-virtual-dtor>
  $<$<CXX_COMPILER_ID:GNU>:-Wno-restrict>
  $<$<BOOL:${POROFIT_WERROR}>:-Werror>)

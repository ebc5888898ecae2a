# Regenerates the invented sample study into a scratch folder and checks that
# the committed files are byte-identical (the generator is seeded).
# Arguments: -DPYTHON=... -DSOURCE_DIR=... -DSCRATCH=...
file(REMOVE_RECURSE ${SCRATCH})
execute_process(COMMAND ${PYTHON} ${SOURCE_DIR}/samples/generate.py ${SCRATCH}
                RESULT_VARIABLE rc OUTPUT_QUIET)
if(NOT rc EQUAL 0)
  message(FATAL_ERROR "samples/generate.py failed (${rc})")
endif()
file(GLOB_RECURSE generated RELATIVE ${SCRATCH} ${SCRATCH}/*)
list(LENGTH generated count)
if(count LESS 2)
  message(FATAL_ERROR "samples/generate.py wrote ${count} files")
endif()
foreach(f ${generated})
  execute_process(COMMAND ${CMAKE_COMMAND} -E compare_files ${SCRATCH}/${f} ${SOURCE_DIR}/samples/${f}
                  RESULT_VARIABLE diff)
  if(NOT diff EQUAL 0)
    message(FATAL_ERROR "samples/${f} differs from what samples/generate.py writes")
  endif()
endforeach()
message(STATUS "${count} generated files match samples/")

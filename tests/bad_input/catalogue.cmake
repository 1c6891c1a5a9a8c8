# The bad-input catalogue (CTest label "bad_input"): each case runs the built program on a
# deliberately wrong input in a scratch copy of tests/bad_input/inputs/, demo/ and models/,
# and checks
#   - the exit status (2 usage, 3 input, 4 numerical: docs/errors.md),
#   - the first line of stderr (a regex; it should pin file:line:column or the key),
#   - that nothing was written, changed or removed in the scratch folder (no partial output,
#     inputs untouched).
#
# safesite_bad_input(NAME name ARGS "verb|arg|..." STATUS n FIRST regex [STDERR regex])
#   ARGS paths are relative to the scratch folder, which holds inputs/, demo/ and models/
#   (a model file in inputs/ reaches the demo census as ../demo/census.csv).
#   FIRST is matched against the first line of stderr, without its newline.
# Cases live in tests/bad_input/cases/*.cmake, one file per area (census, model file, command
# line, experiments, output folder, ...); the input files they use in tests/bad_input/inputs/.
set(SAFESITE_BAD_INPUT_RUNNER ${CMAKE_CURRENT_LIST_DIR}/run_case.cmake)
set(SAFESITE_BAD_INPUT_SOURCES "${CMAKE_CURRENT_LIST_DIR}/inputs|${PROJECT_SOURCE_DIR}/demo|${PROJECT_SOURCE_DIR}/models")

function(safesite_bad_input)
  cmake_parse_arguments(C "" "NAME;ARGS;STATUS;FIRST;STDERR" "" ${ARGN})
  if(NOT C_NAME OR NOT DEFINED C_STATUS OR NOT DEFINED C_FIRST)
    message(FATAL_ERROR "safesite_bad_input: NAME, STATUS and FIRST are required (${C_NAME})")
  endif()
  set(defs -DEXE=$<TARGET_FILE:safesite> "-DARGS=${C_ARGS}" -DSTATUS=${C_STATUS}
           "-DFIRST=${C_FIRST}" "-DSOURCES=${SAFESITE_BAD_INPUT_SOURCES}"
           -DSCRATCH=${CMAKE_CURRENT_BINARY_DIR}/bad_input/${C_NAME})
  if(DEFINED C_STDERR)
    list(APPEND defs "-DSTDERR=${C_STDERR}")
  endif()
  add_test(NAME bad_input:${C_NAME}
           COMMAND ${CMAKE_COMMAND} ${defs} -P ${SAFESITE_BAD_INPUT_RUNNER})
  set_tests_properties(bad_input:${C_NAME} PROPERTIES LABELS bad_input)
endfunction()

file(GLOB SAFESITE_BAD_INPUT_CASES CONFIGURE_DEPENDS ${CMAKE_CURRENT_LIST_DIR}/cases/*.cmake)
foreach(case_file IN LISTS SAFESITE_BAD_INPUT_CASES)
  include(${case_file})
endforeach()

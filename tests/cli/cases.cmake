# End-to-end cases for the built `safesite` program (CTest label "cli"), through the small
# wrapper expect.cmake: arguments, expected exit status, stdout/stderr patterns, files written.
set(SAFESITE_EXE $<TARGET_FILE:safesite>)
set(SAFESITE_EXPECT ${CMAKE_CURRENT_SOURCE_DIR}/cli/expect.cmake)

# safesite_cli_case(NAME name ARGS "a|b" STATUS n [STDOUT re] [STDERR re] [FILES "f|g"])
function(safesite_cli_case)
  cmake_parse_arguments(C "" "NAME;ARGS;STATUS;STDOUT;STDERR;FILES" "" ${ARGN})
  set(defs -DEXE=${SAFESITE_EXE} "-DARGS=${C_ARGS}" -DSTATUS=${C_STATUS}
           -DWORKDIR=${PROJECT_SOURCE_DIR})
  if(DEFINED C_STDOUT)
    list(APPEND defs "-DSTDOUT=${C_STDOUT}")
  endif()
  if(DEFINED C_STDERR)
    list(APPEND defs "-DSTDERR=${C_STDERR}")
  endif()
  if(DEFINED C_FILES)
    list(APPEND defs "-DFILES=${C_FILES}")
  endif()
  add_test(NAME cli:${C_NAME} COMMAND ${CMAKE_COMMAND} ${defs} -P ${SAFESITE_EXPECT})
  set_tests_properties(cli:${C_NAME} PROPERTIES LABELS cli)
endfunction()

safesite_cli_case(NAME help ARGS "--help" STATUS 0 STDOUT "Usage:.*check")
safesite_cli_case(NAME version ARGS "--version" STATUS 0 STDOUT "^safesite [0-9]+\\.[0-9]+\\.[0-9]+")
foreach(verb check)
  safesite_cli_case(NAME ${verb}-help ARGS "${verb}|--help" STATUS 0 STDOUT "safesite ${verb}")
endforeach()

# Usage errors: status 2, one error line, then a short usage.
safesite_cli_case(NAME no-arguments-is-usage-error ARGS "" STATUS 2
                  STDERR "^safesite: error: [^\n]*\nUsage: safesite")
safesite_cli_case(NAME unknown-verb ARGS "grow" STATUS 2 STDERR "^safesite: error: ")
safesite_cli_case(NAME unknown-option ARGS "check|models/ridge.toml|--colour" STATUS 2
                  STDERR "^safesite: error: [^\n]*--colour[^\n]*\nUsage: safesite check")

# Bad input: status 3 naming the file.
safesite_cli_case(NAME missing-model-file ARGS "check|models/no-such-model.toml" STATUS 3
                  STDERR "^safesite: error: [^\n]*no-such-model.toml")
# The demo: check, fit, run (writes the output folder), eval.
safesite_cli_case(NAME demo-check ARGS "check|models/ridge.toml" STATUS 0
                  STDOUT "census_years.*2015.*Caution")

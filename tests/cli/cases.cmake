# End-to-end cases for the built `safesite` program (CTest label "cli"), through the small
# wrapper expect.cmake: arguments, expected exit status, stdout/stderr patterns, files written.
set(SAFESITE_EXE $<TARGET_FILE:safesite>)
set(SAFESITE_EXPECT ${CMAKE_CURRENT_SOURCE_DIR}/cli/expect.cmake)

# safesite_cli_case(NAME name ARGS "a|b" STATUS n [STDOUT re] [STDERR re] [FILES "f|g"]
#                   [REMOVE "f|g"])   REMOVE: files deleted before the run
function(safesite_cli_case)
  cmake_parse_arguments(C "" "NAME;ARGS;STATUS;STDOUT;STDERR;FILES;REMOVE" "" ${ARGN})
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
  if(DEFINED C_REMOVE)
    list(APPEND defs "-DREMOVE=${C_REMOVE}")
  endif()
  add_test(NAME cli:${C_NAME} COMMAND ${CMAKE_COMMAND} ${defs} -P ${SAFESITE_EXPECT})
  set_tests_properties(cli:${C_NAME} PROPERTIES LABELS cli)
endfunction()

safesite_cli_case(NAME help ARGS "--help" STATUS 0 STDOUT "Usage:.*simulate")
safesite_cli_case(NAME version ARGS "--version" STATUS 0 STDOUT "^safesite [0-9]+\\.[0-9]+\\.[0-9]+")
foreach(verb check fit run eval simulate report)
  safesite_cli_case(NAME ${verb}-help ARGS "${verb}|--help" STATUS 0 STDOUT "safesite ${verb}")
endforeach()

# Usage errors: status 2, one error line, then a short usage.
safesite_cli_case(NAME no-arguments-is-usage-error ARGS "" STATUS 2
                  STDERR "^safesite: error: [^\n]*\nUsage: safesite")
safesite_cli_case(NAME unknown-verb ARGS "grow" STATUS 2 STDERR "^safesite: error: ")
safesite_cli_case(NAME unknown-option ARGS "run|models/ridge.toml|--colour" STATUS 2
                  STDERR "^safesite: error: [^\n]*--colour[^\n]*\nUsage: safesite run")
safesite_cli_case(NAME simulate-needs-plants
                  ARGS "simulate|models/ridge-truth.toml|--years|3|--seed|1|--out|x" STATUS 2
                  STDERR "^safesite: error: [^\n]*--plants")

# Bad input: status 3 naming the file.
safesite_cli_case(NAME missing-model-file ARGS "check|models/no-such-model.toml" STATUS 3
                  STDERR "^safesite: error: [^\n]*no-such-model.toml")
safesite_cli_case(NAME report-missing-folder ARGS "report|no-such-output-folder" STATUS 3
                  STDERR "^safesite: error: [^\n]*no-such-output-folder/summary.json")
safesite_cli_case(NAME eval-needs-fixed-rates ARGS "eval|models/ridge.toml" STATUS 3
                  STDERR "^safesite: error: [^\n]*ridge.toml")

# The demo: check, fit, run (writes the output folder), eval.
safesite_cli_case(NAME demo-check ARGS "check|models/ridge.toml" STATUS 0
                  STDOUT "census_years.*2015.*Caution")
safesite_cli_case(NAME demo-run
                  ARGS "run|models/ridge.toml|--out|${CMAKE_CURRENT_BINARY_DIR}/demo-out|--replicates|41|--threads|2" STATUS 0
                  STDOUT "arrival_chain.*lambda.*2015.*pooled.*intervals.*scenario_delta_lambda"
                  FILES "${CMAKE_CURRENT_BINARY_DIR}/demo-out/lambda.csv|${CMAKE_CURRENT_BINARY_DIR}/demo-out/summary.json|${CMAKE_CURRENT_BINARY_DIR}/demo-out/coefficients.csv|${CMAKE_CURRENT_BINARY_DIR}/demo-out/arrival_chain.csv|${CMAKE_CURRENT_BINARY_DIR}/demo-out/intervals.csv|${CMAKE_CURRENT_BINARY_DIR}/demo-out/figures/lambda_by_year.svg|${CMAKE_CURRENT_BINARY_DIR}/demo-out/figures/retention_curves.svg|${CMAKE_CURRENT_BINARY_DIR}/demo-out/report.html")
set_tests_properties(cli:demo-run PROPERTIES FIXTURES_SETUP demo_out)
# `report` re-renders the report of the folder demo-run wrote (a CTest fixture orders the two;
# report.html is deleted first, so the file checked is the one `report` wrote).
safesite_cli_case(NAME demo-report ARGS "report|${CMAKE_CURRENT_BINARY_DIR}/demo-out" STATUS 0
                  STDOUT "wrote [^\n]*demo-out/report.html"
                  REMOVE "${CMAKE_CURRENT_BINARY_DIR}/demo-out/report.html"
                  FILES "${CMAKE_CURRENT_BINARY_DIR}/demo-out/report.html")
set_tests_properties(cli:demo-report PROPERTIES FIXTURES_REQUIRED demo_out)
# A truth with seed experiments: the experiments and the truth of the arrival chain.
safesite_cli_case(NAME simulate-experiments
                  ARGS "simulate|models/ridge-truth-experiments.toml|--plants|200|--years|3|--seed|1|--burn-in|2|--out|${CMAKE_CURRENT_BINARY_DIR}/simulate-experiments"
                  STATUS 0 STDOUT "truth-arrival.*gravel.*cushion.*tussock"
                  FILES "${CMAKE_CURRENT_BINARY_DIR}/simulate-experiments/trapping.csv|${CMAKE_CURRENT_BINARY_DIR}/simulate-experiments/retention.csv|${CMAKE_CURRENT_BINARY_DIR}/simulate-experiments/truth-arrival.csv|${CMAKE_CURRENT_BINARY_DIR}/simulate-experiments/census.csv")
safesite_cli_case(NAME eval-fixed-example ARGS "eval|models/fixed-example.toml" STATUS 0
                  STDOUT "pooled +[0-9.]+")
# The kernels as Matrix Market files and the life-history tables (issue 10 §3).
safesite_cli_case(NAME eval-fixed-example-matrices
                  ARGS "eval|models/fixed-example.toml|--out|${CMAKE_CURRENT_BINARY_DIR}/eval-out" STATUS 0
                  STDOUT "wrote [0-9]+ files"
                  REMOVE "${CMAKE_CURRENT_BINARY_DIR}/eval-out/matrices/pooled_P.mtx"
                  FILES "${CMAKE_CURRENT_BINARY_DIR}/eval-out/matrices/pooled_P.mtx|${CMAKE_CURRENT_BINARY_DIR}/eval-out/matrices/pooled_F.mtx|${CMAKE_CURRENT_BINARY_DIR}/eval-out/matrices/mesh.csv|${CMAKE_CURRENT_BINARY_DIR}/eval-out/matrices/kernels.csv|${CMAKE_CURRENT_BINARY_DIR}/eval-out/matrices/scenario-1-every-seed-on-bare-gravel_F.mtx|${CMAKE_CURRENT_BINARY_DIR}/eval-out/life_history_at_birth.csv|${CMAKE_CURRENT_BINARY_DIR}/eval-out/life_history_by_size.csv")

# Safeguards (issue 10 §2). The demo scenario "every seed on bare gravel" makes the kernels
# reducible: λ is that of the self-renewing gravel part, 0.93745 for the pooled kernel (an
# independent re-implementation reported the same 0.93745 in issue 10; the whole kernel's
# dominant eigenvalue 0.95173 is the cushion plants' survival–growth rate), and a warning says
# so. A mesh cut at log size 3 (20 cm) loses 79 % of the growth mass of the largest plants
# (measured on the demo on 2026-12-02) and must warn about it.
safesite_cli_case(NAME demo-reducible-scenario
                  ARGS "run|models/ridge.toml|--out|${CMAKE_CURRENT_BINARY_DIR}/demo-reducible-out|--replicates|0" STATUS 0
                  STDOUT "every seed on bare gravel +pooled +0[.]9374 "
                  STDERR "warning: reducible kernel [(]scenario: every seed on bare gravel;[^\n]*kernel pooled 0[.]93745 [(]the whole kernel's dominant eigenvalue is 0[.]95173[)]")
safesite_cli_case(NAME narrow-mesh-warns
                  ARGS "run|tests/cli/inputs/ridge-narrow-mesh.toml|--out|${CMAKE_CURRENT_BINARY_DIR}/narrow-mesh-out" STATUS 0
                  STDERR "warning: eviction: kernel [0-9]+, class [a-z]+: 79[.]4 % of the growth mass of plants of size [^\n]*above the mesh upper bound[^\n]*raise \\[mesh\\] upper"
                  FILES "${CMAKE_CURRENT_BINARY_DIR}/narrow-mesh-out/eviction.csv|${CMAKE_CURRENT_BINARY_DIR}/narrow-mesh-out/mesh_check.csv|${CMAKE_CURRENT_BINARY_DIR}/narrow-mesh-out/reducibility.csv")

# Interrupted and killed runs (SIGINT, SIGTERM, SIGKILL) leave the previous output folder
# unchanged and no partial folder after the next run; files follow the umask.
add_test(NAME cli:interrupted-run-keeps-previous-folder
         COMMAND sh ${CMAKE_CURRENT_SOURCE_DIR}/cli/interrupt.sh $<TARGET_FILE:safesite>
                 ${PROJECT_SOURCE_DIR} ${CMAKE_CURRENT_BINARY_DIR}/interrupt)
set_tests_properties(cli:interrupted-run-keeps-previous-folder PROPERTIES LABELS cli TIMEOUT 120)

# Each warning is printed once (a run whose fits warn; no replicates).
add_test(NAME cli:warnings-printed-once
         COMMAND sh ${CMAKE_CURRENT_SOURCE_DIR}/cli/warnings_once.sh $<TARGET_FILE:safesite>
                 ${PROJECT_SOURCE_DIR} ${CMAKE_CURRENT_BINARY_DIR}/warnings-once)
set_tests_properties(cli:warnings-printed-once PROPERTIES LABELS cli TIMEOUT 300)

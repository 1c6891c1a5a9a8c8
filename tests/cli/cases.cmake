# End-to-end cases for the built `safesite` program (CTest label "cli").
# Each case: arguments, expected exit status (WILL_FAIL for non-zero) and an output pattern.
set(SAFESITE_EXE $<TARGET_FILE:safesite>)

add_test(NAME cli:help COMMAND ${SAFESITE_EXE} --help)
set_tests_properties(cli:help PROPERTIES LABELS cli PASS_REGULAR_EXPRESSION "Usage")

add_test(NAME cli:no-arguments-is-usage-error COMMAND ${SAFESITE_EXE})
set_tests_properties(cli:no-arguments-is-usage-error PROPERTIES LABELS cli WILL_FAIL TRUE)

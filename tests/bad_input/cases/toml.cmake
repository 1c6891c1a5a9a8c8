# Model files that broke internal checks of the TOML library (issue 11, found by fuzzing;
# lib/src/spec/detail/checked_toml.hpp): each is a TOML syntax error at its line and column.
safesite_bad_input(NAME toml-keyless-header ARGS "check|inputs/toml-keyless-header.toml"
                   STATUS 3 FIRST "^safesite: error: inputs/toml-keyless-header.toml:2:2: ")
safesite_bad_input(NAME toml-array-closed-by-brace
                   ARGS "check|inputs/toml-array-closed-by-brace.toml" STATUS 3
                   FIRST "^safesite: error: inputs/toml-array-closed-by-brace.toml:27:43: ")
safesite_bad_input(NAME toml-letter-after-value ARGS "check|inputs/toml-letter-after-value.toml"
                   STATUS 3 FIRST "^safesite: error: inputs/toml-letter-after-value.toml:21:13: ")
safesite_bad_input(NAME toml-datetime-without-time
                   ARGS "check|inputs/toml-datetime-without-time.toml" STATUS 3
                   FIRST "^safesite: error: inputs/toml-datetime-without-time.toml:21:")

# Bad command lines (exit 2): the verb's usage follows the error line.
safesite_bad_input(NAME cli-unknown-verb ARGS "grow" STATUS 2
                   FIRST "^safesite: error: .*grow")
safesite_bad_input(NAME cli-threads-zero ARGS "run|models/ridge.toml|--threads|0" STATUS 2
                   FIRST "^safesite: error: .*--threads")

# Matrix export (area "export"): a non-boolean [output] matrices stops before any output.
safesite_bad_input(NAME export-matrices-not-boolean
                   ARGS "eval|inputs/export-matrices-not-boolean.toml|--out|out" STATUS 3
                   FIRST "^safesite: error: inputs/export-matrices-not-boolean.toml:61:[0-9]+: .*matrices")

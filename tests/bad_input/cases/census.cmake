# Bad census files and [census] keys (exit 3): each case checks the file:line:column of the
# first error line (docs/errors.md, "Census"). Inputs: tests/bad_input/inputs/census-*.

# a header and no rows
safesite_bad_input(NAME census-no-rows ARGS "check|inputs/census-no-rows.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-no-rows.csv:1: .*no data rows")
# a comment, a header and no rows
safesite_bad_input(NAME census-no-rows-comment ARGS "check|inputs/census-no-rows-comment.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-no-rows-comment.csv:2: .*no data rows")
# an empty file (0 bytes)
safesite_bad_input(NAME census-empty ARGS "check|inputs/census-empty.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-empty.csv: .*empty")
# the census path is a folder
safesite_bad_input(NAME census-folder ARGS "check|inputs/census-folder.toml" STATUS 3
                   FIRST "^safesite: error: demo: .*folder")
# the census file does not exist
safesite_bad_input(NAME census-missing-file ARGS "check|inputs/census-missing-file.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-absent.csv: .*no such file")
# binary data (a NUL byte on line 3)
safesite_bad_input(NAME census-binary ARGS "check|inputs/census-binary.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-binary.csv:3: .*NUL")
# UTF-16 text with its byte-order mark
safesite_bad_input(NAME census-utf16 ARGS "check|inputs/census-utf16.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-utf16.csv:1: .*UTF-16")
# BOM and CRLF are accepted; the decimal comma on line 3 is not
safesite_bad_input(NAME census-bom-crlf ARGS "check|inputs/census-bom-crlf.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-bom-crlf.csv:3:5: size \"3,1\" is not a number")
# old Mac line ends (lone CR)
safesite_bad_input(NAME census-lone-cr ARGS "check|inputs/census-lone-cr.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-lone-cr.csv:1: .*carriage return")
# no status column
safesite_bad_input(NAME census-missing-column ARGS "check|inputs/census-missing-column.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-missing-column.csv:1: required column \"status\"")
# the size column twice
safesite_bad_input(NAME census-duplicate-column ARGS "check|inputs/census-duplicate-column.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-duplicate-column.csv:1:8: column name \"size\" appears twice")
# a plant with two rows in one year
safesite_bad_input(NAME census-duplicate-row ARGS "check|inputs/census-duplicate-row.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-duplicate-row.csv:8: plant \"A1\" has another row for 2020")
# year not a whole number
safesite_bad_input(NAME census-year-text ARGS "check|inputs/census-year-text.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-year-text.csv:3:2: year \"2020a\" is not a whole number")
# NA as a year
safesite_bad_input(NAME census-year-na ARGS "check|inputs/census-year-na.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-year-na.csv:3:2: year \"NA\" looks like a missing-value marker")
# status misspelt
safesite_bad_input(NAME census-bad-status ARGS "check|inputs/census-bad-status.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-bad-status.csv:3:6: status \\\"alvie\\\" is not one of .*did you mean 'alive'")
# status empty
safesite_bad_input(NAME census-status-empty ARGS "check|inputs/census-status-empty.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-status-empty.csv:3:6: status is empty")
# size 0 with the log transform
safesite_bad_input(NAME census-size-zero-log ARGS "check|inputs/census-size-zero-log.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-size-zero-log.csv:3:5: size \"0\" cannot be transformed by log")
# a negative size with the log transform
safesite_bad_input(NAME census-size-negative ARGS "check|inputs/census-size-negative.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-size-negative.csv:4:5: size \"-1.5\" cannot be transformed by log")
# NA as the size of a living plant
safesite_bad_input(NAME census-size-na ARGS "check|inputs/census-size-na.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-size-na.csv:4:5: size \"NA\" is read as text, not as a missing value")
# flowered not 0/1
safesite_bad_input(NAME census-flowered-2 ARGS "check|inputs/census-flowered-2.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-flowered-2.csv:2:7: flowered \"2\" is not a flag")
# a negative seed count
safesite_bad_input(NAME census-seeds-negative ARGS "check|inputs/census-seeds-negative.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-seeds-negative.csv:3:8: seeds \"-14\" is negative")
# NA as a seed count (an empty cell means not counted)
safesite_bad_input(NAME census-seeds-na ARGS "check|inputs/census-seeds-na.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-seeds-na.csv:3:8: seeds \"NA\" is read as text, not as a missing value. .*leave the cell empty")
# a seed count with decimals
safesite_bad_input(NAME census-seeds-decimal ARGS "check|inputs/census-seeds-decimal.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-seeds-decimal.csv:3:8: seeds \"14.5\" is not a whole number")
# seeds on a plant that did not flower
safesite_bad_input(NAME census-seeds-no-flower ARGS "check|inputs/census-seeds-no-flower.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-seeds-no-flower.csv:2:8: plant \"A1\" has 5 seeds")
# seedling flag not 0/1
safesite_bad_input(NAME census-seedling-flag ARGS "check|inputs/census-seedling-flag.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-seedling-flag.csv:2:9: seedling \"yes\" is not a flag")
# a microsite label not in [microsites]
safesite_bad_input(NAME census-unknown-microsite ARGS "check|inputs/census-unknown-microsite.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-unknown-microsite.csv:4:4: microsite \\\"cushoin\\\" is not one of .*did you mean 'cushion'")
# a plant changes microsite
safesite_bad_input(NAME census-microsite-changed ARGS "check|inputs/census-microsite-changed.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-microsite-changed.csv:3: plant \"A1\" is in \"cushion\" in 2020")
# a plant changes plot
safesite_bad_input(NAME census-plot-changed ARGS "check|inputs/census-plot-changed.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-plot-changed.csv:3: plant \"A1\" is in plot \"P2\" in 2020")
# a plant alive after a dead row (policy error, the default)
safesite_bad_input(NAME census-alive-after-dead ARGS "check|inputs/census-alive-after-dead.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-alive-after-dead.csv:5: plant \"A2\" is alive in 2020 but was recorded dead in 2019 .*census.alive_after_dead = \"notfound\"")
# alive without size under alive_without_size = "error"
safesite_bad_input(NAME census-alive-no-size ARGS "check|inputs/census-alive-no-size.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-alive-no-size.csv:3:5: plant \"A1\" is alive in 2020 but has no size. .*census.alive_without_size = \"keep\"")
# a flowering plant without size and seed count (policy keep)
safesite_bad_input(NAME census-seeds-unknown ARGS "check|inputs/census-seeds-unknown.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-seeds-unknown.csv:7:5: plant \"A3\" flowered in 2020 but has no size and no seed count")
# a plant without a row in a year its plot was censused
safesite_bad_input(NAME census-missing-row ARGS "check|inputs/census-missing-row.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-missing-row.csv:2: plant \"A1\" \\(plot \"P1\"\\) has no row for 2020")
# one census year: no transitions
safesite_bad_input(NAME census-one-year ARGS "check|inputs/census-one-year.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-one-year.csv: census years: 1")
# a row with one field too many
safesite_bad_input(NAME census-ragged-row ARGS "check|inputs/census-ragged-row.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-ragged-row.csv:4:10: row has 10 fields. expected 9")
# a quoted field never closed
safesite_bad_input(NAME census-unclosed-quote ARGS "check|inputs/census-unclosed-quote.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-unclosed-quote.csv:6:4: quoted field is not closed")
# a 5000-character size (echoed shortened)
safesite_bad_input(NAME census-long-value ARGS "check|inputs/census-long-value.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-long-value.csv:3:5: size \"3\\.1xxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxx.*\\(5000 characters\\) is not a number")
# neighbour_size 0
safesite_bad_input(NAME census-neighbour-size-zero ARGS "check|inputs/census-neighbour-size-zero.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-neighbour-size-zero.csv:4:10: neighbour_size \"0\" is not positive")
# an unknown value for census.alive_after_dead
safesite_bad_input(NAME census-policy-bad-value ARGS "check|inputs/census-policy-bad-value.toml" STATUS 3
                   FIRST "^safesite: error: inputs/census-policy-bad-value.toml:.*alive_after_dead")

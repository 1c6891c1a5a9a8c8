# Bad trapping and retention files (exit 3), read by `check` with [arrival] method =
# "experiments" (docs/errors.md, "Seed experiments"). Inputs: tests/bad_input/inputs/
# trapping-* and retention-*; the census is the demo one.

# a header and no rows
safesite_bad_input(NAME trapping-no-rows ARGS "check|inputs/trapping-no-rows.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-no-rows.csv:1: the trapping file has a header but no data rows")
# trapped > launched
safesite_bad_input(NAME trapping-trapped-over ARGS "check|inputs/trapping-trapped-over.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-trapped-over.csv:3:6: trapped \"25\" of neighbour \"n1\"")
# launched 0
safesite_bad_input(NAME trapping-launched-zero ARGS "check|inputs/trapping-launched-zero.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-launched-zero.csv:3:5: launched \"0\"")
# a form not among the neighbour microsites
safesite_bad_input(NAME trapping-unknown-form ARGS "check|inputs/trapping-unknown-form.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-unknown-form.csv:4:2: form \"shrub\"")
# the bare-soil microsite as a form
safesite_bad_input(NAME trapping-bare-form ARGS "check|inputs/trapping-bare-form.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-bare-form.csv:4:2: form \"gravel\"")
# a neighbour given two forms
safesite_bad_input(NAME trapping-two-forms ARGS "check|inputs/trapping-two-forms.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-two-forms.csv:3:2: neighbour \"n1\" has form \"tussock\"")
# the same neighbour and seed type twice
safesite_bad_input(NAME trapping-duplicate ARGS "check|inputs/trapping-duplicate.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-duplicate.csv:6:4: neighbour \"n1\" and seed type \"winged\" already have a trial on line 2")
# no trapped column
safesite_bad_input(NAME trapping-missing-column ARGS "check|inputs/trapping-missing-column.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-missing-column.csv:1: required column \"trapped\"")
# NA as a count
safesite_bad_input(NAME trapping-na ARGS "check|inputs/trapping-na.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-na.csv:3:6: trapped \"NA\" looks like a missing-value marker")
# a negative neighbour size
safesite_bad_input(NAME trapping-size-negative ARGS "check|inputs/trapping-size-negative.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-size-negative.csv:2:3: neighbour_size \"-12.5\"")
# the trapping path is a folder
safesite_bad_input(NAME trapping-folder ARGS "check|inputs/trapping-folder.toml" STATUS 3
                   FIRST "^safesite: error: demo: .*folder")
# binary data
safesite_bad_input(NAME trapping-binary ARGS "check|inputs/trapping-binary.toml" STATUS 3
                   FIRST "^safesite: error: inputs/trapping-binary.csv:2: .*NUL")
# a comment, a header and no rows
safesite_bad_input(NAME retention-no-rows ARGS "check|inputs/retention-no-rows.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-no-rows.csv:2: the retention file has a header but no data rows")
# present not 0/1
safesite_bad_input(NAME retention-present-2 ARGS "check|inputs/retention-present-2.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-present-2.csv:3:6: present \"2\" is not a flag")
# a check day going backwards
safesite_bad_input(NAME retention-day-backwards ARGS "check|inputs/retention-day-backwards.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-day-backwards.csv:4:5: seed \"s1\": day \"2\" does not follow day 3")
# a seed whose first check is not day 0
safesite_bad_input(NAME retention-no-day0 ARGS "check|inputs/retention-no-day0.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-no-day0.csv:5:5: seed \"s2\" has no day-0 placement")
# a seed absent at placement
safesite_bad_input(NAME retention-absent-day0 ARGS "check|inputs/retention-absent-day0.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-absent-day0.csv:5:6: seed \"s2\" is absent at day 0")
# a seed present again after it was absent
safesite_bad_input(NAME retention-returns ARGS "check|inputs/retention-returns.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-returns.csv:7:6: seed \"s1\" is present again")
# a seed changing station
safesite_bad_input(NAME retention-station-changes ARGS "check|inputs/retention-station-changes.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-station-changes.csv:3:2: seed \"s1\": station \"g2\" differs")
# a microsite not in [microsites]
safesite_bad_input(NAME retention-unknown-microsite ARGS "check|inputs/retention-unknown-microsite.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-unknown-microsite.csv:5:3: seed \"s2\": microsite \"moss\"")
# a negative day
safesite_bad_input(NAME retention-day-negative ARGS "check|inputs/retention-day-negative.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-day-negative.csv:3:5: seed \"s1\": day \"-3\"")
# NA as a day
safesite_bad_input(NAME retention-day-na ARGS "check|inputs/retention-day-na.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-day-na.csv:3:5: day \"NA\" looks like a missing-value marker")
# UTF-16 text
safesite_bad_input(NAME retention-utf16 ARGS "check|inputs/retention-utf16.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-utf16.csv:1: .*UTF-16")
# the retention file does not exist
safesite_bad_input(NAME retention-missing-file ARGS "check|inputs/retention-missing-file.toml" STATUS 3
                   FIRST "^safesite: error: inputs/retention-absent.csv: .*no such file")

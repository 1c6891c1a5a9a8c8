# The output folder (exit 3, docs/errors.md "Output folder"): it is checked before any work and
# never replaced when that could delete something that is not a run's own output. We run as
# root, so read-only folders do not stop us: paths under a regular file stand in for them.
set(_m "models/ridge.toml")
safesite_bad_input(NAME output_folder-is-a-file ARGS "run|${_m}|--out|demo/census.csv" STATUS 3
                   FIRST "^safesite: error: demo/census.csv: exists and is not a folder")
safesite_bad_input(NAME output_folder-parent-missing ARGS "run|${_m}|--out|no-such/out" STATUS 3
                   FIRST "^safesite: error: no-such/out: the folder .* does not exist")
safesite_bad_input(NAME output_folder-under-a-file ARGS "run|${_m}|--out|demo/census.csv/out"
                   STATUS 3 FIRST "^safesite: error: demo/census.csv/out: .*census.csv' is a file")
safesite_bad_input(NAME output_folder-holds-the-model ARGS "run|${_m}|--out|models" STATUS 3
                   FIRST "^safesite: error: models: holds the input")
safesite_bad_input(NAME output_folder-holds-the-census ARGS "run|${_m}|--out|demo" STATUS 3
                   FIRST "^safesite: error: demo: holds the input")
safesite_bad_input(NAME output_folder-working-folder ARGS "run|${_m}|--out|." STATUS 3
                   FIRST "^safesite: error: \\.: ")
safesite_bad_input(NAME output_folder-not-an-output-folder
                   ARGS "run|${_m}|--out|inputs/output_folder-notes" STATUS 3
                   FIRST "^safesite: error: inputs/output_folder-notes: exists, is not empty and is not a safesite output folder")
safesite_bad_input(NAME output_folder-trailing-slash-file ARGS "run|${_m}|--out|models/" STATUS 3
                   FIRST "^safesite: error: models/: holds the input")
safesite_bad_input(NAME output_folder-fit-out-is-a-file ARGS "fit|${_m}|--out|demo/census.csv"
                   STATUS 3 FIRST "^safesite: error: demo/census.csv: exists and is not a folder")
safesite_bad_input(NAME output_folder-fit-parent-missing ARGS "fit|${_m}|--out|no-such/out"
                   STATUS 3 FIRST "^safesite: error: no-such/out: ")
safesite_bad_input(NAME output_folder-check-under-a-file
                   ARGS "check|${_m}|--out|demo/census.csv/out" STATUS 3
                   FIRST "^safesite: error: demo/census.csv/out: ")
safesite_bad_input(NAME output_folder-check-holds-the-model ARGS "check|${_m}|--out|models"
                   STATUS 3 FIRST "^safesite: error: models: holds the input")

# eval --out: the same rules (the fixed-rate example needs no data).
safesite_bad_input(NAME eval-out-parent-missing
                   ARGS "eval|models/fixed-example.toml|--out|no-such/out" STATUS 3
                   FIRST "^safesite: error: no-such/out: ")
safesite_bad_input(NAME eval-out-holds-the-model ARGS "eval|models/fixed-example.toml|--out|models"
                   STATUS 3 FIRST "^safesite: error: models: holds the input")
safesite_bad_input(NAME eval-out-is-a-file
                   ARGS "eval|models/fixed-example.toml|--out|models/fixed-example.toml" STATUS 3
                   FIRST "^safesite: error: models/fixed-example.toml: exists and is not a folder")
safesite_bad_input(NAME eval-top-zero ARGS "eval|models/fixed-example.toml|--top|0" STATUS 2
                   FIRST "^safesite: error: .*--top")

# simulate --out: the same rules; the counts are checked as options.
set(_sim "simulate|models/ridge-truth.toml|--plants|10|--years|3|--seed|1")
safesite_bad_input(NAME simulate-out-parent-missing ARGS "${_sim}|--out|no-such/out" STATUS 3
                   FIRST "^safesite: error: no-such/out: ")
safesite_bad_input(NAME simulate-out-holds-the-truth ARGS "${_sim}|--out|models" STATUS 3
                   FIRST "^safesite: error: models: holds the input")
safesite_bad_input(NAME simulate-out-under-a-file ARGS "${_sim}|--out|models/ridge-truth.toml/x"
                   STATUS 3 FIRST "^safesite: error: models/ridge-truth.toml/x: ")
safesite_bad_input(NAME simulate-out-not-an-output-folder
                   ARGS "${_sim}|--out|inputs/output_folder-notes" STATUS 3
                   FIRST "^safesite: error: inputs/output_folder-notes: exists, is not empty")
safesite_bad_input(NAME simulate-years-one
                   ARGS "simulate|models/ridge-truth.toml|--plants|10|--years|1|--seed|1|--out|x"
                   STATUS 2 FIRST "^safesite: error: .*--years")
safesite_bad_input(NAME simulate-plants-zero
                   ARGS "simulate|models/ridge-truth.toml|--plants|0|--years|3|--seed|1|--out|x"
                   STATUS 2 FIRST "^safesite: error: .*--plants")

# report DIR: a folder that is not an output folder, or a damaged summary.json.
safesite_bad_input(NAME report-not-an-output-folder ARGS "report|demo" STATUS 3
                   FIRST "^safesite: error: demo/summary.json: ")
safesite_bad_input(NAME report-on-a-file ARGS "report|demo/census.csv" STATUS 3
                   FIRST "^safesite: error: demo/census.csv/summary.json: ")
safesite_bad_input(NAME report-summary-malformed ARGS "report|inputs/output_folder-damaged"
                   STATUS 3
                   FIRST "^safesite: error: inputs/output_folder-damaged/summary.json:3:1: malformed JSON")
safesite_bad_input(NAME report-summary-missing-key ARGS "report|inputs/output_folder-nokey"
                   STATUS 3
                   FIRST "^safesite: error: inputs/output_folder-nokey/summary.json: safesite_version: missing")
safesite_bad_input(NAME report-summary-short-row ARGS "report|inputs/output_folder-badrow"
                   STATUS 3
                   FIRST "^safesite: error: inputs/output_folder-badrow/summary.json: tables\\[0\\]\\.rows\\[0\\]: has 1 cells")

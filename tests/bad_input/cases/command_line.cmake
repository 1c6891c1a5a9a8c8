# Bad command lines (exit 2): the verb's usage follows the error line.
safesite_bad_input(NAME cli-unknown-verb ARGS "grow" STATUS 2
                   FIRST "^safesite: error: .*grow")
safesite_bad_input(NAME cli-threads-zero ARGS "run|models/ridge.toml|--threads|0" STATUS 2
                   FIRST "^safesite: error: .*--threads")
# Values out of range, mistyped options and verbs (exit 2, before any work; docs/cli.md
# "Ranges"). The first line names the option and the value as typed.
set(E "^safesite: error: ")
safesite_bad_input(NAME cli-replicates-negative ARGS "run|models/ridge.toml|--replicates|-1" STATUS 2
                   FIRST "${E}--replicates: value '-1' is out of range; expected an integer from 0 to 10000")
safesite_bad_input(NAME cli-replicates-huge ARGS "run|models/ridge.toml|--replicates|99999999999999999999999" STATUS 2
                   FIRST "${E}--replicates: value '99999999999999999999999' is out of range")
safesite_bad_input(NAME cli-replicates-above-limit ARGS "run|models/ridge.toml|--replicates|10001" STATUS 2
                   FIRST "${E}--replicates: value '10001' is out of range")
safesite_bad_input(NAME cli-replicates-too-few ARGS "run|models/ridge.toml|--replicates|5" STATUS 2
                   FIRST "${E}--replicates: value '5' is too few .*at least 41")
safesite_bad_input(NAME cli-replicates-text ARGS "run|models/ridge.toml|--replicates|many" STATUS 2
                   FIRST "${E}--replicates: value 'many' is not a whole number")
safesite_bad_input(NAME cli-seed-negative ARGS "run|models/ridge.toml|--seed|-1" STATUS 2
                   FIRST "${E}--seed: value '-1' is out of range; expected an integer from 0 to 9223372036854775807")
safesite_bad_input(NAME cli-seed-20-digits ARGS "run|models/ridge.toml|--seed|99999999999999999999" STATUS 2
                   FIRST "${E}--seed: value '99999999999999999999' is out of range")
safesite_bad_input(NAME cli-seed-long ARGS "run|models/ridge.toml|--seed|1234567890123456789012345678901234567890123456789012345678901234567890" STATUS 2
                   FIRST "${E}--seed: value '123456789012345678901234…' \\(70 characters\\) is out of range")
safesite_bad_input(NAME cli-seed-decimal ARGS "run|models/ridge.toml|--seed|1.5" STATUS 2
                   FIRST "${E}--seed: value '1.5' is not a whole number")
safesite_bad_input(NAME cli-threads-huge ARGS "run|models/ridge.toml|--threads|5000" STATUS 2
                   FIRST "${E}--threads: value '5000' is out of range; expected an integer from 1 to 1024")
safesite_bad_input(NAME cli-mistyped-option ARGS "run|models/ridge.toml|--replicate|5" STATUS 2
                   FIRST "${E}run: unknown option '--replicate'; did you mean '--replicates'\\?")
safesite_bad_input(NAME cli-mistyped-option-equals ARGS "run|models/ridge.toml|--sed=3" STATUS 2
                   FIRST "${E}run: unknown option '--sed'; did you mean '--seed'\\?")
safesite_bad_input(NAME cli-unknown-option ARGS "check|models/ridge.toml|--verbose" STATUS 2
                   FIRST "${E}check: unknown option '--verbose'")
safesite_bad_input(NAME cli-mistyped-verb ARGS "rnu|models/ridge.toml" STATUS 2
                   FIRST "${E}unknown verb 'rnu'; did you mean 'run'\\?")
safesite_bad_input(NAME cli-eval-top-zero ARGS "eval|models/fixed-example.toml|--top|0" STATUS 2
                   FIRST "${E}--top: value '0' is out of range; expected an integer from 1 to 1000")
safesite_bad_input(NAME cli-simulate-plants-zero
                   ARGS "simulate|models/ridge-truth.toml|--plants|0|--years|5|--seed|1|--out|sim" STATUS 2
                   FIRST "${E}--plants: value '0' is out of range")
safesite_bad_input(NAME cli-simulate-years-one
                   ARGS "simulate|models/ridge-truth.toml|--plants|10|--years|1|--seed|1|--out|sim" STATUS 2
                   FIRST "${E}--years: value '1' is out of range; expected an integer from 2 to 200")
safesite_bad_input(NAME cli-simulate-seed-negative
                   ARGS "simulate|models/ridge-truth.toml|--plants|10|--years|5|--seed|-3|--out|sim" STATUS 2
                   FIRST "${E}--seed: value '-3' is out of range")
safesite_bad_input(NAME cli-simulate-rate-above
                   ARGS "simulate|models/ridge-truth.toml|--plants|10|--years|5|--seed|1|--out|sim|--notfound-rate|1.5" STATUS 2
                   FIRST "${E}--notfound-rate: value '1.5' is out of range; expected a number from 0 to 0.99")
safesite_bad_input(NAME cli-simulate-rate-nan
                   ARGS "simulate|models/ridge-truth.toml|--plants|10|--years|5|--seed|1|--out|sim|--missing-seed-rate|nan" STATUS 2
                   FIRST "${E}--missing-seed-rate: value 'nan' is out of range")
unset(E)

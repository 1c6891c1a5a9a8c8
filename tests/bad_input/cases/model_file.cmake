# Bad model files (exit 3): the first line pins file:line:column, the column pointing into the
# user's own formula text (docs/errors.md, "Model file"). Inputs: tests/bad_input/inputs/model-*.
set(E "^safesite: error: inputs/model-")
# Formulas: syntax, columns, kinds, responses, levels (read time, every verb).
safesite_bad_input(NAME model-formula-typo-check ARGS "check|inputs/model-formula-typo.toml"
                   STATUS 3 FIRST "${E}formula-typo.toml:25:23: 'rates.flowering.formula'.*'sise'.*did you mean 'size'")
safesite_bad_input(NAME model-formula-typo-fit ARGS "fit|inputs/model-formula-typo.toml"
                   STATUS 3 FIRST "${E}formula-typo.toml:25:23: 'rates.flowering.formula'")
safesite_bad_input(NAME model-formula-typo-run ARGS "run|inputs/model-formula-typo.toml|--out|out"
                   STATUS 3 FIRST "${E}formula-typo.toml:25:23: 'rates.flowering.formula'")
safesite_bad_input(NAME model-formula-trailing-plus ARGS "fit|inputs/model-formula-trailing-plus.toml"
                   STATUS 3 FIRST "${E}formula-trailing-plus.toml:17:29: 'rates.survival.formula'.*character 18: expected a term")
safesite_bad_input(NAME model-formula-candidate-typo ARGS "check|inputs/model-formula-candidate-typo.toml"
                   STATUS 3 FIRST "${E}formula-candidate-typo.toml:18:53: 'rates.survival.candidates\\[2\\]'.*'microsite'")
safesite_bad_input(NAME model-formula-open-paren ARGS "check|inputs/model-formula-open-paren.toml"
                   STATUS 3 FIRST "${E}formula-open-paren.toml:17:40: 'rates.survival.formula'.*expected '\\)'")
safesite_bad_input(NAME model-formula-unknown-function ARGS "check|inputs/model-formula-unknown-function.toml"
                   STATUS 3 FIRST "${E}formula-unknown-function.toml:21:24: 'rates.growth.formula'.*'sqrt'")
safesite_bad_input(NAME model-formula-wrong-response ARGS "check|inputs/model-formula-wrong-response.toml"
                   STATUS 3 FIRST "${E}formula-wrong-response.toml:29:12: 'rates.seeds.formula'.*'seeds'")
safesite_bad_input(NAME model-formula-no-terms ARGS "check|inputs/model-formula-no-terms.toml"
                   STATUS 3 FIRST "${E}formula-no-terms.toml:29:19: 'rates.seeds.formula'")
safesite_bad_input(NAME model-formula-log-factor ARGS "check|inputs/model-formula-log-factor.toml"
                   STATUS 3 FIRST "${E}formula-log-factor.toml:21:28: 'rates.growth.formula'.*categorical")
safesite_bad_input(NAME model-formula-missing-column ARGS "check|inputs/model-formula-missing-column.toml"
                   STATUS 3 FIRST "${E}formula-missing-column.toml:25:30: 'rates.flowering.formula'.*'size_next'")
safesite_bad_input(NAME model-formula-escaped ARGS "check|inputs/model-formula-escaped.toml"
                   STATUS 3 FIRST "${E}formula-escaped.toml:25:11: 'rates.flowering.formula'.*character 12")
safesite_bad_input(NAME model-formula-ref-level ARGS "check|inputs/model-formula-ref-level.toml"
                   STATUS 3 FIRST "${E}formula-ref-level.toml:17:45: 'rates.survival.formula'.*did you mean 'gravel'")
safesite_bad_input(NAME model-formula-trapping-typo ARGS "check|inputs/model-formula-trapping-typo.toml"
                   STATUS 3 FIRST "${E}formula-trapping-typo.toml:43:71: 'arrival.trapping_formula'.*'seed_type'")
safesite_bad_input(NAME model-formula-trapping-term ARGS "check|inputs/model-formula-trapping-term.toml"
                   STATUS 3 FIRST "${E}formula-trapping-term.toml:43:49: 'arrival.trapping_formula'.*'launched'")
safesite_bad_input(NAME model-formula-retention-level ARGS "check|inputs/model-formula-retention-level.toml"
                   STATUS 3 FIRST "${E}formula-retention-level.toml:44:44: 'arrival.retention_formula'.*'cushion'")
# Levels known only from the data: check and fit resolve them after reading, before fitting.
safesite_bad_input(NAME model-formula-ref-plot-check ARGS "check|inputs/model-formula-ref-plot.toml"
                   STATUS 3 FIRST "${E}formula-ref-plot.toml:17:40: 'rates.survival.formula'.*'P99'")
safesite_bad_input(NAME model-formula-ref-plot-fit ARGS "fit|inputs/model-formula-ref-plot.toml"
                   STATUS 3 FIRST "${E}formula-ref-plot.toml:17:40: 'rates.survival.formula'.*'P99'")
safesite_bad_input(NAME model-formula-seed-type-level ARGS "check|inputs/model-formula-seed-type-level.toml"
                   STATUS 3 FIRST "${E}formula-seed-type-level.toml:43:64: 'arrival.trapping_formula'.*'bristly'")
# [uncertainty]: replicates and seed.
safesite_bad_input(NAME model-replicates-one ARGS "run|inputs/model-replicates-one.toml|--out|out"
                   STATUS 3 FIRST "${E}replicates-one.toml:39:14: 'uncertainty.replicates' = 1 .*41")
safesite_bad_input(NAME model-replicates-huge ARGS "run|inputs/model-replicates-huge.toml|--out|out"
                   STATUS 3 FIRST "${E}replicates-huge.toml:39:14: 'uncertainty.replicates'.*10000")
safesite_bad_input(NAME model-replicates-few-for-level ARGS "check|inputs/model-replicates-few-for-level.toml"
                   STATUS 3 FIRST "${E}replicates-few-for-level.toml:39:14: 'uncertainty.replicates'.*201")
safesite_bad_input(NAME model-seed-negative ARGS "check|inputs/model-seed-negative.toml"
                   STATUS 3 FIRST "${E}seed-negative.toml:39:8: 'uncertainty.seed'")
safesite_bad_input(NAME model-level-out-of-range ARGS "check|inputs/model-level-out-of-range.toml"
                   STATUS 3 FIRST "${E}level-out-of-range.toml:39:9: 'uncertainty.level'")
# [mesh]: memory limit, unknown keys, wrong types.
safesite_bad_input(NAME model-mesh-too-big ARGS "run|inputs/model-mesh-too-big.toml|--out|out"
                   STATUS 3 FIRST "${E}mesh-too-big.toml:9:10: 'mesh.points' = 10000 .*GB.*1265 points")
safesite_bad_input(NAME model-mesh-huge ARGS "check|inputs/model-mesh-huge.toml"
                   STATUS 3 FIRST "${E}mesh-huge.toml:9:10: 'mesh.points' = 10000000 ")
safesite_bad_input(NAME model-mesh-unknown-key ARGS "check|inputs/model-mesh-unknown-key.toml"
                   STATUS 3 FIRST "${E}mesh-unknown-key.toml:10:1: unknown key 'mesh.point'.*'points'")
safesite_bad_input(NAME model-mesh-wrong-type ARGS "check|inputs/model-mesh-wrong-type.toml"
                   STATUS 3 FIRST "${E}mesh-wrong-type.toml:9:10: 'mesh.points' must be an integer")
unset(E)
# fit reads the seed experiments before fitting, so a level only they lack stops it first.
safesite_bad_input(NAME model-formula-seed-type-level-fit ARGS "fit|inputs/model-formula-seed-type-level.toml"
                   STATUS 3 FIRST "^safesite: error: inputs/model-formula-seed-type-level.toml:43:64: 'arrival.trapping_formula'.*'bristly'")

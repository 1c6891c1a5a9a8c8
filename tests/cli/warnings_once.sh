#!/bin/sh
# Each warning is printed once (issue 11: `run` printed every fit warning twice, because the
# analysis's warnings begin with the fit's). Usage: warnings_once.sh SAFESITE SOURCE_DIR SCRATCH
# A small simulated census (60 plants, 3 years, seed 2) fitted with the demo model gives
# rank-deficiency warnings (no tussock plants in some fits); no replicates.
set -u
exe=$1; src=$2; d=$3
fail() { echo "FAIL: $*"; exit 1; }
rm -rf "$d"; mkdir -p "$d"; cd "$d" || fail "scratch"
"$exe" simulate "$src/models/ridge-truth.toml" --plants 60 --years 3 --seed 2 --burn-in 2 \
    --out sim >/dev/null || fail "simulate"
sed -e 's#census = "../demo/census.csv"#census = "sim/census.csv"#' \
    -e "s#\"\\.\\./demo/#\"$src/demo/#g" -e 's/^replicates = [0-9]*/replicates = 0/' \
    "$src/models/ridge.toml" > m.toml
"$exe" run m.toml --out out >/dev/null 2>err || { cat err; fail "run"; }
n=$(grep -c "^safesite: warning: " err)
[ "$n" -ge 1 ] || fail "no warning to check (the simulated census changed?)"
dups=$(grep "^safesite: warning: " err | sort | uniq -d)
[ -z "$dups" ] || fail "printed twice: $dups"
# The "warnings" list of summary.json (before its "tables") holds them once too.
dupj=$(awk '/"tables":/ {exit} /rank deficient/' out/summary.json | sort | uniq -d)
[ -z "$dupj" ] || fail "twice in summary.json: $dupj"
cd / && rm -rf "$d"
echo "ok ($n warnings, each once)"

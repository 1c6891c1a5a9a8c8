#!/bin/sh
# README command (a): the main job on the bundled demo (invented data: the rosette forb
# Ventaria ficta on the invented Corvane Ridge; census and seed experiments simulated from
# models/ridge-truth-experiments.toml).
# Argument: the safesite binary (default build/cli/safesite).
set -e
SAFESITE=${1:-build/cli/safesite}
case "$SAFESITE" in
    /*) ;;
    *) SAFESITE="$(pwd)/$SAFESITE" ;;
esac
cd "$(dirname "$0")/.."

echo "== safesite check models/ridge.toml   (validate and summarise the census and the seed experiments)"
"$SAFESITE" check models/ridge.toml
echo
echo "== safesite fit models/ridge.toml     (vital-rate, trapping and retention fits; the arrival chain)"
"$SAFESITE" fit models/ridge.toml
echo
echo "== safesite run models/ridge.toml --out demo-out   (λ per census year, scenarios, 99 bootstrap replicates; files in demo-out/)"
"$SAFESITE" run models/ridge.toml --out demo-out
echo
echo "== the truth the demo data were simulated from (compare with the fits above)"
echo "-- true arrival chain (demo/truth-arrival.csv)"
cat demo/truth-arrival.csv
echo "-- true departure hazards per day (demo/truth-hazards.csv)"
cat demo/truth-hazards.csv
echo "-- λ of the true year kernels (demo/truth-lambda.csv)"
cat demo/truth-lambda.csv
echo
echo "== safesite eval models/fixed-example.toml   (a model without data)"
"$SAFESITE" eval models/fixed-example.toml

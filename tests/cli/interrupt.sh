#!/bin/sh
# Interrupted and killed runs leave the previous output folder intact (docs/formats.md "Output
# folder"). Usage: interrupt.sh SAFESITE SOURCE_DIR SCRATCH
#   SIGINT and SIGTERM during `safesite run` on the demo: exit 130 and 143, the previous folder
#   unchanged, no temporary left; SIGKILL: the previous folder unchanged, and a temporary folder
#   left by the killed process (planted under its pid, as a kill during the writing leaves
#   one) is removed by the next run into the same parent. Also: files follow the umask.
set -u
exe=$1; src=$2; d=$3
fail() { echo "FAIL: $*"; exit 1; }
rm -rf "$d"; mkdir -p "$d"
cd "$src" || fail "no source folder"

# The previous output folder (a quick fixed-rate evaluation).
"$exe" eval models/fixed-example.toml --out "$d/out" >/dev/null || fail "eval"
snap() { (cd "$d/out" && find . -type f -exec sha256sum {} + | sort); }
before=$(snap)

for sig in INT TERM KILL; do
    "$exe" run models/ridge.toml --out "$d/out" --replicates 200 --threads 1 \
        >/dev/null 2>"$d/err-$sig" &
    pid=$!
    sleep 1
    kill -s "$sig" "$pid"
    wait "$pid"; status=$?
    case $sig in
        INT) [ "$status" -eq 130 ] || fail "SIGINT: exit $status, expected 130"
             grep -q "^safesite: error: interrupted by SIGINT" "$d/err-$sig" || fail "SIGINT message" ;;
        TERM) [ "$status" -eq 143 ] || fail "SIGTERM: exit $status, expected 143" ;;
        KILL) [ "$status" -eq 137 ] || fail "SIGKILL: exit $status, expected 137" ;;
    esac
    [ "$(snap)" = "$before" ] || fail "$sig changed the previous folder"
    if [ "$sig" != KILL ]; then
        [ -z "$(ls -A "$d" | grep safesite-)" ] || fail "$sig left a temporary: $(ls -A "$d")"
    fi
done

# What a SIGKILL during the writing leaves: a partial folder under the dead process's pid.
stale="$d/.out.safesite-writing-$pid-abcdef"
mkdir -p "$stale" && echo "half" > "$stale/lambda.csv"
"$exe" eval models/fixed-example.toml --out "$d/out" >/dev/null || fail "eval after the kill"
[ ! -e "$stale" ] || fail "the stale temporary folder of pid $pid was not removed"
[ -z "$(ls -A "$d" | grep safesite-)" ] || fail "temporaries left: $(ls -A "$d")"
[ -f "$d/out/growth_rate.csv" ] || [ -f "$d/out/.safesite-output" ] || fail "no new folder"

# Files and folders follow the umask.
(umask 077 && "$exe" eval models/fixed-example.toml --out "$d/private" >/dev/null) || fail "umask run"
[ "$(stat -c %a "$d/private")" = 700 ] || fail "folder mode $(stat -c %a "$d/private")"
for f in "$d"/private/*.csv; do
    [ "$(stat -c %a "$f")" = 600 ] || fail "file mode $(stat -c %a "$f") of $f"
done
(umask 022 && "$exe" eval models/fixed-example.toml --out "$d/shared" >/dev/null) || fail "umask 022"
[ "$(stat -c %a "$d/shared")" = 755 ] || fail "folder mode $(stat -c %a "$d/shared")"
rm -rf "$d"
echo "ok"

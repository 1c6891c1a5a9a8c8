#!/bin/sh
# The HTML report in a real browser (CTest label "browser"): run safesite on the demo model,
# open report.html in headless Chromium through a small wrapper page and check that
#   - the page renders with no console message at all (the report has no scripts, so any
#     message is the browser's: a failed resource, a parse or security error),
#   - every figure of the file is in the rendered page and its drawing has a non-zero size,
#   - the page loaded no resource, refers to none and runs no script (it is self-contained).
# The report itself is untouched; the wrapper (written here, in a scratch folder) iframes it
# and writes its measurements into its own DOM, which --dump-dom prints.
# Arguments: the safesite program, the source folder. Exit 77 (skipped) without Chromium.
set -eu
SAFESITE=$1
SOURCE=$2
BROWSER=""
for b in chromium chromium-browser; do
    if command -v "$b" >/dev/null 2>&1; then BROWSER=$(command -v "$b"); break; fi
done
if [ -z "$BROWSER" ]; then
    echo "browser test skipped: no chromium on PATH (Debian package chromium)"
    exit 77
fi

SCRATCH=$(mktemp -d "${TMPDIR:-/tmp}/safesite-browser.XXXXXX")
trap 'rm -rf "$SCRATCH"' EXIT INT TERM
fail() { echo "browser test FAILED: $*"; exit 1; }

cd "$SOURCE"
# 41 replicates: the fewest the run accepts at level 0.95 (the interval whiskers are drawn).
"$SAFESITE" run models/ridge.toml --replicates 41 --threads 2 --out "$SCRATCH/out" \
    >"$SCRATCH/run.out" 2>"$SCRATCH/run.err" || { cat "$SCRATCH/run.err"; fail "safesite run"; }
[ -f "$SCRATCH/out/report.html" ] || fail "no report.html written"
FIGURES=$(grep -c '<figure id=' "$SCRATCH/out/report.html" || true)
[ "$FIGURES" -gt 0 ] || fail "the report has no figure"

cat >"$SCRATCH/out/browser-check.html" <<'HTML'
<!DOCTYPE html>
<html><head><meta charset="utf-8"><title>browser check</title></head>
<body>
<pre id="result">not measured</pre>
<iframe id="report" src="report.html" style="width:1100px;height:900px"></iframe>
<script>
document.getElementById("report").addEventListener("load", function () {
  var out = [];
  try {
    var doc = this.contentDocument;
    out.push("figures " + doc.querySelectorAll("figure").length);
    doc.querySelectorAll("figure").forEach(function (fig) {
      var el = fig.querySelector("svg, img");
      var r = el ? el.getBoundingClientRect() : { width: 0, height: 0 };
      out.push("box " + fig.id + " " + r.width.toFixed(1) + " " + r.height.toFixed(1));
    });
    out.push("resources " + this.contentWindow.performance.getEntriesByType("resource").length);
    out.push("external " + doc.querySelectorAll(
        "[src], link, object, embed, iframe, image, use, [style*='url(']").length);
    out.push("scripts " + doc.scripts.length);
    out.push("end");
  } catch (e) {
    out.push("error " + e);
  }
  document.getElementById("result").textContent = out.join("\n");
});
</script>
</body></html>
HTML

mkdir "$SCRATCH/profile"
timeout 60 "$BROWSER" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
    --disable-background-networking --disable-component-update --disable-sync \
    --user-data-dir="$SCRATCH/profile" --allow-file-access-from-files \
    --enable-logging=stderr --v=0 --virtual-time-budget=10000 \
    --dump-dom "file://$SCRATCH/out/browser-check.html" \
    >"$SCRATCH/dom.html" 2>"$SCRATCH/browser.err" || fail "chromium did not finish"

# Console messages: Chromium logs them as "...:CONSOLE:<line>] "<text>", source: <url> (<line>)".
if grep -q ':CONSOLE' "$SCRATCH/browser.err"; then
    grep ':CONSOLE' "$SCRATCH/browser.err"
    fail "console messages while rendering the report"
fi

RESULT=$(sed -n '/<pre id="result">/,/<\/pre>/p' "$SCRATCH/dom.html" |
         sed -e 's/<pre id="result">//' -e 's/<\/pre>.*//')
echo "$RESULT"
echo "$RESULT" | grep -q '^end$' || fail "the wrapper could not measure the report"
[ "$(echo "$RESULT" | sed -n 's/^figures //p')" = "$FIGURES" ] ||
    fail "the rendered page does not hold the $FIGURES figures of the file"
EMPTY=$(echo "$RESULT" | awk '/^box / && ($3 + 0 <= 0 || $4 + 0 <= 0) { print $2 }')
[ -z "$EMPTY" ] || fail "figures of zero size: $EMPTY"
[ "$(echo "$RESULT" | sed -n 's/^resources //p')" = "0" ] || fail "the report loaded resources"
[ "$(echo "$RESULT" | sed -n 's/^external //p')" = "0" ] ||
    fail "the report refers to external resources"
[ "$(echo "$RESULT" | sed -n 's/^scripts //p')" = "0" ] || fail "the report holds scripts"
echo "browser test passed: $FIGURES figures rendered with non-zero size, no console message"

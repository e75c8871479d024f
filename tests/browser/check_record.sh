#!/usr/bin/env bash
# Open an HTML audit record in headless Chromium (Debian's `chromium` package):
# fail on any console message (the record has no scripts, so any message means
# a broken page), fail on references to outside resources, and keep a
# screenshot under target/browser/ for people to look at.
#
# Usage: tests/browser/check_record.sh [WORKSHEET]   (run from the repository root)
set -euo pipefail

root="$(cd "$(dirname "$0")/../.." && pwd)"
cd "$root"
sheet="${1:-tests/browser/review_sample.sicc}"
out="target/browser"
mkdir -p "$out"
passed=0
failed=0
pass() { echo "ok: $1"; passed=$((passed + 1)); }
fail() { echo "FAILED: $1" >&2; failed=$((failed + 1)); }

if ! command -v chromium >/dev/null 2>&1; then
    echo "installing Debian's chromium package"
    apt-get update -qq
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null
fi

cargo build --quiet --bin siccant
bin="target/debug/siccant"

# Exit 0 (all checks pass) and 3 (a check fails) both write a record.
set +e
"$bin" record "$sheet" -o "$out/record.html" --reproducible
code=$?
"$bin" record "$sheet" -o "$out/record-again.html" --reproducible >/dev/null
set -e
if [ "$code" -eq 0 ] || [ "$code" -eq 3 ]; then pass "record written (exit $code)"; else fail "siccant record exited $code"; fi

if cmp -s "$out/record.html" "$out/record-again.html"; then
    pass "two --reproducible records are byte-identical"
else
    fail "two --reproducible records differ"
fi

if [ ! -s "$out/record.html" ]; then
    fail "no record at $out/record.html"
elif grep -Eiq '(src|href)=["'"'"']?(https?:)?//|@import|url\(' "$out/record.html"; then
    fail "the record refers to outside resources"
else
    pass "the record is self-contained"
fi

profile="$(mktemp -d)"
trap 'rm -rf "$profile"' EXIT
log="$out/chromium.log"
page="file://$root/$out/record.html"
timeout 120 chromium --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
    --disable-background-networking --disable-component-update --disable-sync \
    --user-data-dir="$profile" --enable-logging=stderr --v=0 \
    --window-size=1100,5200 --screenshot="$root/$out/record.png" "$page" 2>"$log" || true

if [ -s "$out/record.png" ]; then pass "screenshot saved to $out/record.png"; else fail "no screenshot"; fi
if grep -q 'CONSOLE' "$log"; then
    grep 'CONSOLE' "$log" >&2
    fail "console messages while opening the record"
else
    pass "no console messages"
fi

echo "browser check: $passed passed, $failed failed"
[ "$failed" -eq 0 ]

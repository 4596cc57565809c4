#!/usr/bin/env bash
# check-report.sh DIR
#
# Renders an offline HTML report (DIR/index.html and the first sample page)
# in headless Chromium and checks that
#   - the pages reference nothing outside DIR (no http(s):, protocol-relative
#     or absolute file URLs in src/href/url()) and every local link resolves,
#   - each screenshot exists and is not blank (file size and distinct colours),
#   - the browser logged no console error, uncaught exception or failed load.
# Chromium (Debian's package) is installed when /usr/bin/chromium is missing
# and we are root. Exits non-zero with a message on the first failure.
# Screenshots are kept in $CHECK_REPORT_SHOTS when set (else a temp dir).
set -euo pipefail

fail() {
  echo "check-report: FAIL: $*" >&2
  exit 1
}

[ $# -eq 1 ] || { echo "usage: check-report.sh DIR" >&2; exit 2; }
dir=$1
[ -f "$dir/index.html" ] || fail "$dir/index.html does not exist"
dir=$(cd "$dir" && pwd)

CHROMIUM=${CHROMIUM:-/usr/bin/chromium}
if [ ! -x "$CHROMIUM" ]; then
  [ "$(id -u)" -eq 0 ] || fail "$CHROMIUM is missing and only root may install it (apt-get install chromium)"
  echo "check-report: installing chromium" >&2
  export DEBIAN_FRONTEND=noninteractive
  if ! apt-get install -y -qq chromium >/dev/null 2>&1; then
    apt-get update -qq
    apt-get install -y -qq chromium >/dev/null
  fi
  [ -x "$CHROMIUM" ] || fail "chromium did not install at $CHROMIUM"
fi

pages=("$dir/index.html")
first_sample=$(find "$dir" -maxdepth 1 -name 'sample-*.html' | LC_ALL=C sort | head -n 1)
[ -n "$first_sample" ] && pages+=("$first_sample")

# Static checks on every page: nothing may be fetched from outside the
# report folder, and every local link must lead to a file in it.
for p in "$dir"/*.html; do
  if grep -Eiq '(src|href)[[:space:]]*=[[:space:]]*"?(https?:|//|file:)|url\([[:space:]]*["'"'"']?(https?:|//|file:)|@import' "$p"; then
    fail "$(basename "$p") references an external resource"
  fi
  while IFS= read -r ref; do
    target=${ref%%#*}
    [ -z "$target" ] && continue
    [ -f "$dir/$target" ] || fail "$(basename "$p") links $target, which is not in the report folder"
  done < <(grep -oE '(href|src)="[^"]*"' "$p" | sed -E 's/^(href|src)="//; s/"$//')
done

shots=${CHECK_REPORT_SHOTS:-}
if [ -z "$shots" ]; then shots=$(mktemp -d); fi
mkdir -p "$shots"

for p in "${pages[@]}"; do
  name=$(basename "$p" .html)
  png="$shots/$name.png"
  log="$shots/$name.log"
  profile=$(mktemp -d)
  rm -f "$png"
  # timeout guards against a browser that never exits. --virtual-time-budget
  # lets layout and raster finish before the screenshot (virtual time runs
  # fast on an idle page; with 2 s a long table came out half painted on a
  # loaded machine).
  status=0
  timeout 180 "$CHROMIUM" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
    --disable-background-networking --disable-component-update --disable-sync \
    --user-data-dir="$profile" --enable-logging=stderr --v=0 \
    --window-size=1280,1600 --hide-scrollbars --virtual-time-budget=10000 \
    --screenshot="$png" "file://$p" >"$log" 2>&1 || status=$?
  rm -rf "$profile"
  [ "$status" -eq 0 ] || { tail -n 20 "$log" >&2; fail "chromium exited with status $status on $name.html"; }
  [ -s "$png" ] || { tail -n 20 "$log" >&2; fail "no screenshot written for $name.html"; }

  # Console messages are logged as ...:CONSOLE(line)] "text", source: URL.
  # The report has no script, so any console line about the page, an
  # uncaught exception or a failed resource load is an error.
  if grep -E 'CONSOLE|Uncaught|Failed to load resource|net::ERR_' "$log" >"$shots/$name.errors"; then
    cat "$shots/$name.errors" >&2
    fail "browser console reported errors on $name.html"
  fi

  size=$(stat -c %s "$png")
  # A blank 1280x1600 page compresses to a few kB; text and plots do not.
  [ "$size" -gt 20000 ] || fail "screenshot of $name.html is only $size bytes: blank page?"

  if [ -x /usr/bin/python3 ]; then
    colours=$(/usr/bin/python3 - "$png" <<'PY'
import struct, sys, zlib

def colours(path):
    data = open(path, "rb").read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise SystemExit("not a PNG")
    pos, idat, w, h, ctype, depth = 8, [], 0, 0, 0, 0
    while pos < len(data):
        n, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + n]
        if kind == b"IHDR":
            w, h, depth, ctype = struct.unpack(">IIBB", body[:10])
        elif kind == b"IDAT":
            idat.append(body)
        pos += 12 + n
    if depth != 8 or ctype not in (2, 6):
        raise SystemExit("unsupported PNG: depth %d colour type %d" % (depth, ctype))
    bpp = 3 if ctype == 2 else 4
    raw = zlib.decompress(b"".join(idat))
    stride = w * bpp
    prev = bytearray(stride)
    seen = set()
    for y in range(h):
        f = raw[y * (stride + 1)]
        line = bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        if f == 1:
            for i in range(bpp, stride):
                line[i] = (line[i] + line[i - bpp]) & 255
        elif f == 2:
            line = bytearray((a + b) & 255 for a, b in zip(line, prev))
        elif f == 3:
            for i in range(stride):
                left = line[i - bpp] if i >= bpp else 0
                line[i] = (line[i] + ((left + prev[i]) >> 1)) & 255
        elif f == 4:
            for i in range(stride):
                a = line[i - bpp] if i >= bpp else 0
                b = prev[i]
                c = prev[i - bpp] if i >= bpp else 0
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pr = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[i] = (line[i] + pr) & 255
        # Every 4th row is enough to count colours.
        if y % 4 == 0:
            px = bytes(line)
            seen.update(px[i:i + 3] for i in range(0, stride, bpp))
        prev = line
    return len(seen)

print(colours(sys.argv[1]))
PY
) || fail "could not decode the screenshot of $name.html"
    # Text with anti-aliasing and coloured plot lines give hundreds of colours.
    [ "$colours" -ge 16 ] || fail "screenshot of $name.html has only $colours colours: blank page?"
  else
    colours="not counted (no /usr/bin/python3)"
  fi
  echo "check-report: ok $name.html: screenshot $png, $size bytes, $colours colours"
done

#!/usr/bin/env bash
# Renders a summary written by `plumb report` in headless Chromium (Debian's chromium package):
# the page must load with no console messages, and the screenshot must be a
# PNG of the window's size with the charts in it (many distinct colours, not a blank page).
#
#   tests/crosscheck/report_in_chromium.sh PATH_TO_PLUMB
set -euo pipefail
plumb=$1
here=$(cd "$(dirname "$0")/../.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
"$plumb" report "$here/demo-scenarios/data/jar-tests.csv" --y settled_ntu --x dose_mg_l --degree 2 \
  --exclude 17,38 --reason "17=decimal point slipped" --reason "38=decimal point slipped" \
  -o "$work/summary.html" > /dev/null
chromium --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
  --disable-background-networking --disable-component-update --disable-sync \
  --user-data-dir="$work/profile" --enable-logging=stderr --v=0 --window-size=1200,1800 \
  --screenshot="$work/shot.png" "file://$work/summary.html" 2> "$work/chromium.log" > /dev/null || {
  cat "$work/chromium.log" >&2; echo "chromium failed to render the summary" >&2; exit 1; }
python3 - "$work/shot.png" "$work/chromium.log" <<'PY'
import struct, sys, zlib
png, log = sys.argv[1], sys.argv[2]
# The page has no scripts, so any console message at all (Chromium logs them as CONSOLE lines,
# whatever their level) means something went wrong, such as a resource that failed to load.
errors = [l for l in open(log, errors="replace") if ":CONSOLE" in l]
data = open(png, "rb").read()
assert data[:8] == b"\x89PNG\r\n\x1a\n", "screenshot is not a PNG"
w, h = struct.unpack(">II", data[16:24])
# Decode the IDAT stream (8-bit RGB/RGBA, no interlace, as Chromium writes) to count colours.
idat = b"".join(data[i + 8:i + 8 + struct.unpack(">I", data[i:i + 4])[0]]
                for i in range(8, len(data)) if data[i + 4:i + 8] == b"IDAT")
raw = zlib.decompress(idat)
colours = len(set(raw[k:k + 3] for k in range(1, min(len(raw), 4_000_000), 7)))
print(f"chromium: screenshot {w}x{h}, about {colours} distinct colour samples, {len(errors)} console errors")
assert (w, h) == (1200, 1800), f"screenshot size {w}x{h}"
assert colours > 50, "the page looks blank"
assert not errors, "console errors:\n" + "".join(errors)
print("1 passed, 0 failed")
PY

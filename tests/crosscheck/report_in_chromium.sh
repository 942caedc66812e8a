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
# Decode the IDAT stream (8-bit RGB or RGBA, no interlace, as Chromium writes): inflate, then
# undo each scanline's filter (PNG spec, section 9: None, Sub, Up, Average, Paeth) so that the
# colours counted are pixels, not filtered bytes.
assert data[24] == 8 and data[25] in (2, 6) and data[28] == 0, "8-bit RGB(A), not interlaced"
bpp = 3 if data[25] == 2 else 4
idat = b"".join(data[i + 8:i + 8 + struct.unpack(">I", data[i:i + 4])[0]]
                for i in range(8, len(data)) if data[i + 4:i + 8] == b"IDAT")
raw = zlib.decompress(idat)
stride = w * bpp
prev = bytearray(stride)
pixels = set()
for row in range(h):
    start = row * (stride + 1)
    kind, line = raw[start], bytearray(raw[start + 1:start + 1 + stride])
    if kind == 1:
        for k in range(bpp, stride):
            line[k] = (line[k] + line[k - bpp]) & 255
    elif kind == 2:
        line = bytearray((a + b) & 255 for a, b in zip(line, prev))
    elif kind == 3:
        for k in range(stride):
            left = line[k - bpp] if k >= bpp else 0
            line[k] = (line[k] + ((left + prev[k]) >> 1)) & 255
    elif kind == 4:
        for k in range(stride):
            a = line[k - bpp] if k >= bpp else 0
            b, c = prev[k], (prev[k - bpp] if k >= bpp else 0)
            pa, pb, pc = abs(b - c), abs(a - c), abs(a + b - 2 * c)
            pred = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
            line[k] = (line[k] + pred) & 255
    if row % 4 == 0:
        pixels.update(bytes(line[k:k + 3]) for k in range(0, stride, bpp * 3))
    prev = line
colours = len(pixels)
print(f"chromium: screenshot {w}x{h}, {colours} distinct colours in the sampled pixels, {len(errors)} console errors")
assert (w, h) == (1200, 1800), f"screenshot size {w}x{h}"
assert colours > 50, "the page looks blank"
assert not errors, "console errors:\n" + "".join(errors)
print("1 passed, 0 failed")
PY

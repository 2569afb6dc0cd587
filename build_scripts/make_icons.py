#!/usr/bin/env python3
"""Draw Seqpick's app icons into site/icons/ (run by hand; the PNGs are committed).

    python3 build_scripts/make_icons.py

Our own emblem: a row of bars, the last one (the pick) taller and white, on
a tile in the accent colour. A tiny PNG writer (zlib + struct, 4x4
supersampling), standard library only. icon-maskable-512.png fills the whole
square and keeps the art inside the central safe zone."""
import struct
import zlib
from pathlib import Path

BG = (0x0b, 0x67, 0x5f)       # accent (tile)
BAR = (0xdb, 0xee, 0xe9)      # soft bars
PICK = (0xff, 0xff, 0xff)     # the picked one


def shapes(maskable):
    # coordinates in a 0..1 square
    pad = 0.0 if maskable else 0.06       # tile inset (maskable: full bleed)
    radius = 0.0 if maskable else 0.2
    inner = 0.2 if maskable else 0.16     # art inset from the tile (maskable safe zone: 0.1..0.9 circle)
    lo = pad + inner
    hi = 1 - pad - inner
    w = hi - lo
    base = hi - 0.1 * w  # centre the art vertically
    bars = [(0.00, 0.45), (0.26, 0.65), (0.52, 0.35)]
    bw = w * 0.17
    out = []
    for x, h in bars:
        out.append(("rect", lo + x * w, base - h * w * 0.8, bw, h * w * 0.8, BAR))
    # the pick
    px = lo + 0.80 * w
    out.append(("rect", px, base - 0.8 * w, bw * 1.15, 0.8 * w, PICK))
    return pad, radius, out

def inside_round_rect(x, y, x0, y0, x1, y1, r):
    if not (x0 <= x <= x1 and y0 <= y <= y1):
        return False
    cx = min(max(x, x0 + r), x1 - r)
    cy = min(max(y, y0 + r), y1 - r)
    return (x - cx) ** 2 + (y - cy) ** 2 <= r * r

def render(size, maskable=False):
    pad, radius, items = shapes(maskable)
    ss = 4
    rows = []
    for py in range(size):
        row = bytearray([0])
        for px in range(size):
            acc = [0, 0, 0, 0]
            for sy in range(ss):
                for sx in range(ss):
                    x = (px + (sx + 0.5) / ss) / size
                    y = (py + (sy + 0.5) / ss) / size
                    if not inside_round_rect(x, y, pad, pad, 1 - pad, 1 - pad, radius):
                        continue
                    col = BG
                    for kind, x0, y0, w, h, c in items:
                        if inside_round_rect(x, y, x0, y0, x0 + w, y0 + h, min(w, h) * 0.18):
                            col = c
                    acc[0] += col[0]; acc[1] += col[1]; acc[2] += col[2]; acc[3] += 255
            n = ss * ss
            a = acc[3] / n
            if acc[3]:
                rgb = [round(acc[i] / (acc[3] / 255)) for i in range(3)]
            else:
                rgb = [0, 0, 0]
            row += bytes(rgb + [round(a)])
        rows.append(bytes(row))
    raw = b"".join(rows)
    def chunk(t, d):
        return struct.pack(">I", len(d)) + t + d + struct.pack(">I", zlib.crc32(t + d) & 0xFFFFFFFF)
    ihdr = struct.pack(">IIBBBBB", size, size, 8, 6, 0, 0, 0)
    return b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", ihdr) + chunk(b"IDAT", zlib.compress(raw, 9)) + chunk(b"IEND", b"")

def svg():
    pad, radius, items = shapes(False)
    s = 512
    hexc = lambda c: "#%02x%02x%02x" % c
    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {s} {s}">',
             f'<rect x="{pad*s:.1f}" y="{pad*s:.1f}" width="{(1-2*pad)*s:.1f}" height="{(1-2*pad)*s:.1f}" rx="{radius*s:.1f}" fill="{hexc(BG)}"/>']
    for kind, x0, y0, w, h, c in items:
        parts.append(f'<rect x="{x0*s:.1f}" y="{y0*s:.1f}" width="{w*s:.1f}" height="{h*s:.1f}" rx="{min(w,h)*0.18*s:.1f}" fill="{hexc(c)}"/>')
    parts.append("</svg>\n")
    return "\n".join(parts)

out = Path(__file__).resolve().parents[1] / "site" / "icons"
for size in (192, 512, 180):
    (out / f"icon-{size}.png").write_bytes(render(size))
(out / "icon-maskable-512.png").write_bytes(render(512, maskable=True))
(out / "icon.svg").write_text(svg())
print("done")

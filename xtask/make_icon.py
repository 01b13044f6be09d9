"""Draws www/icon-512.png, the raster twin of www/icon.svg (the web app
manifest wants a PNG for installing). Run by hand when the icon changes:
python3 xtask/make_icon.py. Standard library only (zlib for PNG)."""
import math, struct, zlib

N = 512
TEAL, PAPER, EMBER = (0x2F, 0x6F, 0x73), (0xF7, 0xF3, 0xEA), (0xC2, 0x50, 0x2F)

def cubic(p0, p1, p2, p3, t):
    u = 1 - t
    return tuple(u**3 * a + 3 * u * u * t * b + 3 * u * t * t * c + t**3 * d for a, b, c, d in zip(p0, p1, p2, p3))

# The SVG path: M 96 400 C 130 250, 170 190, 236 170 S 360 130, 416 112
# (the S reflects 170 190 about 236 170: 302 150).
seg = [((96, 400), (130, 250), (170, 190), (236, 170)), ((236, 170), (302, 150), (360, 130), (416, 112))]
curve = [cubic(*s, i / 400) for s in seg for i in range(401)]

def inside_rounded(x, y, r=96):
    cx = min(max(x, r), N - r)
    cy = min(max(y, r), N - r)
    return (x - cx) ** 2 + (y - cy) ** 2 <= r * r

rows = []
for y in range(N):
    row = bytearray([0])
    for x in range(N):
        px, py = x + 0.5, y + 0.5
        if not inside_rounded(px, py):
            row += bytes((0, 0, 0, 0))
            continue
        c = TEAL
        d = min(math.hypot(px - a, py - b) for a, b in curve[::4])
        if d <= 20:
            c = PAPER
        e = math.hypot(px - 236, py - 170)
        if e <= 40:
            c = PAPER
        if e <= 34:
            c = EMBER
        row += bytes((*c, 255))
    rows.append(bytes(row))

def chunk(kind, data):
    return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF)

png = b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", N, N, 8, 6, 0, 0, 0))
png += chunk(b"IDAT", zlib.compress(b"".join(rows), 9)) + chunk(b"IEND", b"")
open("www/icon-512.png", "wb").write(png)

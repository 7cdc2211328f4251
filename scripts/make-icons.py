#!/usr/bin/env python3
"""Draws Tapline's icons (an original mark: a winding with two legs and a center tap) as PNGs.

The mark is one colour (white on navy): a coloured tap could read as a conductor colour, and
North American practice keeps colour for white or grey neutrals and black and red hots.

Pure standard library, so it runs anywhere: `python3 scripts/make-icons.py`. The PNGs it writes
are committed under public/icons/; run it again only to change the design.
"""
import struct
import zlib
from pathlib import Path

NAVY = (16, 36, 62)
WHITE = (245, 247, 250)


def draw(size, pad):
    """Returns rows of RGB pixels. `pad` is the fraction of the edge kept clear (maskable icons
    need a safe zone)."""
    px = [[NAVY for _ in range(size)] for _ in range(size)]

    def rect(x0, y0, x1, y1, colour):
        for y in range(max(0, int(y0 * size)), min(size, int(y1 * size))):
            for x in range(max(0, int(x0 * size)), min(size, int(x1 * size))):
                px[y][x] = colour

    def disc(cx, cy, r, colour):
        for y in range(int((cy - r) * size), int((cy + r) * size) + 1):
            for x in range(int((cx - r) * size), int((cx + r) * size) + 1):
                if 0 <= x < size and 0 <= y < size and ((x / size - cx) ** 2 + (y / size - cy) ** 2) <= r * r:
                    px[y][x] = colour

    s = 1.0 - 2 * pad

    def p(v):
        return pad + v * s

    # The winding: four bumps across the top.
    for k in range(4):
        disc(p(0.2 + 0.2 * k), p(0.3), 0.1 * s, WHITE)
        disc(p(0.2 + 0.2 * k), p(0.3), 0.055 * s, NAVY)
    rect(p(0.08), p(0.3), p(0.92), p(0.42), NAVY)
    # The two legs.
    rect(p(0.09), p(0.28), p(0.16), p(0.86), WHITE)
    rect(p(0.84), p(0.28), p(0.91), p(0.86), WHITE)
    # The center tap (the neutral), narrower than the legs so it reads without colour.
    rect(p(0.475), p(0.31), p(0.525), p(0.86), WHITE)
    disc(p(0.5), p(0.86), 0.05 * s, WHITE)
    return px


def png(px):
    size = len(px)
    raw = b"".join(b"\x00" + bytes(c for rgb in row for c in rgb) for row in px)

    def chunk(kind, data):
        body = kind + data
        return struct.pack(">I", len(data)) + body + struct.pack(">I", zlib.crc32(body) & 0xFFFFFFFF)

    header = struct.pack(">IIBBBBB", size, size, 8, 2, 0, 0, 0)
    return b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", header) + chunk(b"IDAT", zlib.compress(raw, 9)) + chunk(b"IEND", b"")


def main():
    out = Path(__file__).resolve().parent.parent / "public" / "icons"
    out.mkdir(parents=True, exist_ok=True)
    (out / "icon-192.png").write_bytes(png(draw(192, 0.06)))
    (out / "icon-512.png").write_bytes(png(draw(512, 0.06)))
    (out / "icon-maskable-512.png").write_bytes(png(draw(512, 0.18)))


if __name__ == "__main__":
    main()

#!/usr/bin/python3
"""Draws Lintel's icon (a beam resting on two posts over a rising line) as PNG files with the
standard library only. Run once; the PNGs are committed under extension/icons/."""
import struct
import sys
import zlib


def png(width, height, pixel):
    raw = b"".join(b"\x00" + b"".join(bytes(pixel(x, y)) for x in range(width)) for y in range(height))
    def chunk(tag, data):
        return struct.pack(">I", len(data)) + tag + data + struct.pack(">I", zlib.crc32(tag + data) & 0xFFFFFFFF)
    return (b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", width, height, 8, 6, 0, 0, 0))
            + chunk(b"IDAT", zlib.compress(raw, 9)) + chunk(b"IEND", b""))


def icon(size):
    s = size / 42.0
    beam, post, line = (44, 62, 80, 255), (90, 110, 130, 255), (214, 120, 38, 255)
    def pixel(x, y):
        u, v = x / s, y / s
        if 6 <= u <= 36 and 8 <= v <= 13:
            return beam
        if (9 <= u <= 13 or 29 <= u <= 33) and 13 < v <= 36:
            return post
        # rising line from (14, 32) to (28, 18), 2.5 units thick
        if 14 <= u <= 28 and abs((v - 32) + (u - 14)) <= 1.8:
            return line
        return (0, 0, 0, 0)
    return png(size, size, pixel)


if __name__ == "__main__":
    out = sys.argv[1] if len(sys.argv) > 1 else "extension/icons"
    for size in (42, 26, 16):
        with open(f"{out}/lintel{'' if size == 42 else '_' + str(size)}.png", "wb") as f:
            f.write(icon(size))

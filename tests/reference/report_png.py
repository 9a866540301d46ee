#!/usr/bin/python3
"""Outside reader of a browser screenshot: size and how much is drawn on it.

Usage: report_png.py SHOT.png

Decodes the PNG with nothing but zlib (PNG specification, ISO/IEC 15948:
chunks, IHDR, the concatenated IDAT stream, the five per-row filters), for
8-bit greyscale, RGB and RGBA images, and prints one line:

  WIDTH HEIGHT DISTINCT_COLOURS NON_WHITE_FRACTION DARK_FRACTION

DISTINCT_COLOURS counts RGB triples; NON_WHITE_FRACTION is the share of
pixels that are not near white (any channel below 240), DARK_FRACTION the
share with every channel below 100 (text and lines). A blank or failed
render is one colour and nearly all white. Nothing of thermargin is used.
Run with Debian's interpreter (/usr/bin/python3).
"""
import struct
import sys
import zlib


def paeth(a, b, c):
    p = a + b - c
    pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
    if pa <= pb and pa <= pc:
        return a
    return b if pb <= pc else c


def decode(data):
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise SystemExit("not a PNG file")
    at, idat, header = 8, [], None
    while at < len(data):
        length, kind = struct.unpack(">I4s", data[at:at + 8])
        body = data[at + 8:at + 8 + length]
        if zlib.crc32(kind + body) != struct.unpack(">I", data[at + 8 + length:at + 12 + length])[0]:
            raise SystemExit("bad CRC in chunk %r" % kind)
        if kind == b"IHDR":
            header = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat.append(body)
        elif kind == b"IEND":
            break
        at += 12 + length
    width, height, depth, colour, _, _, interlace = header
    channels = {0: 1, 2: 3, 4: 2, 6: 4}.get(colour)
    if depth != 8 or channels is None or interlace != 0:
        raise SystemExit("unsupported PNG: depth %d colour type %d interlace %d" % (depth, colour, interlace))
    raw = zlib.decompress(b"".join(idat))
    stride = width * channels
    rows, prev, pos = [], bytearray(stride), 0
    for _ in range(height):
        f = raw[pos]
        line = bytearray(raw[pos + 1:pos + 1 + stride])
        pos += 1 + stride
        for i in range(stride):
            a = line[i - channels] if i >= channels else 0
            b = prev[i]
            c = prev[i - channels] if i >= channels else 0
            if f == 1:
                line[i] = (line[i] + a) & 0xFF
            elif f == 2:
                line[i] = (line[i] + b) & 0xFF
            elif f == 3:
                line[i] = (line[i] + ((a + b) >> 1)) & 0xFF
            elif f == 4:
                line[i] = (line[i] + paeth(a, b, c)) & 0xFF
        rows.append(bytes(line))
        prev = line
    return width, height, channels, rows


def main():
    width, height, channels, rows = decode(open(sys.argv[1], "rb").read())
    colours, non_white, dark = set(), 0, 0
    for row in rows:
        for x in range(0, width * channels, channels):
            rgb = (row[x],) * 3 if channels < 3 else tuple(row[x:x + 3])
            colours.add(rgb)
            non_white += min(rgb) < 240
            dark += max(rgb) < 100
    n = width * height
    print("%d %d %d %.4f %.4f" % (width, height, len(colours), non_white / n, dark / n))


if __name__ == "__main__":
    main()

#!/usr/bin/env python3
"""Summary of a PNG file for figure tests, using only the Python standard library (zlib):
prints JSON {"width", "height", "non_background_fraction", "colours"} where the background is
the colour of the top-left pixel; with further arguments "X,Y" (pixel column and row from the
top left) also "pixels": the [r, g, b] of each, in order. Decoding follows the PNG specification (W3C/ISO 15948:
chunk layout, zlib-compressed IDAT, per-row filter types 0-4 with the Paeth predictor)."""
import json
import struct
import sys
import zlib


def paeth(a, b, c):
    p = a + b - c
    pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
    if pa <= pb and pa <= pc:
        return a
    return b if pb <= pc else c


def main(path, points=()):
    data = open(path, "rb").read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise SystemExit("not a PNG: " + path)
    pos, idat, width = 8, b"", None
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        if kind == b"IHDR":
            width, height, depth, colour_type = struct.unpack(">IIBB", body[:10])
        elif kind == b"IDAT":
            idat += body
        pos += 12 + length
    if depth != 8 or colour_type not in (2, 6):
        raise SystemExit("unsupported PNG layout (depth %d, colour type %d)" % (depth, colour_type))
    bpp = 3 if colour_type == 2 else 4
    raw = zlib.decompress(idat)
    stride = width * bpp
    rows, prev, i = [], bytearray(stride), 0
    for _ in range(height):
        f = raw[i]
        line = bytearray(raw[i + 1:i + 1 + stride])
        i += 1 + stride
        for x in range(stride):
            a = line[x - bpp] if x >= bpp else 0
            b = prev[x]
            c = prev[x - bpp] if x >= bpp else 0
            if f == 1:
                line[x] = (line[x] + a) & 255
            elif f == 2:
                line[x] = (line[x] + b) & 255
            elif f == 3:
                line[x] = (line[x] + (a + b) // 2) & 255
            elif f == 4:
                line[x] = (line[x] + paeth(a, b, c)) & 255
        rows.append(bytes(line))
        prev = line
    background = rows[0][:3]
    other, colours = 0, set()
    for line in rows:
        for x in range(0, stride, bpp):
            px = line[x:x + 3]
            colours.add(px)
            if px != background:
                other += 1
    out = {"width": width, "height": height,
           "non_background_fraction": other / float(width * height),
           "colours": len(colours)}
    if points:
        out["pixels"] = []
        for p in points:
            x, y = (int(v) for v in p.split(","))
            out["pixels"].append(list(rows[y][x * bpp:x * bpp + 3]))
    print(json.dumps(out))


if __name__ == "__main__":
    main(sys.argv[1], sys.argv[2:])

#!/usr/bin/python3
"""Count the pixels of given colours in a PNG or binary PPM (P6) image.

usage: colour_areas.py IMAGE [--tol N | --coverage] RRGGBB...
Prints "WIDTH HEIGHT" then one area per colour, each on its own line.
  --tol N      a pixel counts for a colour when every channel is within N
               (default 0) of it and it is opaque;
  --coverage   antialiased edges count in part: a pixel on (or near) the line
               from the white background to a colour counts for the fraction
               of the way it lies along it (its coverage, when the renderer
               blends colour over white), so two renderers that antialias the
               same shapes differently still agree on the area. Needs numpy.
PNG decoding uses the standard library only (zlib), following the PNG
specification (W3C, 2nd ed., §9 filters).
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


def unfilter(raw, width, height, bpp):
    stride = width * bpp
    out = bytearray(stride * height)
    prev = bytearray(stride)
    pos = 0
    for y in range(height):
        ftype = raw[pos]
        line = bytearray(raw[pos + 1:pos + 1 + stride])
        pos += 1 + stride
        for i in range(stride):
            a = line[i - bpp] if i >= bpp else 0
            b = prev[i]
            c = prev[i - bpp] if i >= bpp else 0
            if ftype == 1:
                line[i] = (line[i] + a) & 255
            elif ftype == 2:
                line[i] = (line[i] + b) & 255
            elif ftype == 3:
                line[i] = (line[i] + (a + b) // 2) & 255
            elif ftype == 4:
                line[i] = (line[i] + paeth(a, b, c)) & 255
        out[y * stride:(y + 1) * stride] = line
        prev = line
    return out


def read_png(data):
    pos, idat = 8, b""
    while pos < len(data):
        n, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + n]
        if kind == b"IHDR":
            w, h, depth, ctype, _, _, interlace = struct.unpack(">IIBBBBB", body)
            if depth != 8 or ctype not in (2, 6) or interlace:
                sys.exit("colour_areas: only 8-bit RGB/RGBA non-interlaced PNG")
        elif kind == b"IDAT":
            idat += body
        pos += 12 + n
    bpp = 4 if ctype == 6 else 3
    return w, h, bpp, unfilter(zlib.decompress(idat), w, h, bpp)


def read_ppm(data):
    fields, pos = [], 2
    while len(fields) < 3:
        while data[pos:pos + 1].isspace():
            pos += 1
        if data[pos:pos + 1] == b"#":
            pos = data.index(b"\n", pos)
            continue
        end = pos
        while not data[end:end + 1].isspace():
            end += 1
        fields.append(int(data[pos:end]))
        pos = end
    w, h, _ = fields
    return w, h, 3, data[pos + 1:pos + 1 + w * h * 3]


def coverage(w, h, bpp, px, wanted):
    """Coverage-weighted area of each colour over a white background."""
    import numpy as np
    img = np.frombuffer(bytes(px), dtype=np.uint8).reshape(h, w, bpp)
    p = img[:, :, :3].astype(float) - 255.0
    best = np.full((h, w), np.inf)
    share = np.zeros((h, w))
    which = np.full((h, w), -1)
    for k, c in enumerate(wanted):
        d = np.array(c, dtype=float) - 255.0
        t = np.clip((p @ d) / (d @ d), 0.0, 1.0)
        resid = np.linalg.norm(p - t[:, :, None] * d, axis=2)
        # off the line by little, relative to how far along it the pixel is:
        # a light grey (a text edge) is near white and so near every light
        # colour's line, but far from it in proportion
        near = resid <= 1.0 + 0.15 * t * np.sqrt(d @ d)
        take = (resid < best) & near & (t > 0.02)
        best = np.where(take, resid, best)
        share = np.where(take, t, share)
        which = np.where(take, k, which)
    if bpp == 4:
        share = np.where(img[:, :, 3] == 255, share, 0.0)
    return [round(float(share[which == k].sum()), 1) for k in range(len(wanted))]


def main():
    args = sys.argv[1:]
    cover = "--coverage" in args
    if cover:
        args.remove("--coverage")
    tol = 0
    if "--tol" in args:
        i = args.index("--tol")
        tol = int(args[i + 1])
        del args[i:i + 2]
    data = open(args[0], "rb").read()
    w, h, bpp, px = read_png(data) if data[:4] == b"\x89PNG" else read_ppm(data)
    wanted = [tuple(int(c[k:k + 2], 16) for k in (0, 2, 4))
              for c in (a.lstrip("#") for a in args[1:])]
    if cover:
        print(w, h)
        for a in coverage(w, h, bpp, px, wanted):
            print(a)
        return
    counts = [0] * len(wanted)
    for i in range(0, w * h * bpp, bpp):
        r, g, b = px[i], px[i + 1], px[i + 2]
        if bpp == 4 and px[i + 3] != 255:
            continue
        for k, (cr, cg, cb) in enumerate(wanted):
            if abs(r - cr) <= tol and abs(g - cg) <= tol and abs(b - cb) <= tol:
                counts[k] += 1
                break
    print(w, h)
    for c in counts:
        print(c)


if __name__ == "__main__":
    main()

"""Decodes a PNG with the standard library only (zlib; PNG spec, W3C 2003, sections 6-9:
IHDR, IDAT, the five row filters) and counts the clearly coloured pixels in boxes.

usage: png_chroma.py FILE [X0 Y0 X1 Y1]...   (pixel boxes, x1/y1 exclusive, y from the top)
prints: width height, then per box the number of pixels whose max(r,g,b) - min(r,g,b) > 40
(data colours; text, axes and background are neutral grey)."""
import struct
import sys
import zlib


def read_png(path):
    data = open(path, "rb").read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise SystemExit("not a PNG")
    pos, idat, header = 8, [], None
    while pos < len(data):
        length, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + length]
        if kind == b"IHDR":
            header = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat.append(body)
        pos += 12 + length
    width, height, depth, colour, _, _, interlace = header
    if depth != 8 or colour not in (2, 6) or interlace:
        raise SystemExit("unsupported PNG layout")
    bpp = 3 if colour == 2 else 4
    raw = zlib.decompress(b"".join(idat))
    stride = width * bpp
    rows, prev = [], bytearray(stride)
    for y in range(height):
        start = y * (stride + 1)
        kind, line = raw[start], bytearray(raw[start + 1:start + 1 + stride])
        if kind == 1:
            for i in range(bpp, stride):
                line[i] = (line[i] + line[i - bpp]) & 255
        elif kind == 2:
            line = bytearray((a + b) & 255 for a, b in zip(line, prev))
        elif kind == 3:
            for i in range(stride):
                left = line[i - bpp] if i >= bpp else 0
                line[i] = (line[i] + ((left + prev[i]) >> 1)) & 255
        elif kind == 4:
            for i in range(stride):
                a = line[i - bpp] if i >= bpp else 0
                b = prev[i]
                c = prev[i - bpp] if i >= bpp else 0
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pred = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[i] = (line[i] + pred) & 255
        rows.append(line)
        prev = line
    return width, height, bpp, rows


def main():
    width, height, bpp, rows = read_png(sys.argv[1])
    out = [str(width), str(height)]
    boxes = [int(v) for v in sys.argv[2:]]
    for k in range(0, len(boxes), 4):
        x0, y0, x1, y1 = boxes[k:k + 4]
        count = 0
        for y in range(max(y0, 0), min(y1, height)):
            line = rows[y]
            for x in range(max(x0, 0), min(x1, width)):
                px = line[x * bpp:x * bpp + 3]
                if max(px) - min(px) > 40:
                    count += 1
        out.append(str(count))
    print(" ".join(out))


if __name__ == "__main__":
    main()

"""Ink inside the boxes of a figure's box manifest (report/, FIGURE.png.boxes).

usage: png_ink.py FIGURE.png MANIFEST
prints: width height, then for every "text" line of the manifest, in order, the number of
pixels inside its box (edges rounded outwards) that are not background: any channel below
230 of 255 (text is anti-aliased; the page background is white, 255).
The PNG is decoded with png_chroma.read_png (standard library zlib, PNG spec W3C 2003)."""
import math
import sys

from png_chroma import read_png


def main():
    width, height, bpp, rows = read_png(sys.argv[1])
    out = [str(width), str(height)]
    for line in open(sys.argv[2], encoding="utf-8"):
        fields = line.rstrip("\n").split("\t")
        if fields[0] != "text":
            continue
        x0, y0 = max(0, math.floor(float(fields[1]))), max(0, math.floor(float(fields[2])))
        x1, y1 = min(width, math.ceil(float(fields[3]))), min(height, math.ceil(float(fields[4])))
        count = 0
        for y in range(y0, y1):
            row = rows[y]
            for x in range(x0, x1):
                if min(row[x * bpp:x * bpp + 3]) < 230:
                    count += 1
        out.append(str(count))
    print(" ".join(out))


if __name__ == "__main__":
    main()

#!/usr/bin/env python3
"""Reference peer: pyproj (PROJ) conversions of projected points to WGS84 longitude/latitude.

Usage: peer_pyproj.py EPSG_CODE < points    (one "x y" per line, in the CRS's own unit)
Prints "lon lat" per line (degrees, WGS84, always_xy order).
"""
import sys

from pyproj import Transformer


def main(code):
    t = Transformer.from_crs(f"EPSG:{code}", "EPSG:4326", always_xy=True)
    for line in sys.stdin:
        x, y = map(float, line.split())
        lon, lat = t.transform(x, y)
        print(repr(lon), repr(lat))


if __name__ == "__main__":
    main(sys.argv[1])

#!/usr/bin/env python3
"""Writes the fuzz seed corpus (fuzz/seeds/<target>/) from the invented sample district and the
shapes the tests use. Deterministic; re-run after changing a reader's format.
Usage: python3 scripts/fuzz-seeds.py   (needs ogr2ogr from gdal-bin for the Shapefile seed)
"""
import json
import os
import shutil
import struct
import subprocess
import tempfile

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
OUT = os.path.join(ROOT, "fuzz", "seeds")


def put(target, name, data):
    d = os.path.join(OUT, target)
    os.makedirs(d, exist_ok=True)
    if isinstance(data, str):
        data = data.encode()
    with open(os.path.join(d, name), "wb") as f:
        f.write(data)


def fc(features):
    return json.dumps({"type": "FeatureCollection", "features": features})


def main():
    shutil.rmtree(OUT, ignore_errors=True)
    roads = json.load(open(os.path.join(ROOT, "sample-maps", "ombrevane", "roads.geojson")))
    sites = json.load(open(os.path.join(ROOT, "sample-maps", "ombrevane", "sites.geojson")))
    small = roads["features"][:25]
    put("roads_geojson", "sample-25", fc(small))
    put("roads_geojson", "multiline-crs", json.dumps({
        "type": "FeatureCollection",
        "crs": {"type": "name", "properties": {"name": "urn:ogc:def:crs:EPSG::4326"}},
        "bbox": [0, 0, 1, 1],
        "features": [
            {"type": "Feature", "id": 7, "properties": {"damage": "closed", "name": "A"},
             "geometry": {"type": "MultiLineString", "coordinates": [[[0, 0], [0.001, 0]], [[0.001, 0], [0.001, 0.001, 5]]]}},
            {"type": "Feature", "properties": {"damage": -1},
             "geometry": {"type": "LineString", "coordinates": [[0.001, 0], [0.002, 0.0000001]]}},
            {"type": "Feature", "properties": None, "geometry": None},
        ]}))
    put("plan_pieces", "sample", fc(small).encode() + b"\xff" + fc(sites["features"][:4]).encode())
    put("sites_geojson", "sample", fc(sites["features"]))
    put("sites_csv", "basic", "site_id,name,priority,lon,lat\nH1,Depot,5,-34.99,14.0\nH2,\"Clinic, east\",2,-34.98,14.01\n")
    put("sites_csv", "semicolon-bom", "\ufeffid;x;y\n1;1,5;2,5\n")
    square = [[[0, 0], [0.005, 0], [0.005, 0.005], [0, 0.005], [0, 0]]]
    put("zones", "flood", fc([
        {"type": "Feature", "properties": {"damage": 0.8}, "geometry": {"type": "Polygon", "coordinates": square}},
        {"type": "Feature", "properties": {"damage": "closed"},
         "geometry": {"type": "MultiPolygon", "coordinates": [square, [[[0.006, 0], [0.007, 0], [0.007, 0.001], [0.006, 0]]]]}},
    ]))
    put("reports", "points", fc([
        {"type": "Feature", "properties": {"damage": 1.5}, "geometry": {"type": "Point", "coordinates": [0.005, 0.0001]}},
        {"type": "Feature", "properties": {"damage": "closed"}, "geometry": {"type": "Point", "coordinates": [9, 9]}},
    ]))
    put("cost_table", "default", "[categories]\nintact = 0\ndebris = 0.3\nwashed-out = 1.0\ncollapsed = \"closed\"\n\n[classes]\nfield = \"highway\"\nprimary = 1.5\nresidential = 0.8\n")
    put("cost_table", "filter", "highway=primary,secondary")
    put("manifest", "toml", "[defaults]\nsnap = 0.5\neffort = \"quick\"\n\n[[district]]\nname = \"D-001\"\nroads = \"north/roads.geojson\"\nsites = \"north/sites.csv\"\nbudget = 5000\n")
    put("manifest", "csv", "name,roads,sites,snap\nD-001,north/roads.geojson,north/sites.csv,0.5\n")
    put("stp", "tiny", "33D32945 STP File, STP Format Version 1.0\nSECTION Graph\nNodes 5\nEdges 6\nE 1 2 3\nE 2 3 4\nE 3 4 1\nE 4 5 2\nE 1 5 7\nE 2 4 1\nEND\nSECTION Terminals\nTerminals 3\nT 1\nT 3\nT 5\nEND\nEOF\n")
    put("graph", "lattice", bytes([12] + [x % 256 for i in range(60) for x in (i, i + 1, 40 + 7 * i)]))
    # Shapefile: the first roads of the sample, converted by ogr2ogr, packed as three length-prefixed parts.
    with tempfile.TemporaryDirectory() as d:
        src = os.path.join(d, "in.geojson")
        with open(src, "w") as f:
            f.write(fc(roads["features"][:6]))
        subprocess.run(["ogr2ogr", "-f", "ESRI Shapefile", os.path.join(d, "roads.shp"), src], check=True,
                       stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        packed = b""
        for ext in ("shp", "shx", "dbf"):
            part = open(os.path.join(d, "roads." + ext), "rb").read()
            assert len(part) < 65536
            packed += struct.pack("<H", len(part)) + part
        put("shapefile", "sample-6", packed)
        zip_seed(d)
    gpkg_seeds()


def zip_seed(d):
    """The Shapefile set in `d` (roads.*) zipped in a folder, deflated, as a zipped road layer."""
    import io
    import zipfile
    buf = io.BytesIO()
    with zipfile.ZipFile(buf, "w", zipfile.ZIP_DEFLATED) as z:
        for ext in ("shp", "shx", "dbf", "prj", "cpg"):
            path = os.path.join(d, "roads." + ext)
            if os.path.exists(path):
                info = zipfile.ZipInfo("county/roads." + ext, date_time=(2026, 1, 1, 0, 0, 0))
                info.compress_type = zipfile.ZIP_DEFLATED
                z.writestr(info, open(path, "rb").read())
    put("zipped_shapefile", "sample-6", buf.getvalue())


def gpkg_seeds():
    """GeoPackage geometry blobs (OGC 12-128r18 §2.1.3: "GP", version, flags, srs_id, envelope,
    then ISO WKB): a LineString, a MultiLineString with an envelope, a Point."""
    def line(pts):
        return b"\x01" + struct.pack("<II", 2, len(pts)) + b"".join(struct.pack("<dd", *p) for p in pts)
    head = b"GP\x00\x01" + struct.pack("<i", 4326)
    put("gpkg_geometry", "linestring", head + line([(0, 0), (0.001, 0), (0.001, 0.002)]))
    env = b"GP\x00\x03" + struct.pack("<i", 4326) + struct.pack("<dddd", 0, 0.002, 0, 0.002)
    multi = b"\x01" + struct.pack("<II", 5, 2) + line([(0, 0), (0.002, 0)]) + line([(0, 0.002), (0.002, 0.002)])
    put("gpkg_geometry", "multilinestring-envelope", env + multi)
    put("gpkg_geometry", "point", head + b"\x01" + struct.pack("<Idd", 1, 0.5, 0.5))


if __name__ == "__main__":
    main()

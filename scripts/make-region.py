#!/usr/bin/env python3
"""Generate a synthetic region of many districts (neutral codes D-001, D-002, …) with a batch manifest.

Usage: make-region.py OUT_DIR [DISTRICTS] [FEATURES_PER_DISTRICT] [SITES_PER_DISTRICT]
Each district gets synthetic roads (examples/synth_roads.rs, its own seed) and critical sites (CSV);
OUT_DIR/manifest.toml lists them all. Deterministic: the same arguments give the same files.
Example:  python3 scripts/make-region.py target/region 200 10000 12
          reknit batch target/region/manifest.toml --out target/region-out
"""
import subprocess
import sys
from pathlib import Path


def main(out, districts=40, features=2000, sites=8):
    root = Path(__file__).resolve().parent.parent
    subprocess.run(["cargo", "build", "--quiet", "--release", "--example", "synth_roads"], cwd=root, check=True)
    synth = root / "target" / "release" / "examples" / "synth_roads"
    out = Path(out)
    out.mkdir(parents=True, exist_ok=True)
    lines = ["# Synthetic region of districts named by code (scripts/make-region.py)",
             "[defaults]", "snap = 0.5", "max_attach = 250", 'effort = "normal"', 'hub = "P1"', ""]
    for i in range(int(districts)):
        # Codes, not names: names made from syllables turn out to be real places.
        name = f"D-{i + 1:03d}"
        folder = out / f"d{i + 1:04d}"
        folder.mkdir(exist_ok=True)
        subprocess.run([str(synth), str(features), str(folder / "roads.geojson"), str(1000 + i),
                        str(folder / "sites.csv"), str(sites)], check=True, stderr=subprocess.DEVNULL)
        lines += ["[[district]]", f'name = "{name}"', f'roads = "d{i + 1:04d}/roads.geojson"',
                  f'sites = "d{i + 1:04d}/sites.csv"', ""]
    (out / "manifest.toml").write_text("\n".join(lines))
    print(f"{out / 'manifest.toml'}: {districts} districts of {features} road features")


if __name__ == "__main__":
    main(*sys.argv[1:])

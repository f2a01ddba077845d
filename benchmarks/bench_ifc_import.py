"""Time the IFC import of a 40-storey, 2,000-window model (target: well under 30 s).

Run: ``python benchmarks/bench_ifc_import.py [--storeys N] [--per-face N]``. The model is built
with ``ifcopenshell.api`` (the tests' builder, tests/ifc_builder.py) in a temporary folder, then
imported; the baseline measured in the same run is just opening the file with ifcopenshell, so
the ratio says what the import adds to parsing the model.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

_ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(_ROOT))  # run from a source checkout


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--storeys", type=int, default=40)
    parser.add_argument("--per-face", type=int, default=25,
                        help="windows per face per storey (two faces; default 25: 2,000 in all)")
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()
    try:
        import ifcopenshell

        from tests.ifc_builder import IfcModelBuilder, box_tower
    except ImportError:
        print('needs ifcopenshell: pip install "petfall_audit[bim]"')
        return 2
    from petfall_audit.io.ifc_import import new_building, read_model

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "tower.ifc"
        t0 = time.perf_counter()
        builder = IfcModelBuilder(unit="mm", true_north_deg=12.0)
        elevations = [0.0] + [4.5 + 3.1 * k for k in range(args.storeys - 1)]
        box_tower(builder, elevations, width_m=40.0, depth_m=16.0,
                  windows_per_face=args.per_face, window_width_m=1.2)
        builder.write(path)
        build_s = time.perf_counter() - t0
        size_mb = path.stat().st_size / 1024**2

        opens, imports = [], []
        for _ in range(args.repeats):
            t1 = time.perf_counter()
            ifcopenshell.open(str(path))
            opens.append(time.perf_counter() - t1)
            t2 = time.perf_counter()
            model = read_model(path)
            building, preview = new_building(model)
            imports.append(time.perf_counter() - t2)
        assert not preview.problems, preview.problems[:3]
    open_s, import_s = min(opens), min(imports)
    print(f"model: {len(model.storeys)} storeys, {len(building.openings)} windows on "
          f"{len(building.facades)} facades, {size_mb:.1f} MB (built in {build_s:.1f} s)")
    print(f"open with ifcopenshell (baseline)  {open_s:6.2f} s")
    print(f"import (read + preview + building) {import_s:6.2f} s  "
          f"= {import_s / open_s:.1f} x the baseline")
    print(f"target < 30 s: {'OK' if import_s < 30 else 'TOO SLOW'}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

"""Generate the demo turnpoint files ``vardmoor.geojson`` and ``vardmoor.csv``.

Every name, position and runway here is invented for the Vardmoor demo region, an upland
made up and placed in the open North Atlantic (see ``make_terrain.py``); no real turnpoint
list was used. Elevations come from ``make_terrain.elevation`` so that turnpoints and
terrain agree. The landables are spread unevenly on purpose: there are none on the Skarren
Ridge and none on the Tolland Heights, so a coverage check has gaps to show.

Run from the project root:  python demo_tasks/make_turnpoints.py
"""

from __future__ import annotations

import importlib.util
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
NOTE = ("Invented demo data for glidetask: the Vardmoor region and every point in it are made up "
        "(placed in the open North Atlantic). Not for navigation.")

# name, code, lat, lon, kind, runway heading [deg], runway length [m], note
AIRFIELDS = (
    ("Vardmoor Aerodrome", "VAR", 46.050, -33.300, 85, 1100, "home field; winch and aerotow"),
    ("Brennick Airfield", "BRN", 45.480, -34.150, 40, 800, ""),
    ("Orsby Gliding Field", "ORS", 46.820, -33.420, 110, 900, "north of the Skarren Ridge"),
    ("Kestwick Airstrip", "KSW", 47.180, -34.950, 160, 650, "short strip, trees at the south end"),
    ("Lindmarsh Airfield", "LMH", 46.180, -32.050, 70, 1200, ""),
    ("Fennick Airfield", "FNK", 45.250, -33.150, 20, 900, ""),
    ("Harrowmere Airfield", "HRM", 47.250, -31.950, 120, 1000, ""),
)
FIELDS = (
    ("Greyholt Field", "GHF", 45.780, -33.620, 95, 450, "stubble after July"),
    ("Pellow Meadow", "PLM", 45.920, -34.350, 60, 400, ""),
    ("Ashcombe Field", "ASC", 46.120, -34.950, None, None, "large pasture, no obstacles reported"),
    ("Dunhallow Lea", "DHL", 45.620, -33.050, 140, 500, ""),
    ("Crowsend Field", "CSF", 45.880, -32.600, None, None, "power line on the east side"),
    ("Tarnley Field", "TNF", 46.050, -32.400, 80, 550, ""),
    ("Whinmoor Field", "WMF", 46.720, -32.550, 100, 600, "north of the ridge"),
    ("Elsby Pasture", "ELP", 46.950, -33.050, None, None, "grazing: check for livestock"),
    ("Rookhaven Field", "RHF", 47.350, -33.600, 170, 450, ""),
    ("Sallowby Field", "SBF", 46.620, -34.550, 30, 500, ""),
    ("Marlstone Field", "MSF", 45.300, -34.850, None, None, "slight slope down to the south"),
    ("Quellby Field", "QBF", 45.150, -33.750, 120, 500, ""),
    ("Hobbin Lea", "HBL", 45.950, -31.850, 10, 400, ""),
    ("Wendmarsh Field", "WDF", 47.300, -34.400, 75, 500, ""),
)
# name, code, lat, lon, note
WAYPOINTS = (
    ("Trennick", "TRN", 45.550, -34.620, "village, church tower"),
    ("Ulvenholm", "ULV", 46.580, -33.920, "village north of the ridge"),
    ("Hethwold", "HTW", 45.720, -32.200, "village"),
    ("Morrowgate", "MRG", 46.980, -32.350, "village"),
    ("Skellan", "SKL", 47.220, -33.250, "village, grain silos"),
    ("Fallowden", "FLD", 45.360, -33.550, "village"),
    ("Caddowick", "CDW", 46.250, -34.150, "village at the foot of the ridge"),
    ("Yarnsby", "YRN", 46.220, -33.050, "village"),
    ("Ossel Water", "OSW", 46.700, -34.100, "lake"),
    ("Glimmer Lake", "GLL", 45.650, -33.450, "lake"),
    ("Lake Tarrow", "LTR", 47.050, -33.800, "lake"),
    ("Mirrowmere", "MRM", 45.800, -31.800, "lake"),
    ("Vard Cross", "VCR", 46.000, -33.950, "crossroads"),
    ("Hob's Cross", "HBC", 45.450, -32.850, "crossroads"),
    ("Elsby Cross", "ECR", 46.880, -32.850, "crossroads"),
    ("Skarren Top", "SKT", 46.380, -33.550, "summit of the Skarren Ridge"),
    ("Skarren Mast", "SKM", 46.420, -32.950, "radio mast on the ridge crest, about 120 m tall"),
    ("Skarren Foot", "SKF", 46.300, -34.750, "west end of the ridge"),
    ("Tolland Beacon", "TLB", 45.420, -32.300, "summit of the Tolland Heights"),
    ("Kellow Hill", "KLH", 45.700, -34.700, "rounded hill"),
    ("Haverdun Hill", "HVH", 46.950, -34.200, "rounded hill"),
    ("Mardle Hill", "MDH", 47.100, -32.600, "rounded hill"),
    ("Rennet Hill", "RNH", 45.550, -32.550, "hill west of the Tolland Heights"),
    ("Holloway Dam", "HWD", 46.450, -31.800, "reservoir dam"),
    ("Tarrow Bridge", "TBR", 47.150, -33.950, "bridge"),
    ("Westmark Mill", "WMM", 45.980, -34.720, "old mill by the river"),
    ("Ferrow Quarry", "FRQ", 45.820, -33.050, "quarry"),
    ("Aldwin Chapel", "ALC", 47.400, -34.900, "chapel on a rise"),
    ("Harl Wind Farm", "HWF", 46.600, -32.100, "wind turbines, 150 m"),
    ("Oddle Junction", "ODJ", 45.200, -32.600, "railway junction"),
)


def _terrain_module():
    """``make_terrain.py`` imported by its path (the demo folder is not a package)."""
    spec = importlib.util.spec_from_file_location("vardmoor_terrain", HERE / "make_terrain.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def turnpoints():
    """The invented turnpoints, elevations from the demo terrain rounded to 1 m."""
    sys.path.insert(0, str(HERE.parent))
    from glidetask.engine.task import Turnpoint

    elevation = _terrain_module().elevation
    points = []
    for kind, rows in (("airfield", AIRFIELDS), ("field", FIELDS)):
        for name, code, lat, lon, heading, length, note in rows:
            points.append(Turnpoint(name, code, lat, lon, float(round(float(elevation(lat, lon)))), True, kind,
                                    None if heading is None else float(heading),
                                    None if length is None else float(length), note))
    for name, code, lat, lon, note in WAYPOINTS:
        points.append(Turnpoint(name, code, lat, lon, float(round(float(elevation(lat, lon)))), False,
                                "waypoint", None, None, note))
    return points


def main() -> None:
    sys.path.insert(0, str(HERE.parent))
    from glidetask.formats.turnpoints import write_turnpoints

    points = turnpoints()
    for suffix in (".geojson", ".csv"):
        out = HERE / f"vardmoor{suffix}"
        write_turnpoints(out, points, note=NOTE)
        print(f"wrote {out} ({len(points)} turnpoints, {sum(p.landable for p in points)} landable)")


if __name__ == "__main__":
    main()

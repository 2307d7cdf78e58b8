"""Generate the demo turnpoint files ``vardmoor.geojson`` and ``vardmoor.csv``.

Every name, position and runway here is invented for the Vardmoor demo region, an upland
made up and placed in the open North Atlantic (see ``make_terrain.py``); no real turnpoint
list was used. Elevations come from ``make_terrain.elevation`` so that turnpoints and
terrain agree.

The landables lie where a pilot would expect fields in farmed lowland: on the plains, about
every 20-30 km, closer along the demo routes, with a few runway headings, lengths and notes
(crops, slopes, obstacles) as a field guide would give them. There are none on the Skarren
Ridge, the Tolland Heights or the slopes of the rounded hills, and none in the rough ground
listed in ``ROUGH_GROUND`` (the Westmark Forest in the far west, around Kellow Hill and
Westmark Mill). A coverage check therefore finds gaps only there: over the ridge, the
heights and the forest.

Run from the project root:  python demo_tasks/make_turnpoints.py
"""

from __future__ import annotations

import importlib.util
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
NOTE = ("Invented demo data for glidetask: the Vardmoor region and every point in it are made up "
        "(placed in the open North Atlantic). Not for navigation.")

# Rough ground without a field fit to land in: name, centre lat, lon [deg], radius [km], why.
ROUGH_GROUND = (
    ("Westmark Forest", 45.840, -34.700, 20.0,
     "forest and rough hill grazing from the Westmark river south over Kellow Hill"),
)

# name, code, lat, lon, runway heading [deg], runway length [m], note
AIRFIELDS = (
    ("Vardmoor Aerodrome", "VAR", 46.050, -33.300, 85, 1100, "home field; winch and aerotow"),
    ("Brennick Airfield", "BRN", 45.480, -34.150, 40, 800, ""),
    ("Orsby Gliding Field", "ORS", 46.820, -33.420, 110, 900, "north of the Skarren Ridge"),
    ("Kestwick Airstrip", "KSW", 47.180, -34.950, 160, 650, "short strip, trees at the south end"),
    ("Lindmarsh Airfield", "LMH", 46.180, -32.050, 70, 1200, ""),
    ("Fennick Airfield", "FNK", 45.250, -33.150, 20, 900, ""),
    ("Harrowmere Airfield", "HRM", 47.250, -31.950, 120, 1000, ""),
    ("Quillowby Gliding Field", "QWB", 46.230, -33.550, 95, 900, "club field south of the Skarren Ridge; winch only"),
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
    # added so that the plains along the demo routes have fields within a glide
    ("Gorbeck Lea", "GBL", 46.010, -33.580, 95, 500, "grass; cattle in spring"),
    ("Snarrow Meadow", "SNW", 46.070, -33.840, None, None, "hay meadow, cut in June"),
    ("Thistlecombe Field", "TCF", 45.970, -34.130, 60, 450, "stubble after harvest; ditch along the west edge"),
    ("Lintwhistle Field", "LWF", 46.050, -34.480, 90, 400, "last field before the Westmark Forest; slopes gently down to the east"),
    ("Bramblehithe Field", "BHF", 45.520, -34.280, 20, 500, "grass strip beside the farm track"),
    ("Cobbleden Meadow", "CBM", 45.300, -34.300, None, None, ""),
    ("Pudding Acre", "PDA", 45.470, -33.700, 30, 450, "pasture, slight slope up to the north"),
    ("Marrowgill Field", "MGF", 45.620, -33.300, 120, 550, "barley until late July"),
    ("Hessledown Lea", "HDL", 45.900, -33.300, None, None, "large flat pasture"),
    ("Gannet Flats", "GNF", 45.700, -32.950, 80, 600, ""),
    ("Oxlip Meadow", "OXM", 46.000, -32.900, 150, 450, "power line along the north edge"),
    ("Fernacre Field", "FAF", 45.780, -32.250, 10, 500, "maize: unlandable from July, stubble after October"),
    ("Widdershaw Field", "WSF", 46.620, -33.200, 100, 550, "north of the ridge"),
    ("Scrogg's Pasture", "SGP", 47.050, -33.350, None, None, "grazing: check for livestock; gate in the south-west corner"),
    ("Nettlebarrow Field", "NBF", 46.850, -32.150, 60, 500, ""),
    ("Sillybrook Lea", "SBL", 46.600, -34.050, 90, 450, "drainage ditches across the east end"),
    ("Trundle Acre", "TDA", 47.380, -32.700, 140, 400, "trees on the approach from the east"),
    ("Kibble Meadow", "KBM", 46.980, -34.850, None, None, ""),
    ("Mossop's Field", "MOF", 46.250, -32.650, 70, 500, "south of the ridge; land uphill to the north"),
    ("Harebell Flats", "HBF", 45.480, -31.750, None, None, "grazing marsh: firm in summer only"),
    ("Crickmere Field", "CMF", 45.100, -32.900, 40, 500, ""),
    ("Tumbleweir Field", "TWF", 45.300, -33.400, 110, 500, "wet after rain: the south half floods"),
    ("Pennywhin Field", "PWF", 46.600, -32.850, 90, 450, "north of the ridge"),
    ("Dodderby Lea", "DDL", 46.820, -32.700, None, None, "sheep pasture"),
    ("Clatterfold Field", "CTF", 47.260, -33.050, 50, 500, "grain silos 1 km east"),
    ("Wimbleby Field", "WBY", 45.720, -34.100, 100, 450, "oil-seed rape until mid-July"),
    ("Tarrowside Lea", "TSL", 47.150, -33.700, None, None, "wet near the lake shore: land on the higher east half"),
    ("Mizzlecombe Field", "MZF", 47.120, -34.550, 130, 500, ""),
    ("Grumbleford Field", "GFF", 45.180, -32.550, 80, 550, "railway embankment along the south side"),
    ("Buttercup Bottom", "BCB", 45.180, -31.850, None, None, "hay meadow in a shallow valley"),
    ("Pottleby Field", "PTF", 46.680, -31.800, 160, 450, "wind turbines 3 km north-east"),
    # the far west: fewer fields, farther apart
    ("Wobblestone Field", "WBF", 45.300, -35.250, 60, 400, "stony: land along the wheel tracks"),
    ("Fiddler's Acre", "FDA", 46.150, -35.300, None, None, ""),
    ("Crumbleholt Field", "CHF", 46.550, -35.100, 90, 450, "slopes up to the west"),
    ("Spindlewick Field", "SWF", 46.850, -35.300, None, None, "grazing: check for livestock"),
    ("Yarrowdyke Field", "YDF", 47.250, -35.300, 20, 400, "stone walls on both ends"),
    ("Longwhistle Strip", "LWS", 45.700, -35.250, 170, 350, "private farm strip: short, farm buildings at the south end"),
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

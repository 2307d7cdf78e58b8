"""The final glide's terrain picture when the ground rises above the whole glide.

Found by fuzzing ``glide --airspace --terrain`` (tests/fuzz): a glide started low, far from
its goal, runs into ground higher than its own start, and drawing that ground ran off the
top of the picture (an internal error). The picture now reaches up to the ground.
"""

from __future__ import annotations

from pathlib import Path
from types import SimpleNamespace

from glidetask.cli import main
from glidetask.formats.safety_report import terrain_profile_ascii
from glidetask.units import METRIC

ROOT = Path(__file__).resolve().parents[2]


def test_ground_above_the_glide_is_drawn_to_its_top():
    # A 500 m ridge between 100 m valleys under a glide from 300 m down to 200 m; the
    # least clearance (the X) is on the ridge top. Five rows from 100 to 500 m: 100 m a row.
    check = SimpleNamespace(distance_m=[0.0, 1000.0, 2000.0], terrain_m=[100.0, 500.0, 100.0],
                            glide_m=[300.0, 250.0, 200.0], lowest=SimpleNamespace(at_m=1000.0, elevation_m=500.0))
    rows = terrain_profile_ascii(check, METRIC, width=21, height=5).splitlines()[:5]
    assert rows[0].startswith("   500 |") and rows[0][8:] == "         #X#         "  # the ridge top, column 10
    assert rows[4].startswith("   100 |") and set(rows[4][8:]) == {"#"}  # the valley floor everywhere
    assert rows[2].startswith("   300 |*")  # the glide starts at 300 m


def test_glide_into_high_ground_gives_its_verdict(capsys):
    # The invented demo terrain rises to about 400 m north-west of the plain; a glide from
    # 300 m across it cannot clear it: a verdict, not an internal error.
    status = main(["glide", "--polar", str(ROOT / "polars" / "club.toml"), "--height-m", "300", "--from", "44.839231,-33.765725",
                   "--to", "46.1127,-34.765414", "--terrain", str(ROOT / "demo_tasks" / "terrain.tif")])
    captured = capsys.readouterr()
    assert status == 0 and captured.err == ""
    assert "NOT CLEARED" in captured.out

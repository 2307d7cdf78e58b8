"""Seeded fuzzing of every reader: polar, task, GeoJSON and CSV turnpoints, GeoTIFF terrain,
GeoJSON airspace and CSV soundings.

Each input is a valid file mutated by a generator of our own (byte flips, cuts and
repeats; numbers swapped for hostile ones; text swapped for line breaks, NULs and long
strings; brackets nested deep), fed to ``glidetask check`` and, on a sample, to the
commands that use the reader: ``polar`` for polars, ``plan`` for a task that ``check``
passes, ``glide --airspace`` for airspace, and ``check`` and ``day`` of a task naming the
sounding for soundings. The contract's outcome must hold for every one
(shared/CONTRACT.md section 7): exit 0 with nothing on stderr, or exit 2 with only
one-line ``glidetask: error: FILE: WHERE: WHAT`` lines, at least one naming the file;
never an internal error (exit 1), a traceback or a hang (each input has a 10 s alarm).

A second generator draws valid but awkward airspace (tiny, huge, star-shaped, clockwise,
holed, split, at the poles and the antimeridian, limits in every unit) and flies random
glides through it, with and without terrain, to reach the airspace engine past the reader.

The default run is a few thousand inputs in seconds. For a longer run multiply the count:
``GLIDETASK_FUZZ=20 python -m pytest tests/fuzz`` (and ``GLIDETASK_FUZZ_SEED=N`` for other
inputs). A failure prints the reader, the input number and the seed, which reproduce it.
"""

from __future__ import annotations

import json
import math
import os
import random
import re
import signal
from collections import Counter
from pathlib import Path

import pytest

from glidetask.cli import main
from polar_text import GOOD as GOOD_POLAR

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_tasks"
SCALE = float(os.environ.get("GLIDETASK_FUZZ", "1"))
SEED = int(os.environ.get("GLIDETASK_FUZZ_SEED", "14"))
ERROR_LINE = re.compile(r"^glidetask: error: [^\n]+: [^\n]+: [^\n]+$")

HOSTILE_NUMBERS = ["0", "-0.0", "-1", "1e308", "-1e308", "1e400", "1" + "0" * 400, "-" + "9" * 400,
                   "1" + "0" * 4400, "nan", "inf", "-inf", "900", "1e-320", "0x7f", "1_0", "3.4e38", "65535",
                   "[]", "{}", '"12"', "true"]
HOSTILE_TEXT = ["", " ", "\n", "\\n", "\x00", "\u2028", "x" * 5000, "é\u0301", "\ud800", "KLH", "VAR",
                "../" * 50 + "x", "/dev/zero", "p" * 300]


def _mutate_text(text: str, rng: random.Random) -> str:
    """One to three text-level mutations of ``text``."""
    for _ in range(rng.randint(1, 3)):
        choice = rng.randrange(10)
        numbers = list(re.finditer(r"-?\d+(\.\d+)?([eE][-+]?\d+)?", text))
        strings = list(re.finditer(r'"[^"\n]*"', text))
        if choice == 0 and numbers:
            m = rng.choice(numbers)
            text = text[:m.start()] + rng.choice(HOSTILE_NUMBERS) + text[m.end():]
        elif choice == 1 and strings:
            m = rng.choice(strings)
            hostile = rng.choice(HOSTILE_TEXT)
            text = text[:m.start()] + json.dumps(hostile, ensure_ascii=rng.random() < 0.5) + text[m.end():]
        elif choice == 2 and text:
            i = rng.randrange(len(text))
            text = text[:i] + text[i + rng.randint(1, 40):]
        elif choice == 3 and text:
            i, j = sorted(rng.randrange(len(text)) for _ in range(2))
            text = text[:j] + text[i:j] + text[j:]
        elif choice == 4:
            depth = rng.choice([50, 999, 1001, 5000])
            i = rng.randrange(len(text) + 1)
            text = text[:i] + "[" * depth + "]" * depth * rng.randint(0, 1) + text[i:]
        elif choice == 5:
            lines = text.splitlines(keepends=True)
            rng.shuffle(lines)
            text = "".join(lines)
        elif choice == 6 and text:
            i = rng.randrange(len(text))
            text = text[:i] + chr(rng.choice([0, 9, 10, 13, 34, 39, 44, 91, 93, 123, 125, 0xFEFF, 0x2028])) + text[i:]
        elif choice == 7:
            lines = text.splitlines(keepends=True)
            if lines:
                k = rng.randrange(len(lines))
                lines[k:k] = [lines[k]] * rng.randint(1, 30)
            text = "".join(lines)
        elif choice == 8 and numbers:  # a plausible value nearby: reaches what lies past the range checks
            m = rng.choice(numbers)
            value = float(m.group()) * rng.choice([-1.0, 0.0, 0.5, 0.9, 0.99, 1.01, 1.1, 2.0]) + rng.uniform(-5.0, 5.0)
            text = text[:m.start()] + f"{value:.{rng.randint(0, 4)}f}" + text[m.end():]
        else:
            text = text[:rng.randrange(len(text) + 1)]
    return text


def _mutate_bytes(data: bytes, rng: random.Random) -> bytes:
    """One to four byte-level mutations (for binary files and encodings)."""
    data = bytearray(data)
    for _ in range(rng.randint(1, 4)):
        choice = rng.randrange(4)
        if choice == 0 and data:
            data[rng.randrange(len(data))] = rng.randrange(256)
        elif choice == 1 and data:
            i = rng.randrange(len(data))
            data[i:i + 4] = rng.choice([b"\xff\xff\xff\xff", b"\x00\x00\x00\x00", b"\x7f\x7f\xff\xff",
                                        b"\xff\xff\x7f\x7f", bytes(rng.randrange(256) for _ in range(4))])
        elif choice == 2 and data:
            i = rng.randrange(len(data))
            del data[i:i + rng.randint(1, 64)]
        else:
            data = data[:rng.randrange(len(data) + 1)]
    return bytes(data)


def _task_seed() -> str:
    text = (DEMO / "vardmoor-triangle-300.toml").read_text(encoding="utf-8")
    text = text.replace('"vardmoor.geojson"', json.dumps(str(DEMO / "vardmoor.geojson")))
    text = text.replace('"vardmoor-airspace.geojson"', json.dumps(str(DEMO / "vardmoor-airspace.geojson")))
    text = text.replace('"../polars/', '"' + str(ROOT / "polars") + "/")
    return text.replace('file = "terrain.tif"', f"file = {json.dumps(str(DEMO / 'terrain.tif'))}")


def _geojson_seed() -> str:
    lines = (DEMO / "vardmoor.geojson").read_text(encoding="utf-8").splitlines()
    return "\n".join(lines[:12]).rstrip(",") + "\n]}\n"  # the first few points


def _csv_seed() -> str:
    return "\n".join((DEMO / "vardmoor.csv").read_text(encoding="utf-8").splitlines()[:12]) + "\n"


def _airspace_seed() -> str:
    """The demo airspace, each outline thinned to every sixth corner (so that mutations
    reach the properties as often as the coordinates), plus a MultiPolygon with a hole."""
    document = json.loads((DEMO / "vardmoor-airspace.geojson").read_text(encoding="utf-8"))
    for feature in document["features"]:
        feature["geometry"]["coordinates"] = [ring[:-1:6] + [ring[0]] for ring in feature["geometry"]["coordinates"]]
    square = lambda lon, lat, d: [[lon - d, lat - d], [lon + d, lat - d], [lon + d, lat + d],  # noqa: E731
                                  [lon - d, lat + d], [lon - d, lat - d]]
    document["features"].append({
        "type": "Feature",
        "properties": {"name": "Fuzz Pair", "class": "restricted", "floor": {"value": 2000, "unit": "ft", "ref": "AGL"},
                       "ceiling": {"value": 65, "unit": "FL"}, "note": "invented"},
        "geometry": {"type": "MultiPolygon", "coordinates": [[square(-34.0, 45.48, 0.05), square(-34.0, 45.48, 0.01)[::-1]],
                                                             [square(-33.9, 45.48, 0.02)]]}})
    lines = [json.dumps(feature) for feature in document["features"]]
    return '{"type": "FeatureCollection",\n "features": [\n  ' + ",\n  ".join(lines) + "\n]}\n"


def _sounding_seed() -> str:
    return (DEMO / "vardmoor-sounding.csv").read_text(encoding="utf-8")


def _sounding_task(sounding: Path) -> str:
    """The forecast-day demo task naming ``sounding``, its other files by absolute path, and
    no ``surface_elevation_m`` (the sounding's lowest level is the ground), so that the day
    is derived from whatever levels the mutated sounding keeps."""
    text = (DEMO / "vardmoor-forecast-day.toml").read_text(encoding="utf-8")
    text = text.replace('"vardmoor-sounding.csv"', json.dumps(str(sounding)))
    text = text.replace('"vardmoor.geojson"', json.dumps(str(DEMO / "vardmoor.geojson")))
    text = text.replace('"../polars/', '"' + str(ROOT / "polars") + "/")
    text = text.replace('file = "terrain.tif"', f"file = {json.dumps(str(DEMO / 'terrain.tif'))}")
    return re.sub(r"(?m)^surface_elevation_m = .*\n", "", text)


# The glide of tests/cli/test_airspace_cli.py: west to east through the Brennick zone.
GLIDE = ["glide", "--polar", str(ROOT / "polars" / "club.toml"), "--height-m", "1300", "--arrival-elevation-m", "312",
         "--from", "45.5,-34.45", "--to", "45.46,-33.85"]


def _tiff_seed(folder: Path) -> bytes:
    import numpy as np
    import rasterio
    from affine import Affine

    path = folder / "seed.tif"
    data = (np.arange(64, dtype=np.float32).reshape(8, 8) * 10.0) + 100.0
    with rasterio.open(path, "w", driver="GTiff", height=8, width=8, count=1, dtype="float32", crs="EPSG:4326",
                       transform=Affine(0.1, 0.0, -34.0, 0.0, -0.1, 47.0), nodata=-9999.0) as dataset:
        dataset.write(data, 1)
    return path.read_bytes()


# name, suffix, count in the default run, and whether mutations work on text
READERS = {
    "polar": (".toml", 1000, True),
    "task": (".toml", 500, True),
    "geojson": (".geojson", 1000, True),
    "csv": (".csv", 1000, True),
    "geotiff": (".tif", 300, False),
    "airspace": (".geojson", 1000, True),
    "sounding": (".csv", 1000, True),
}


def _commands(reader: str, path: Path, number: int) -> list[list[str]]:
    """The commands each input goes through: ``check`` always, the reader's users on a sample."""
    commands = [["check", str(path)]]
    if reader == "polar" and number % 4 == 0:
        commands.append(["polar", str(path), "--json"])
    elif reader == "airspace" and number % 2 == 0:
        commands.append(GLIDE + ["--airspace", str(path)] + (["--json"] if number % 4 == 0 else []))
    elif reader == "sounding" and number % 2 == 0:
        task = path.with_suffix(".toml")
        task.write_text(_sounding_task(path), encoding="utf-8")
        commands += [["check", str(task)], ["day", str(task)] + (["--json"] if number % 4 == 0 else [])]
    return commands


@pytest.fixture
def alarm():
    def stop(signum, frame):
        raise TimeoutError("a reader hung")

    previous = signal.signal(signal.SIGALRM, stop)
    yield lambda seconds: signal.alarm(seconds)
    signal.alarm(0)
    signal.signal(signal.SIGALRM, previous)


def _outcome_holds(status: int, err: str, path: str, named: str | None = None) -> str | None:
    """What breaks the contract in one run's exit status and stderr, or None. An error must
    name ``path`` (the mutated file) or ``named`` (the task that names it, for a problem of
    the task's own, such as a derived day with no working band at its ``[day] sounding``)."""
    lines = err.splitlines()
    if status == 0:
        return None if not err.strip() else f"exit 0 with stderr {err[:300]!r}"
    if status != 2:
        return f"exit {status}: {err[:300]!r}"
    if not lines:
        return "exit 2 without an error line"
    bad = [line for line in lines if not ERROR_LINE.match(line)]
    if bad or err.count("\n") != len(lines):
        return f"a line that is not a one-line error: {bad[:2]!r}"
    if not any(path in line or (named is not None and named in line) for line in lines):
        return f"no line names the file: {lines[:2]!r}"
    return None


@pytest.mark.parametrize("reader", sorted(READERS))
def test_every_mutated_input_ends_as_the_contract_says(reader, tmp_path, capfd, alarm):
    suffix, count, textual = READERS[reader]
    seed_text = {"polar": lambda: GOOD_POLAR, "task": _task_seed, "geojson": _geojson_seed,
                 "csv": _csv_seed, "airspace": _airspace_seed, "sounding": _sounding_seed}.get(reader)
    seed = seed_text().encode("utf-8") if seed_text else _tiff_seed(tmp_path)
    rng = random.Random(f"{SEED}-{reader}")
    failures, outcomes = [], Counter()  # (command, exit status) -> inputs
    for number in range(int(count * SCALE)):
        if textual and rng.random() < 0.85:
            data = _mutate_text(seed.decode("utf-8"), rng).encode("utf-8", "surrogatepass")
        else:
            data = _mutate_bytes(seed, rng)
        path = tmp_path / f"{reader}-{number}{suffix}"  # a new name each time: no cache sees an old file
        path.write_bytes(data)
        commands = _commands(reader, path, number)
        for command in commands:
            alarm(10)
            try:
                status = main(command)
            except TimeoutError:
                status, err = -1, "hung for 10 s"
            else:
                err = capfd.readouterr().err
            finally:
                alarm(0)
            capfd.readouterr()
            task = str(path.with_suffix(".toml")) if reader == "sounding" and command[1].endswith(".toml") else None
            broken = _outcome_holds(status, err, str(path), task) if status != -1 else err
            outcomes[f"{command[0]} {Path(command[1]).suffix}" if command[0] == "check" else command[0], status] += 1
            if reader == "task" and command[0] == "check" and status == 0 and len(commands) == 1 and number % 5 == 0:
                commands.append(["plan", str(path), "--json"])  # what check passes must also plan
            if broken:
                failures.append(f"{reader} input {number} (seed {SEED}), {command[0]}: {broken}")
        path.unlink()
        path.with_suffix(".toml").unlink(missing_ok=True)
    print(f"{reader}: {int(count * SCALE)} inputs, outcomes {dict(sorted(outcomes.items()))}")
    assert not failures, f"{len(failures)} broken outcomes, the first: " + "\n".join(failures[:5])
    # The generator must reach both outcomes of check, or it tests only one side of each reader;
    # and each command fed on a sample must succeed sometimes, or it never gets past the reader.
    assert min(outcomes[f"check {suffix}", 0], outcomes[f"check {suffix}", 2]) >= 0.02 * count * SCALE, outcomes
    assert all(outcomes[command, 0] > 0 for command, _ in list(outcomes)), outcomes


def _ring(rng: random.Random, lat: float, lon: float, radius_deg: float, corners: int, star: bool, clockwise: bool):
    """A closed ring round (lat, lon): a polygon, or a star when ``star`` (still simple)."""
    positions = []
    for i in range(corners):
        angle = 2.0 * math.pi * i / corners * (-1.0 if clockwise else 1.0)
        r = radius_deg * (rng.uniform(0.2, 1.0) if star else 1.0)
        x = lon + r * math.cos(angle) / max(0.01, math.cos(math.radians(lat)))
        y = lat + r * math.sin(angle)
        digits = rng.choice([4, 6, 9])
        positions.append([round(min(max(x, -180.0), 180.0), digits), round(min(max(y, -90.0), 90.0), digits)])
    return positions + [positions[0]]


def _limits(rng: random.Random) -> tuple[dict, dict]:
    """A floor and a ceiling in any units, the floor below (if the generator can tell)."""
    def one():
        unit = rng.choice(["m", "ft", "FL"])
        low, high = {"m": (-500.0, 30000.0), "ft": (-1600.0, 100000.0), "FL": (0.0, 1000.0)}[unit]
        value = rng.choice([0, round(rng.uniform(low, high)), rng.uniform(low, high)])
        limit = {"value": value, "unit": unit}
        if unit != "FL":
            limit["ref"] = rng.choice(["MSL", "AGL"]) if value >= 0 else "MSL"
        return limit

    metres = {"m": 1.0, "ft": 0.3048, "FL": 30.48}
    a, b = one(), one()
    return (a, b) if a["value"] * metres[a["unit"]] <= b["value"] * metres[b["unit"]] else (b, a)


def _random_airspace(rng: random.Random) -> tuple[dict, float, float]:
    lat = rng.choice([rng.uniform(-89.0, 89.0), 45.5, rng.choice([89.99, -89.99, 0.0])])
    lon = rng.choice([rng.uniform(-180.0, 180.0), -34.0, rng.choice([179.999, -179.999, 0.0])])
    features = []
    for k in range(rng.randint(1, 6)):
        r = rng.choice([1e-3, 0.01, 0.05, 0.5, 5.0, 40.0])
        clat = min(max(lat + rng.uniform(-2 * r, 2 * r), -89.0), 89.0)
        clon = lon + rng.uniform(-2 * r, 2 * r)
        outline = _ring(rng, clat, clon, r, rng.choice([3, 4, 7, 72, 500]), rng.random() < 0.3, rng.random() < 0.5)
        rings = [outline] + ([_ring(rng, clat, clon, 0.1 * r, 8, False, True)] if rng.random() < 0.3 else [])
        geometry = ({"type": "Polygon", "coordinates": rings} if rng.random() < 0.7 else
                    {"type": "MultiPolygon", "coordinates": [rings, [_ring(rng, min(clat + 3 * r, 89.0), clon, r, 5,
                                                                           False, False)]]})
        floor, ceiling = _limits(rng)
        features.append({"type": "Feature", "geometry": geometry,
                         "properties": {"name": f"Fuzz {k}", "class": rng.choice(["A", "D", "danger", None]),
                                        "floor": floor, "ceiling": ceiling}})
    return {"type": "FeatureCollection", "features": features}, lat, lon


def test_random_airspace_and_glides_end_as_the_contract_says(tmp_path, capfd, alarm):
    rng = random.Random(f"{SEED}-random-airspace")
    failures, outcomes = [], Counter()
    count = int(150 * SCALE)
    for number in range(count):
        document, lat, lon = _random_airspace(rng)
        path = tmp_path / f"airspace-{number}.geojson"
        path.write_text(json.dumps(document), encoding="utf-8")
        near = lambda: f"{min(max(lat + rng.uniform(-1, 1), -90.0), 90.0):.6f},{lon + rng.uniform(-1, 1):.6f}"  # noqa: E731
        start = near()
        glide = ["glide", "--polar", str(ROOT / "polars" / "club.toml"), "--height-m", str(rng.choice([300, 1300, 5000])),
                 "--from", start, "--to", rng.choice([start, near()]), "--airspace", str(path)]
        if rng.random() < 0.3:
            glide += ["--terrain", str(DEMO / "terrain.tif"), "--arrival-elevation-m", "300"]
        for command in (["check", str(path)], glide, glide + ["--json"], glide + ["--units", "aviation"]):
            alarm(10)
            try:
                status = main(command)
            except TimeoutError:
                status, err = -1, "hung for 10 s"
            else:
                err = capfd.readouterr().err
            finally:
                alarm(0)
            capfd.readouterr()
            outcomes[command[0], status] += 1
            broken = _outcome_holds(status, err, str(path)) if status != -1 else err
            if broken:
                failures.append(f"random airspace {number} (seed {SEED}), {' '.join(command[:1] + command[3:])}: {broken}")
    print(f"random airspace: {count} files, outcomes {dict(sorted(outcomes.items()))}")
    assert not failures, f"{len(failures)} broken outcomes, the first: " + "\n".join(failures[:5])
    assert min(outcomes["check", 0], outcomes["glide", 0]) >= 0.1 * count, outcomes

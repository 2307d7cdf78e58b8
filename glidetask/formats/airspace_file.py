"""Airspace files: GeoJSON (RFC 7946) of Polygon and MultiPolygon features (shared/CONTRACT.md 2.6).

Properties: ``name`` (required), ``class`` (optional: an ICAO class letter A-G, or
``danger``, ``restricted``, ``prohibited``), ``floor`` and ``ceiling`` (required), each
``{"value": number, "unit": "m" | "ft" | "FL", "ref": "MSL" | "AGL"}`` (no ``ref`` for
``FL``), ``note`` (optional). Holes (interior rings) are honoured. A ring must be closed
(its last position repeats the first), have at least 4 positions, and not cross itself;
a polygon that crosses the antimeridian must be split there (RFC 7946, section 3.1.9), as a
MultiPolygon with one part on each side.

Every problem in the file is reported, as ``feature N (name): WHAT`` (N counts from 1).
"""

from __future__ import annotations

import json
import math
import os
from itertools import chain

import numpy as np

from glidetask.engine.airspace import CLASSES, FOOT_M, REFS, UNITS, Airspace, Limit, Volume
from glidetask.errors import InputError, ProblemCollector
from glidetask.formats.files import read_text

#: Limits beyond these are not airspace [m, ft, FL]: a mistyped number, not a volume.
LIMIT_RANGE = {"m": (-500.0, 30000.0), "ft": (-1600.0, 100000.0), "FL": (0.0, 1000.0)}
#: Edges compared at once in the self-crossing check (bounds its memory for long rings).
_BLOCK = 256
_CLASS_NAMES = {c.lower(): c for c in CLASSES}
_NUMBER_TYPES = {int, float}
_METRES_PER = {"m": 1.0, "ft": FOOT_M, "FL": 100.0 * FOOT_M}  # a flight level as pressure altitude


def read_airspace(path: str | os.PathLike) -> Airspace:
    """Read and validate an airspace file; InputError with every problem found."""
    name = str(path)
    text = read_text(path, name, encoding="utf-8-sig")
    return parse_airspace(text, name)


def is_airspace_document(document) -> bool:
    """True for a FeatureCollection whose features include a (Multi)Polygon and no Point."""
    if not isinstance(document, dict) or not isinstance(document.get("features"), list):
        return False
    kinds = {f.get("geometry", {}).get("type") if isinstance(f, dict) and isinstance(f.get("geometry"), dict)
             else None for f in document["features"]}
    return bool(kinds & {"Polygon", "MultiPolygon"}) and "Point" not in kinds


def parse_airspace(text: str, file: str = "<airspace>") -> Airspace:
    """Volumes from airspace GeoJSON text (see the module docstring)."""
    try:
        document = json.loads(text)
    except json.JSONDecodeError as error:
        raise InputError.one(file, f"line {error.lineno}", f"not valid JSON: {error.msg}") from None
    except RecursionError:  # the parser's own guard against nesting deeper than Python's stack
        raise InputError.one(file, "top level", "JSON nested too deeply: not an airspace file") from None
    except ValueError:  # an integer of more digits than Python converts
        raise InputError.one(file, "top level", "not valid JSON: a number too long to read") from None
    return volumes_from_document(document, file)


def volumes_from_document(document, file: str) -> Airspace:
    """Volumes from a parsed GeoJSON document; InputError with every problem."""
    problems = ProblemCollector(file)
    if not isinstance(document, dict) or document.get("type") != "FeatureCollection":
        raise InputError.one(file, "top level", "expected a GeoJSON FeatureCollection")
    features = document.get("features")
    if not isinstance(features, list):
        raise InputError.one(file, "features", "expected a list of features")
    volumes = []
    checked = _checked_rings(features)
    for number, feature in enumerate(features, start=1):
        volume = _volume(feature, number, problems, checked)
        if volume is not None:
            volumes.append(volume)
    problems.raise_if_any()
    return Airspace(tuple(volumes), source=os.path.basename(file))


def _volume(feature, number: int, problems: ProblemCollector, checked: dict) -> Volume | None:
    if not isinstance(feature, dict) or feature.get("type") != "Feature":
        problems.add(f"feature {number}", "expected a GeoJSON Feature object")
        return None
    properties = feature.get("properties")
    raw_name = properties.get("name") if isinstance(properties, dict) else None
    label = raw_name.strip() if isinstance(raw_name, str) and raw_name.strip() else None
    where = f"feature {number} ({label})" if label else f"feature {number}"
    count = len(problems.problems)
    if not isinstance(properties, dict):
        problems.add(where, f"properties must be an object with name, floor and ceiling, got {_shown(properties)}")
        _geometry(feature.get("geometry"), where, problems, checked)
        return None
    if label is None:
        problems.add(where, "name is required" if raw_name is None or isinstance(raw_name, str)
                     else f"name must be text, got {_shown(raw_name)}")
    airspace_class = _class(properties.get("class"), where, problems)
    floor = _limit(properties.get("floor"), "floor", where, problems)
    ceiling = _limit(properties.get("ceiling"), "ceiling", where, problems)
    note = properties.get("note", "")
    if note is None:
        note = ""
    if not isinstance(note, str):
        problems.add(where, f"note must be text, got {_shown(note)}")
    if floor is not None and ceiling is not None:
        _order(floor, ceiling, where, problems)
    polygons = _geometry(feature.get("geometry"), where, problems, checked)
    if len(problems.problems) > count or polygons is None:
        return None
    return Volume(label, airspace_class, floor, ceiling, polygons, note.strip())


def _number(value) -> bool:
    """A JSON number that converts to a finite float (a bool is not a number)."""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return False
    try:
        return math.isfinite(float(value))
    except OverflowError:  # an integer beyond any float
        return False


def _shown(value) -> str:
    text = json.dumps(value, allow_nan=True)
    return text if len(text) <= 40 else text[:37] + "..."


def _class(value, where: str, problems: ProblemCollector) -> str | None:
    if value is None:
        return None
    if isinstance(value, str) and value.strip().lower() in _CLASS_NAMES:
        return _CLASS_NAMES[value.strip().lower()]
    problems.add(where, f"class must be one of {', '.join(CLASSES)}, got {_shown(value)}")
    return None


def _limit(value, key: str, where: str, problems: ProblemCollector) -> Limit | None:
    if value is None:
        problems.add(where, f"{key} is required ({{\"value\", \"unit\", \"ref\"}})")
        return None
    if not isinstance(value, dict):
        problems.add(where, f"{key} must be an object {{\"value\", \"unit\", \"ref\"}}, got {_shown(value)}")
        return None
    ok = True
    number, unit, ref = value.get("value"), value.get("unit"), value.get("ref")
    if not _number(number):
        problems.add(where, f"{key} value must be a finite number, got {_shown(number)}")
        ok = False
    if unit not in UNITS:
        problems.add(where, f"{key} unit must be one of {', '.join(UNITS)}, got {_shown(unit)}")
        return None
    if unit == "FL":
        if ref is not None:
            problems.add(where, f"{key} ref must be absent for a flight level, got {_shown(ref)}")
            ok = False
    elif ref not in REFS:
        problems.add(where, f"{key} ref must be one of {', '.join(REFS)}, got {_shown(ref)}")
        ok = False
    if not ok:
        return None
    low, high = LIMIT_RANGE[unit]
    if not low <= number <= high:
        problems.add(where, f"{key} value must be in [{low:g}, {high:g}] {unit}, got {number:g}")
        return None
    if ref == "AGL" and number < 0.0:
        problems.add(where, f"{key} value must not be below the ground, got {number:g} {unit} AGL")
        return None
    return Limit(float(number), unit, None if unit == "FL" else ref)


def _order(floor: Limit, ceiling: Limit, where: str, problems: ProblemCollector) -> None:
    """A floor above its ceiling, where the two can be compared without knowing the day:
    both on the same reference, or a flight level against MSL on a standard day (pressure
    altitude, within 0.1 % of the height there)."""
    if (floor.ref == "AGL") != (ceiling.ref == "AGL"):
        return  # one follows the ground: it depends on the place
    if floor.value * _METRES_PER[floor.unit] >= ceiling.value * _METRES_PER[ceiling.unit]:
        problems.add(where, f"floor ({_limit_text(floor)}) must be below the ceiling ({_limit_text(ceiling)})")


def _limit_text(limit: Limit) -> str:
    return f"FL{limit.value:g}" if limit.unit == "FL" else f"{limit.value:g} {limit.unit} {limit.ref}"


def _geometry(geometry, where: str, problems: ProblemCollector, checked: dict):
    if not isinstance(geometry, dict):
        problems.add(where, "geometry must be a Polygon or MultiPolygon object")
        return None
    kind, coordinates = geometry.get("type"), geometry.get("coordinates")
    if kind == "Polygon":
        parts = [coordinates]
    elif kind == "MultiPolygon":
        if not isinstance(coordinates, list) or not coordinates:
            problems.add(where, "MultiPolygon coordinates must be a non-empty list of polygons")
            return None
        parts = coordinates
    else:
        problems.add(where, f"geometry must be a Polygon or MultiPolygon, got {_shown(kind)}")
        return None
    polygons = []
    for p, part in enumerate(parts, start=1):
        label = f"polygon {p}, " if kind == "MultiPolygon" else ""
        polygon = _polygon(part, label, where, problems, checked)
        if polygon is not None:
            polygons.append(polygon)
    return tuple(polygons) if len(polygons) == len(parts) else None


def _polygon(rings, label: str, where: str, problems: ProblemCollector, checked: dict):
    if not isinstance(rings, list) or not rings:
        problems.add(where, f"{label}coordinates must be a non-empty list of rings")
        return None
    out = []
    for r, ring in enumerate(rings):
        name = f"{label}{'outline' if r == 0 else f'hole {r}'}"
        array = checked.get(id(ring))
        if array is None:
            array = _ring(ring, name, where, problems)
        if array is not None:
            out.append(array)
    if len(out) != len(rings):
        return None
    if len(out) > 1:
        outline = out[0]
        from glidetask.engine.airspace import even_odd_inside

        edges = np.hstack([outline[:-1], outline[1:]])
        for r, hole in enumerate(out[1:], start=1):
            if not even_odd_inside(edges, hole[:-1, 0], hole[:-1, 1]).all():
                problems.add(where, f"{label}hole {r} is not inside the outline")
    return tuple(out)


def _checked_rings(features) -> dict[int, np.ndarray]:
    """Rings that pass every check, found for the whole file at once: ``id(ring) -> array``.

    Large files are almost all well-formed, and most outlines convex; checking them all in a
    few array operations keeps a file of thousands of volumes quick. A ring not found here
    (odd positions, not closed, crossing 180 degrees, not strictly convex, no area) goes
    through :func:`_ring`, which checks it in full and says what is wrong.
    """
    rings = []
    for feature in features:
        try:
            geometry = feature["geometry"]
            kind, coordinates = geometry["type"], geometry["coordinates"]
        except (KeyError, TypeError, IndexError):
            continue
        parts = [coordinates] if kind == "Polygon" else coordinates if kind == "MultiPolygon" else []
        for part in parts if isinstance(parts, list) else []:
            for ring in part if isinstance(part, list) else []:
                try:
                    if (type(ring) is list and len(ring) >= 4 and set(map(len, ring)) == {2}
                            and not set(map(type, chain.from_iterable(ring))) - _NUMBER_TYPES):
                        rings.append(ring)
                except TypeError:
                    continue
    if not rings:
        return {}
    try:
        flat = np.array(list(chain.from_iterable(rings)), dtype=float)
    except (OverflowError, ValueError):
        return {}
    lengths = np.fromiter(map(len, rings), dtype=int, count=len(rings))
    ends = np.cumsum(lengths)
    starts = ends - lengths
    bad_position = ~np.isfinite(flat).all(axis=1) | (np.abs(flat[:, 0]) > 180.0) | (np.abs(flat[:, 1]) > 90.0)
    in_range = ~np.logical_or.reduceat(bad_position, starts)
    closed = (flat[starts] == flat[ends - 1]).all(axis=1)
    edges = np.diff(flat, axis=0)  # row k joins position k to k + 1; rows ends - 1 join two rings
    between = ends[:-1] - 1
    following = np.arange(1, len(edges) + 1)
    following[ends - 2] = starts  # the edge after a ring's last is its first
    following[between] = between
    cross = edges[:, 0] * edges[following, 1] - edges[:, 1] * edges[following, 0]
    dot = (edges * edges[following]).sum(axis=1)
    with np.errstate(invalid="ignore"):
        turning = np.arctan2(cross, dot)
    shoelace = flat[:-1, 0] * flat[1:, 1] - flat[1:, 0] * flat[:-1, 1]
    jump = np.abs(edges[:, 0]) > 180.0
    positive, negative = cross > 0.0, cross < 0.0
    for array, neutral in ((turning, 0.0), (shoelace, 0.0), (jump, False), (positive, True), (negative, True)):
        array[between] = neutral
    convex = (np.logical_and.reduceat(positive, starts) | np.logical_and.reduceat(negative, starts))
    convex &= np.abs(np.abs(np.add.reduceat(turning, starts)) - 2.0 * np.pi) < 1e-6
    good = in_range & closed & ~np.logical_or.reduceat(jump, starts) & convex & (np.add.reduceat(shoelace, starts) != 0.0)
    return {id(rings[i]): flat[starts[i]:ends[i]] for i in np.flatnonzero(good)}


def _plain_positions(ring) -> np.ndarray | None:
    """The ring as an ``(n, 2)`` array when every position is two or three plain numbers in
    range, checked at C speed; None sends it to the careful path that says what is wrong."""
    try:
        if set(map(type, chain.from_iterable(ring))) - _NUMBER_TYPES:
            return None
        array = np.array(ring, dtype=float)
    except (TypeError, ValueError, OverflowError):
        return None
    if array.ndim != 2 or array.shape[1] not in (2, 3) or not np.isfinite(array).all():
        return None
    array = array[:, :2]
    if (np.abs(array[:, 0]) > 180.0).any() or (np.abs(array[:, 1]) > 90.0).any():
        return None
    return array


def _ring(ring, name: str, where: str, problems: ProblemCollector):
    if not isinstance(ring, list):
        problems.add(where, f"{name}: a ring must be a list of positions")
        return None
    array = _plain_positions(ring)
    if array is None:
        array = _careful_positions(ring, name, where, problems)
    if array is None:
        return None
    return _ring_shape(array, name, where, problems)


def _careful_positions(ring: list, name: str, where: str, problems: ProblemCollector) -> np.ndarray | None:
    positions = []
    for k, position in enumerate(ring, start=1):
        if (not isinstance(position, list) or len(position) < 2
                or not all(_number(c) for c in position)):
            problems.add(where, f"{name}: position {k} must be [lon, lat] finite numbers, got {_shown(position)}")
            return None
        lon, lat = float(position[0]), float(position[1])
        if not (-180.0 <= lon <= 180.0 and -90.0 <= lat <= 90.0):
            problems.add(where, f"{name}: position {k} [{position[0]}, {position[1]}] is outside "
                                "[-180, 180] longitude, [-90, 90] latitude")
            return None
        positions.append((lon, lat))
    return np.array(positions, dtype=float).reshape(-1, 2)


def _ring_shape(array: np.ndarray, name: str, where: str, problems: ProblemCollector) -> np.ndarray | None:
    """Closed, at least 4 positions, on one side of the antimeridian, not crossing itself."""
    positions = array
    if len(positions) < 4:
        problems.add(where, f"{name}: a ring needs at least 4 positions (the last repeating the first), "
                            f"got {len(positions)}")
        return None
    if not np.array_equal(positions[0], positions[-1]):
        problems.add(where, f"{name}: the ring is not closed (its last position must repeat the first)")
        return None
    jumps = np.flatnonzero(np.abs(np.diff(array[:, 0])) > 180.0)
    if jumps.size:
        k = int(jumps[0]) + 1
        problems.add(where, f"{name}: crosses the antimeridian (longitude {array[k - 1, 0]:g} to "
                            f"{array[k, 0]:g} between positions {k} and {k + 1}); split it at 180 degrees "
                            "into a MultiPolygon (RFC 7946, 3.1.9)")
        return None
    crossing = None if _convex(array) else _self_crossing(array)
    if crossing is not None:
        problems.add(where, f"{name}: the ring crosses itself (edges {crossing[0]} and {crossing[1]})")
        return None
    x, y = array[:, 0], array[:, 1]
    if np.dot(x[:-1], y[1:]) - np.dot(x[1:], y[:-1]) == 0.0:  # twice the shoelace area
        problems.add(where, f"{name}: the ring encloses no area")
        return None
    return array


def _convex(ring: np.ndarray) -> bool:
    """True for a strictly convex ring turning once round: it cannot cross itself
    (the common case, checked in a few array operations before the general test)."""
    edges = np.diff(ring, axis=0)
    following = np.roll(edges, -1, axis=0)
    cross = edges[:, 0] * following[:, 1] - edges[:, 1] * following[:, 0]
    if not ((cross > 0.0).all() or (cross < 0.0).all()):
        return False
    turning = np.arctan2(cross, (edges * following).sum(axis=1)).sum()
    return bool(abs(abs(turning) - 2.0 * np.pi) < 1e-6)


def _self_crossing(ring: np.ndarray) -> tuple[int, int] | None:
    """The first pair of non-neighbouring edges (numbered from 1) that meet, or None.

    Two edges meet when each one's ends are not strictly on the same side of the other;
    collinear edges meet when their extents overlap. Rows of edges are taken in blocks so
    that a long ring needs little memory.
    """
    a, b = ring[:-1], ring[1:]
    n = len(a)
    if n < 4:
        return None
    ax, ay, bx, by = a[:, 0], a[:, 1], b[:, 0], b[:, 1]
    dx, dy = bx - ax, by - ay
    columns = np.arange(n)
    for first in range(0, n, _BLOCK):
        rows = np.arange(first, min(first + _BLOCK, n))
        r = rows[:, None]

        def side(x, y, i_x, i_y, i_dx, i_dy):
            return np.sign(i_dx * (y - i_y) - i_dy * (x - i_x))

        # Edges j against edge i's line, and edges i against edge j's line.
        s1 = side(ax[None, :], ay[None, :], ax[r], ay[r], dx[r], dy[r])
        s2 = side(bx[None, :], by[None, :], ax[r], ay[r], dx[r], dy[r])
        s3 = side(ax[r], ay[r], ax[None, :], ay[None, :], dx[None, :], dy[None, :])
        s4 = side(bx[r], by[r], ax[None, :], ay[None, :], dx[None, :], dy[None, :])
        meet = (s1 * s2 <= 0) & (s3 * s4 <= 0)
        collinear = (s1 == 0) & (s2 == 0)
        if collinear.any():
            overlap = ((np.minimum(ax, bx)[r] <= np.maximum(ax, bx)[None, :])
                       & (np.minimum(ax, bx)[None, :] <= np.maximum(ax, bx)[r])
                       & (np.minimum(ay, by)[r] <= np.maximum(ay, by)[None, :])
                       & (np.minimum(ay, by)[None, :] <= np.maximum(ay, by)[r]))
            meet &= ~collinear | overlap
        gap = np.abs(r - columns[None, :])
        meet &= (columns[None, :] > r) & (gap > 1) & (gap != n - 1)  # each pair once; neighbours share an end
        hits = np.argwhere(meet)
        if hits.size:
            i, j = hits[0]
            return int(rows[i]) + 1, int(j) + 1
    return None

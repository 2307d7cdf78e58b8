"""Turnpoint files: GeoJSON (RFC 7946) and CSV (shared/CONTRACT.md 2.2).

GeoJSON: a FeatureCollection of Point features with coordinates ``[lon, lat]`` or
``[lon, lat, elevation_m]`` and the properties ``name`` (required, unique), ``code``
(optional, unique), ``elevation_m`` (required unless the third coordinate gives it),
``landable`` (default false), ``kind`` (``airfield``, ``field``, ``waypoint``; default
``waypoint``), ``runway_heading_deg``, ``runway_length_m``, ``note``. Problems name the
feature as ``feature N`` (N counts from 1) with its name.

CSV: UTF-8 with a header row naming the columns ``name, code, lat, lon, elevation_m,
landable, kind, note`` (only name, lat, lon and elevation_m are required; the runway
columns ``runway_heading_deg`` and ``runway_length_m`` may be added). Lines starting with
``#`` before the header are comments. Problems name the line as ``line N``.

Every problem in a file is reported, not only the first.
"""

from __future__ import annotations

import csv
import gc
import io
import json
import math
import os
import re
from contextlib import contextmanager
from operator import attrgetter
from pathlib import Path

from glidetask.engine.turnpoint import TURNPOINT_KINDS, Turnpoint
from glidetask.errors import InputError, ProblemCollector
from glidetask.formats.atomic import write_atomic
from glidetask.formats.files import read_text

GEOJSON_SUFFIXES = (".geojson", ".json")
CSV_SUFFIXES = (".csv",)
CSV_COLUMNS = ("name", "code", "lat", "lon", "elevation_m", "landable", "kind", "note")
CSV_EXTRA_COLUMNS = ("runway_heading_deg", "runway_length_m")
CSV_REQUIRED = ("name", "lat", "lon", "elevation_m")
ELEVATION_RANGE_M = (-500.0, 9000.0)  # below the lowest dry land to above the highest summit


def _fold(lon: float) -> float:
    """Longitude in [-180, 180); values already there are kept exactly."""
    return float(lon) if -180.0 <= lon < 180.0 else (lon + 180.0) % 360.0 - 180.0


def turnpoint_format(path: str | os.PathLike) -> str | None:
    """``"geojson"``, ``"csv"`` or None, from the file name's suffix."""
    suffix = Path(path).suffix.lower()
    if suffix in GEOJSON_SUFFIXES:
        return "geojson"
    if suffix in CSV_SUFFIXES:
        return "csv"
    return None


def read_turnpoints(path: str | os.PathLike) -> tuple[Turnpoint, ...]:
    """Read and validate a turnpoint file (.geojson/.json or .csv).

    Raises
    ------
    InputError
        With every problem found (unreadable file, malformed content, missing or
        wrong-typed fields, values out of range, duplicate names or codes).
    """
    name = str(path)
    kind = turnpoint_format(path)
    if kind is None:
        raise InputError.one(name, "file", "a turnpoint file must end in .geojson, .json or .csv")
    text = read_text(path, name, encoding="utf-8-sig")
    with _no_cycle_collection():
        if kind == "geojson":
            return parse_geojson(text, name)
        return parse_csv(text, name)


@contextmanager
def _no_cycle_collection():
    """Pause the cycle collector while a large file becomes objects: they hold no cycles, and
    its passes over hundreds of thousands of new objects take a quarter of the reading time.
    Afterwards the new objects join the oldest generation directly (freeze, then unfreeze),
    so the next young collections do not walk them all once more."""
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        gc.freeze()
        gc.unfreeze()
        if was_enabled:
            gc.enable()


# ---------------------------------------------------------------- field checks


def _finite(value) -> bool:
    """A JSON number that is a finite float (not a bool, not an integer too large for a float)."""
    return type(value) in (int, float) and -1e308 < value < 1e308


def _show(value) -> str:
    """A JSON value for a message: short, on one line."""
    if isinstance(value, dict):
        return "an object"
    if isinstance(value, list):
        return "a list"
    text = json.dumps(value, ensure_ascii=False)
    return text if len(text) <= 80 else text[:77] + "..."


class _Fields:
    """Checks one record's values, reporting problems under ``where``."""

    __slots__ = ("problems", "where", "text_numbers")

    def __init__(self, problems: ProblemCollector, where: str, text_numbers: bool = False):
        self.problems = problems
        self.where = where
        self.text_numbers = text_numbers  # CSV cells are text; JSON numbers must be numbers

    def fail(self, what: str) -> None:
        self.problems.add(self.where, what)

    def number(self, key: str, value, *, low: float | None = None, high: float | None = None,
               positive: bool = False) -> float | None:
        if isinstance(value, str) and self.text_numbers:
            try:
                value = float(value.strip())
            except ValueError:
                self.fail(f"{key} must be a number, got {value!r}")
                return None
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            self.fail(f"{key} must be a number, got {_show(value)}")
            return None
        try:
            value = float(value)
        except OverflowError:
            self.fail(f"{key} must be a finite number, got an integer of {len(str(abs(value)))} digits")
            return None
        if not math.isfinite(value):
            self.fail(f"{key} must be a finite number, got {value!r}")
            return None
        if positive and value <= 0.0:
            self.fail(f"{key} must be greater than 0, got {value:g}")
            return None
        if (low is not None and value < low) or (high is not None and value > high):
            self.fail(f"{key} must be in [{low:g}, {high:g}], got {value:g}")
            return None
        return value

    def text(self, key: str, value, *, required: bool = False) -> str | None:
        if value is None or (isinstance(value, str) and not value.strip()):
            if required:
                self.fail(f"{key} is required")
            return None
        if not isinstance(value, str):
            self.fail(f"{key} must be text, got {_show(value)}")
            return None
        return value.strip()

    def boolean(self, key: str, value) -> bool | None:
        if value is None:
            return False
        if isinstance(value, bool):
            return value
        if isinstance(value, str) and value.strip().lower() in ("true", "false", ""):
            return value.strip().lower() == "true"
        self.fail(f"{key} must be true or false, got {_show(value)}")
        return None

    def kind(self, value) -> str | None:
        if value is None or value == "":
            return "waypoint"
        if isinstance(value, str) and value.strip().lower() in TURNPOINT_KINDS:
            return value.strip().lower()
        self.fail(f"kind must be one of {', '.join(TURNPOINT_KINDS)}, got {_show(value)}")
        return None


def _turnpoint(fields: _Fields, name, code, lat, lon, elevation, landable, kind, heading, length, note):
    """A Turnpoint from raw values, or None after reporting what is wrong with them."""
    name = fields.text("name", name, required=True)
    code = fields.text("code", code)
    lat = None if lat is None else fields.number("lat", lat, low=-90.0, high=90.0)
    lon = None if lon is None else fields.number("lon", lon, low=-360.0, high=360.0)
    elevation = None if elevation is None else fields.number("elevation_m", elevation, low=ELEVATION_RANGE_M[0],
                                                             high=ELEVATION_RANGE_M[1])
    landable = fields.boolean("landable", landable)
    kind = fields.kind(kind)
    heading = None if heading in (None, "") else fields.number("runway_heading_deg", heading, low=0.0, high=360.0)
    length = None if length in (None, "") else fields.number("runway_length_m", length, positive=True)
    note = fields.text("note", note) or ""
    if None in (name, lat, lon, elevation, landable, kind):
        return None
    return Turnpoint(name, code, lat, _fold(lon), elevation, landable, kind,
                     heading, length, note)


def _place(where: str | int, point: Turnpoint) -> str:
    """A record's place: given as text, or as a GeoJSON feature number (text made only when needed)."""
    return where if isinstance(where, str) else f"feature {where} ({point.name})"


def _unique(points: list[Turnpoint]) -> bool:
    """Whether no two of the turnpoints share a name or a code."""
    names = set(map(_NAME, points))
    if len(names) != len(points):
        return False
    codes = [code for code in map(_CODE, points) if code is not None]
    return len(set(codes)) == len(codes)


def _check_unique(problems: ProblemCollector, points: list[tuple[str | int, Turnpoint]]) -> None:
    """Report repeated names and codes, naming where each was first seen."""
    if _unique([point for _, point in points]):
        return  # the usual case, found without a look at each place
    for attribute in ("name", "code"):
        first_seen: dict[str, tuple] = {}
        for where, point in points:
            value = getattr(point, attribute)
            if value is None:
                continue
            if value in first_seen:
                problems.add(_place(where, point),
                             f"{attribute} {value!r} is used again (first at {_place(*first_seen[value])})")
            else:
                first_seen[value] = (where, point)


# ---------------------------------------------------------------- GeoJSON


_NUMBER = (int, float)
_NAME, _CODE = attrgetter("name"), attrgetter("code")
_KINDS = frozenset(TURNPOINT_KINDS)
_FIELDS = ("name", "code", "lat", "lon", "elevation_m", "landable", "kind", "runway_heading_deg",
           "runway_length_m", "note")
_DIRECT = (not hasattr(Turnpoint, "__post_init__") and not hasattr(Turnpoint, "__slots__")
           and tuple(Turnpoint.__dataclass_fields__) == _FIELDS)
_new, _set = object.__new__, object.__setattr__


def _new_turnpoint(name, code, lat, lon, elevation, landable, kind, heading, length, note) -> Turnpoint:
    """A Turnpoint from values already checked. Large files make hundreds of thousands: the
    fields of the frozen dataclass are set directly, several times faster than its __init__
    (which sets each one through object.__setattr__); the same object either way."""
    if not _DIRECT:
        return Turnpoint(name, code, lat, lon, elevation, landable, kind, heading, length, note)
    point = _new(Turnpoint)
    _set(point, "__dict__", {"name": name, "code": code, "lat": lat, "lon": lon, "elevation_m": elevation,
                             "landable": landable, "kind": kind, "runway_heading_deg": heading,
                             "runway_length_m": length, "note": note})
    return point


def _plain_feature(feature, _low=ELEVATION_RANGE_M[0], _high=ELEVATION_RANGE_M[1]) -> Turnpoint | None:
    """The turnpoint of a well-formed feature, checked with as little work as possible, or
    None: then the careful path below looks at it again and says what is wrong.
    (Large files are almost all well-formed; this keeps 200,000 points quick.)"""
    try:
        geometry = feature["geometry"]
        if feature["type"] != "Feature" or geometry["type"] != "Point":
            return None
        coordinates = geometry["coordinates"]
        properties = feature["properties"]
        if type(coordinates) is not list or len(coordinates) != 2 or type(properties) is not dict:
            return None
        lon, lat = coordinates
        name = properties["name"]
        elevation = properties["elevation_m"]
    except (KeyError, TypeError, ValueError):
        return None
    get = properties.get
    code, landable, kind, note = get("code"), get("landable", False), get("kind", "waypoint"), get("note", "")
    heading, length = get("runway_heading_deg"), get("runway_length_m")
    if not (type(lon) in _NUMBER and type(lat) in _NUMBER and type(elevation) in _NUMBER
            and -90.0 <= lat <= 90.0 and -360.0 <= lon <= 360.0 and _low <= elevation <= _high
            and type(name) is str and name and name == name.strip()
            and (code is None or (type(code) is str and code and code == code.strip()))
            and type(landable) is bool and type(kind) is str and kind in _KINDS and type(note) is str
            and (heading is None or (type(heading) in _NUMBER and 0.0 <= heading <= 360.0))
            and (length is None or (type(length) in _NUMBER and 0.0 < length < 1e308))):
        return None
    lon = float(lon)
    if not -180.0 <= lon < 180.0:
        lon = _fold(lon)
    values = {"name": name, "code": code, "lat": float(lat), "lon": lon, "elevation_m": float(elevation),
              "landable": landable, "kind": kind,
              "runway_heading_deg": None if heading is None else float(heading),
              "runway_length_m": None if length is None else float(length), "note": note.strip()}
    if not _DIRECT:
        return Turnpoint(**values)
    point = _new(Turnpoint)
    _set(point, "__dict__", values)
    return point


def _plain_features(features: list) -> list:
    """Each feature's turnpoint by the quick path (None where it needs the careful one). A
    well-formed feature is replaced in ``features`` by its turnpoint as it is read, so that
    its JSON objects are freed at once and a large file never holds both in full."""
    plain = []
    append = plain.append
    for number, feature in enumerate(features):
        point = _plain_feature(feature)
        append(point)
        if point is not None:
            features[number] = point
    return plain


def parse_geojson(text: str, file: str = "<geojson>") -> tuple[Turnpoint, ...]:
    """Turnpoints from GeoJSON text (see the module docstring); InputError with every problem."""
    features = _geojson_features(text, file)
    plain = _plain_features(features)
    if plain and not [None for point in plain if point is None] and _unique(plain):
        return tuple(plain)  # the usual case: every feature well-formed, names and codes unique
    problems = ProblemCollector(file)
    points: list[tuple[str | int, Turnpoint]] = []
    for number, (feature, point) in enumerate(zip(features, plain), start=1):
        if point is not None:
            points.append((number, point))
            continue
        where, point = _careful_feature(feature, number, problems)
        if point is not None:
            points.append((where, point))
    if not features:
        problems.add("features", "the file has no turnpoints")
    _check_unique(problems, points)
    problems.raise_if_any()
    return tuple(point for _, point in points)


def _geojson_features(text: str, file: str) -> list:
    """The features of a GeoJSON FeatureCollection; InputError when the text is not one."""
    try:
        document = json.loads(text)
    except json.JSONDecodeError as error:
        raise InputError.one(file, f"line {error.lineno}", f"not valid JSON: {error.msg}") from None
    except RecursionError:
        raise InputError.one(file, "file", "JSON nested too deeply (arrays or objects inside each other)") from None
    except ValueError as error:  # Python's limit on the digits of an integer
        raise InputError.one(file, "file", f"JSON number too long: {str(error).split(':')[0]}") from None
    if not isinstance(document, dict) or document.get("type") != "FeatureCollection":
        raise InputError.one(file, "top level", "expected a GeoJSON FeatureCollection")
    features = document.get("features")
    if not isinstance(features, list):
        raise InputError.one(file, "features", "expected a list of features")
    return features


def _careful_feature(feature, number: int, problems: ProblemCollector) -> tuple[str, Turnpoint | None]:
    """``(where, turnpoint)`` of a feature the quick path refused, every problem with it added
    to ``problems`` (the turnpoint None when it has one)."""
    where = f"feature {number}"
    if not isinstance(feature, dict) or feature.get("type") != "Feature":
        problems.add(where, "expected a GeoJSON Feature object")
        return where, None
    properties = feature.get("properties")
    if not isinstance(properties, dict):
        problems.add(where, "expected a properties object with at least a name")
        return where, None
    name = properties.get("name")
    if isinstance(name, str) and name.strip():
        where = f"{where} ({name.strip()})"
    fields = _Fields(problems, where)
    geometry = feature.get("geometry")
    coordinates = geometry.get("coordinates") if isinstance(geometry, dict) else None
    if not isinstance(geometry, dict) or geometry.get("type") != "Point":
        fields.fail("geometry must be a Point")
        coordinates = None
    elif not isinstance(coordinates, list) or len(coordinates) not in (2, 3):
        fields.fail("Point coordinates must be [lon, lat] or [lon, lat, elevation_m]")
        coordinates = None
    lon, lat = (coordinates[0], coordinates[1]) if coordinates else (None, None)
    elevation = properties.get("elevation_m")
    if coordinates and len(coordinates) == 3:
        third = fields.number("third coordinate", coordinates[2])
        if elevation is None:
            elevation = third
        elif third is not None and _finite(elevation) and abs(third - float(elevation)) > 0.5:
            fields.fail(f"elevation_m {_show(elevation)} disagrees with the third coordinate {third:g}")
    elif elevation is None and coordinates:
        fields.fail("elevation_m is required (a property or the third coordinate)")
    point = _turnpoint(fields, name, properties.get("code"), lat, lon, elevation,
                       properties.get("landable"), properties.get("kind"),
                       properties.get("runway_heading_deg"), properties.get("runway_length_m"),
                       properties.get("note"))
    return where, point


# ---------------------------------------------------------------- CSV


def _plain_row_reader(index: dict[str, int]):
    """A function giving the turnpoint of a well-formed CSV row quickly, or None: then the
    careful path looks at the row again and says what is wrong (as for GeoJSON features)."""
    at = {column: index.get(column) for column in CSV_COLUMNS + CSV_EXTRA_COLUMNS}
    i_name, i_lat, i_lon, i_elevation = at["name"], at["lat"], at["lon"], at["elevation_m"]
    i_code, i_landable, i_kind, i_note = at["code"], at["landable"], at["kind"], at["note"]
    i_heading, i_length = at["runway_heading_deg"], at["runway_length_m"]
    low, high = ELEVATION_RANGE_M
    flags = {"true": True, "false": False, "": False}

    def optional(row, i, top):
        if i is None or not row[i].strip():
            return None
        value = float(row[i])
        return value if math.isfinite(value) and 0.0 <= value <= top and (top != math.inf or value > 0.0) else _BAD

    def plain(row) -> Turnpoint | None:
        try:
            name = row[i_name]
            lat, lon, elevation = float(row[i_lat]), float(row[i_lon]), float(row[i_elevation])
            heading = optional(row, i_heading, 360.0)
            length = optional(row, i_length, math.inf)
        except ValueError:
            return None
        if not (name and name == name.strip() and -90.0 <= lat <= 90.0 and -360.0 <= lon <= 360.0
                and low <= elevation <= high and heading is not _BAD and length is not _BAD):
            return None
        code = row[i_code].strip() if i_code is not None else ""
        landable = flags.get(row[i_landable].strip().lower()) if i_landable is not None else False
        kind = row[i_kind].strip().lower() if i_kind is not None else ""
        kind = kind or "waypoint"
        if landable is None or kind not in _KINDS:
            return None
        note = row[i_note].strip() if i_note is not None else ""
        return _new_turnpoint(name, code or None, lat, _fold(lon), elevation, landable, kind, heading, length, note)

    return plain


_BAD = object()
_LINE = re.compile(r"[^\r\n]*(?:\r\n|\r|\n|$)")


def parse_csv(text: str, file: str = "<csv>") -> tuple[Turnpoint, ...]:
    """Turnpoints from CSV text (see the module docstring); InputError with every problem."""
    problems = ProblemCollector(file)
    offset = skipped = 0  # comment and blank lines before the header
    for match in _LINE.finditer(text):
        line = match.group()
        if line.strip() and not line.lstrip().startswith("#"):
            break
        offset, skipped = match.end(), skipped + 1
    reader = csv.reader(io.StringIO(text[offset:]))
    try:
        header = next(reader, None)
    except csv.Error as error:
        raise InputError.one(file, f"line {skipped + 1}", f"not valid CSV: {error}") from None
    if header is None:
        raise InputError.one(file, "line 1", f"no header row; expected {','.join(CSV_COLUMNS)}")
    header = [column.strip().lower() for column in header]
    header_where = f"line {skipped + 1}"
    known = CSV_COLUMNS + CSV_EXTRA_COLUMNS
    for column in header:
        if column not in known:
            problems.add(header_where, f"unknown column {column!r}; expected {', '.join(known)}")
    missing = [column for column in CSV_REQUIRED if column not in header]
    if missing:
        problems.add(header_where, f"missing required column(s): {', '.join(missing)}")
    if len(set(header)) != len(header):
        problems.add(header_where, "a column is named twice")
    problems.raise_if_any()
    index = {column: i for i, column in enumerate(header)}
    width = len(header)
    points: list[tuple[str, Turnpoint]] = []  # rows the careful path read
    quick: list[Turnpoint] = []  # rows the quick path read, and the lines they start on
    quick_lines: list[int] = []
    plain = _plain_row_reader(index)
    lines_read = reader.line_num
    try:
        for row in reader:
            start = skipped + lines_read + 1  # the line the record starts on
            lines_read = reader.line_num
            if len(row) == width and row[0][:1] != "#":
                point = plain(row)
                if point is not None:
                    quick.append(point)
                    quick_lines.append(start)
                    continue
            _careful_row(row, f"line {start}", problems, index, width, points)
    except csv.Error as error:  # such as a field over the csv module's size limit; reading ends
        problems.add(f"line {skipped + reader.line_num}", f"not valid CSV: {error}")
    if not points and not problems and _unique(quick):
        if quick:
            return tuple(quick)  # the usual case: every row well-formed, names and codes unique
    points = sorted([(int(where[5:]), where, point) for where, point in points]
                    + [(line, f"line {line}", point) for line, point in zip(quick_lines, quick)],
                    key=lambda item: item[0])
    points = [(where, point) for _, where, point in points]
    if not points and not problems:
        problems.add(f"line {skipped + 2}", "the file has no turnpoints")
    _check_unique(problems, points)
    problems.raise_if_any()
    return tuple(point for _, point in points)


def _careful_row(row: list[str], where: str, problems: ProblemCollector, index: dict[str, int], width: int,
                 points: list) -> None:
    """Check one CSV row the slow way, reporting what is wrong; append its turnpoint if good."""
    if not row or all(not cell.strip() for cell in row) or row[0].lstrip().startswith("#"):
        return
    fields = _Fields(problems, where, text_numbers=True)
    if len(row) != width:
        fields.fail(f"expected {width} fields as in the header, got {len(row)}")
        return

    def cell(column):
        i = index.get(column)
        return None if i is None else row[i]

    for required in CSV_REQUIRED[1:]:
        if not (cell(required) or "").strip():
            fields.fail(f"{required} is required")
    point = _turnpoint(fields, cell("name"), cell("code"), cell("lat") or None, cell("lon") or None,
                       cell("elevation_m") or None, cell("landable"), (cell("kind") or "").strip() or None,
                       cell("runway_heading_deg"), cell("runway_length_m"), cell("note"))
    if point is not None:
        points.append((where, point))


# ---------------------------------------------------------------- writing


def _clean_number(value: float | None, digits: int):
    """``value`` rounded to ``digits`` decimals, written as an integer when it is one."""
    if value is None:
        return None
    rounded = round(float(value), digits)
    return int(rounded) if rounded.is_integer() else rounded


def to_geojson(turnpoints, note: str | None = None) -> str:
    """GeoJSON text for the turnpoints (positions to 1e-6 deg, about 0.1 m)."""
    features = []
    for point in turnpoints:
        properties = {"name": point.name}
        if point.code:
            properties["code"] = point.code
        properties["elevation_m"] = _clean_number(point.elevation_m, 1)
        properties["landable"] = bool(point.landable)
        properties["kind"] = point.kind
        if point.runway_heading_deg is not None:
            properties["runway_heading_deg"] = _clean_number(point.runway_heading_deg, 1)
        if point.runway_length_m is not None:
            properties["runway_length_m"] = _clean_number(point.runway_length_m, 1)
        if point.note:
            properties["note"] = point.note
        features.append({"type": "Feature",
                         "geometry": {"type": "Point", "coordinates": [round(point.lon, 6), round(point.lat, 6)]},
                         "properties": properties})
    # One feature per line: readable, and a diff shows which point changed.
    lines = ['{"type": "FeatureCollection",']
    if note:
        lines.append(f' "note": {json.dumps(note, ensure_ascii=False)},')  # a foreign member (RFC 7946 6.1)
    lines.append(' "features": [')
    lines += ["  " + json.dumps(feature, ensure_ascii=False) + "," for feature in features]
    if features:
        lines[-1] = lines[-1][:-1]
    lines.append("]}")
    return "\n".join(lines) + "\n"


def to_csv(turnpoints, note: str | None = None) -> str:
    """CSV text for the turnpoints, with a ``#`` comment line first if ``note`` is given."""
    turnpoints = list(turnpoints)
    columns = list(CSV_COLUMNS)
    if any(p.runway_heading_deg is not None or p.runway_length_m is not None for p in turnpoints):
        columns += CSV_EXTRA_COLUMNS
    buffer = io.StringIO()
    if note:
        for line in note.splitlines():
            buffer.write(f"# {line}\n")
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(columns)

    def text(value, digits):
        return "" if value is None else f"{_clean_number(value, digits)}"

    for p in turnpoints:
        row = [p.name, p.code or "", f"{p.lat:.6f}", f"{p.lon:.6f}", text(p.elevation_m, 1),
               "true" if p.landable else "false", p.kind, p.note]
        if len(columns) > len(CSV_COLUMNS):
            row += [text(p.runway_heading_deg, 1), text(p.runway_length_m, 1)]
        writer.writerow(row)
    return buffer.getvalue()


def write_turnpoints(path: str | os.PathLike, turnpoints, note: str | None = None) -> None:
    """Write turnpoints as GeoJSON (.geojson/.json) or CSV (.csv), atomically.

    ``note`` (optional) goes into the file as a comment: a top-level ``note`` member in
    GeoJSON, ``#`` lines before the header in CSV.
    """
    kind = turnpoint_format(path)
    if kind is None:
        raise ValueError(f"cannot tell the turnpoint format of {path}: use .geojson, .json or .csv")
    write_atomic(path, to_geojson(turnpoints, note) if kind == "geojson" else to_csv(turnpoints, note))

"""Tasks: turnpoints, zones in order, and the distances and paths a pilot flies.

``nominal_distance_m`` measures centre to centre and ``path_through`` builds the path
through given points; the searches over the zones (the optimized path, the area-task
distance range and targets) are :mod:`glidetask.engine.task_search`. All distances are
geodesics on WGS84 (:mod:`glidetask.engine.geodesy`).

How the zones count (FAI Sporting Code Section 3, Annex A; see :mod:`~glidetask.engine.zones`):
a start or finish line may be crossed anywhere along its length; a start or finish cylinder
counts from its edge; a turn cylinder, sector or keyhole, and an area zone, may be
touched anywhere on or inside it. The shortest path therefore runs from a point of the
start zone, through a point of each zone in turn, to a point of the finish zone.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from glidetask.engine import geodesy
from glidetask.engine.turnpoint import TURNPOINT_KINDS, Turnpoint  # noqa: F401 - re-exported
from glidetask.engine.zones import AREA_KINDS, START_FINISH_KINDS, TURN_KINDS, Zone, boundary, contains, zone_axes

TASK_KINDS = ("racing", "area")


@dataclass(frozen=True)
class TaskPoint:
    """A turnpoint with its observation zone."""

    turnpoint: Turnpoint
    zone: Zone

    @property
    def name(self) -> str:
        return self.turnpoint.name

    @property
    def lat(self) -> float:
        return self.turnpoint.lat

    @property
    def lon(self) -> float:
        return self.turnpoint.lon


@dataclass(frozen=True)
class Task:
    """A task: its points in order (first = start, last = finish, others = turns).

    Attributes
    ----------
    name : str
        Free text.
    kind : str
        ``racing`` (turn zones: cylinder, sector, keyhole) or ``area`` (assigned-area
        task: turn zones area_cylinder or area_sector, and a minimum time).
    points : tuple of TaskPoint
        At least two (three for an area task); start and finish zones are lines or cylinders.
    min_time_s : float or None
        Minimum task time of an area task [s].

    Raises
    ------
    ValueError
        For a zone in the wrong place or an unknown kind (the task file reader reports
        these to the user with the file and key first).
    """

    name: str
    kind: str
    points: tuple[TaskPoint, ...]
    min_time_s: float | None = None

    def __post_init__(self):
        object.__setattr__(self, "points", tuple(self.points))
        for problem in task_problems(self.kind, [p.zone.kind for p in self.points], self.min_time_s):
            raise ValueError(problem[1])

    @cached_property
    def lats(self) -> np.ndarray:
        return _readonly(np.array([p.lat for p in self.points], dtype=float))

    @cached_property
    def lons(self) -> np.ndarray:
        return _readonly(np.array([p.lon for p in self.points], dtype=float))

    @cached_property
    def axes_deg(self) -> tuple[float, ...]:
        """Each zone's axis [deg true] (:func:`glidetask.engine.zones.zone_axes`)."""
        return zone_axes(self.lats, self.lons, [p.zone for p in self.points])

    @property
    def names(self) -> tuple[str, ...]:
        return tuple(p.name for p in self.points)

    @property
    def zones(self) -> tuple[Zone, ...]:
        return tuple(p.zone for p in self.points)


def task_problems(kind: str, zone_kinds: list[str], min_time_s: float | None) -> list[tuple[int | None, str]]:
    """What is wrong with a task's shape: ``(point index or None, message)`` pairs.

    Shared by :class:`Task` (which raises on the first) and the task file reader (which
    reports them all with their keys).
    """
    problems: list[tuple[int | None, str]] = []
    if kind not in TASK_KINDS:
        return [(None, f"unknown task kind {kind!r}; expected racing or area")]
    least = 3 if kind == "area" else 2
    a_kind = "an area" if kind == "area" else "a racing"
    if len(zone_kinds) < least:
        problems.append((None, f"{a_kind} task needs at least {least} points, got {len(zone_kinds)}"))
    turn_kinds = AREA_KINDS if kind == "area" else TURN_KINDS
    last = len(zone_kinds) - 1
    for i, zone_kind in enumerate(zone_kinds):
        role = "start" if i == 0 else "finish" if i == last else "turn"
        allowed = START_FINISH_KINDS if role != "turn" else turn_kinds
        if zone_kind not in allowed:
            problems.append((i, f"a {zone_kind!r} zone cannot be the {role} of {a_kind} task; "
                                f"expected {' or '.join(allowed)}"))
    if kind == "area":
        if min_time_s is None or not min_time_s > 0.0:
            problems.append((None, "an area task needs a positive minimum time"))
    elif min_time_s is not None:
        problems.append((None, "a minimum time belongs to area tasks only"))
    return problems


def _readonly(array: np.ndarray) -> np.ndarray:
    array.setflags(write=False)
    return array


# ---------------------------------------------------------------- paths


@dataclass(frozen=True)
class PathLeg:
    """One leg of a path: geodesic length [m], course at its start and at its end [deg true]."""

    from_name: str
    to_name: str
    distance_m: float
    course_deg: float
    end_course_deg: float


@dataclass(frozen=True, eq=False)
class TaskPath:
    """A path through a task: one point per task point, joined by geodesic legs.

    Attributes
    ----------
    lats, lons : ndarray
        Where the path touches each task point's zone [deg] (read-only arrays).
    legs : tuple of PathLeg
        ``len(lats) - 1`` legs. A leg of zero length (overlapping zones) takes the course
        of the centre-to-centre leg, or 0 if that too has no length.
    """

    lats: np.ndarray
    lons: np.ndarray
    legs: tuple[PathLeg, ...]

    @property
    def total_m(self) -> float:
        """Length of the path [m]."""
        return float(sum(leg.distance_m for leg in self.legs))

    @property
    def cumulative_m(self) -> np.ndarray:
        """Distance along the path at each task point [m] (starts at 0)."""
        return np.concatenate([[0.0], np.cumsum([leg.distance_m for leg in self.legs])])

    def sample(self, spacing_m: float = 1000.0):
        """Dense points along the path, for drawing and terrain profiles.

        Parameters
        ----------
        spacing_m : float
            Largest distance between consecutive points [m].

        Returns
        -------
        lats, lons : ndarray
            Points [deg]; every task point's path point is included.
        along_m : ndarray
            Distance from the start along the path [m].
        """
        return geodesy.path_points(self.lats, self.lons, spacing_m)


def zone_outlines(task: Task, points_per_circle: int = 72) -> list[list[tuple[np.ndarray, np.ndarray]]]:
    """Every task point's zone outline for drawing: one list of ``(lats, lons)`` polylines per
    task point, oriented by the task's legs (:func:`glidetask.engine.zones.boundary`)."""
    return [boundary(p.zone, p.lat, p.lon, axis, points_per_circle) for p, axis in zip(task.points, task.axes_deg)]


def in_zone(task: Task, index: int, lat, lon, tolerance_m: float = 1.0):
    """Whether points lie in the zone of task point ``index`` (see :func:`glidetask.engine.zones.contains`)."""
    point = task.points[index]
    return contains(point.zone, point.lat, point.lon, lat, lon, task.axes_deg[index], tolerance_m)


def nominal_distance_m(task: Task) -> float:
    """Task distance centre to centre [m]: the sum of the geodesics between the task points."""
    return float(np.sum(geodesy.distance(task.lats[:-1], task.lons[:-1], task.lats[1:], task.lons[1:])))


def path_through(task: Task, lats, lons) -> TaskPath:
    """The path through one given point per task point (not checked against the zones).

    Parameters
    ----------
    task : Task
    lats, lons : array_like
        One point per task point [deg], e.g. from :func:`area_targets`.

    Returns
    -------
    TaskPath
    """
    lats = np.array(lats, dtype=float).ravel()
    lons = geodesy.normalize_lon(np.array(lons, dtype=float).ravel())
    if lats.shape != (len(task.points),) or lons.shape != lats.shape:
        raise ValueError(f"expected {len(task.points)} points, got {lats.shape} and {lons.shape}")
    dist, course, end_course = (np.atleast_1d(v) for v in geodesy.inverse(lats[:-1], lons[:-1], lats[1:], lons[1:]))
    nominal_dist, nominal_course, nominal_end = (
        np.atleast_1d(v) for v in geodesy.inverse(task.lats[:-1], task.lons[:-1], task.lats[1:], task.lons[1:]))
    flat = dist < 1e-3  # a zero-length leg has no course of its own
    course = np.where(flat, np.where(nominal_dist < 1e-3, 0.0, nominal_course), course)
    end_course = np.where(flat, np.where(nominal_dist < 1e-3, 0.0, nominal_end), end_course)
    names = task.names
    legs = tuple(PathLeg(names[i], names[i + 1], float(dist[i]), float(course[i]), float(end_course[i]))
                 for i in range(len(dist)))
    return TaskPath(_readonly(lats), _readonly(lons), legs)


def nominal_path(task: Task) -> TaskPath:
    """The path through the zone centres."""
    return path_through(task, task.lats, task.lons)

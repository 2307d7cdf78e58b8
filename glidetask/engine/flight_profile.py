"""The planned height profile of a whole flight, from the flight core's recorded vertices.

:func:`glidetask.engine.flight.fly` with ``record=True`` keeps the first flight's vertices
(``Flown.trace``): its start, the end of every glide (each climb's bottom), the top of
every climb, each leg end of its final glide or of a glide to a landing. Between vertices
the height is linear in distance (a glide at one speed on one leg; a climb drifting with
the wind). :func:`profile_samples` adds samples inside every glide so that no two are more
than ``spacing_m`` apart, and :func:`raised_floors` finds where the ground raised the floor
of the glides above the band bottom.
"""

from __future__ import annotations

import numpy as np

PROFILE_SPACING_M = 250.0  # at most this far between profile samples in a glide [m]


def profile_samples(trace, spacing_m: float = PROFILE_SPACING_M):
    """``(distance_m, height_m, phase)`` of the recorded vertices, densified in the glides.

    ``phase`` is a tuple of "glide" | "climb" | "final": the phase of the stretch that
    ends at the sample (the first sample is the start of a glide). Repeated vertices (an
    event that did not move the flight) are kept once.
    """
    distance, height, phase = [], [], []
    for d, h, p in trace:
        p = "glide" if p == "stop" else p
        if distance and d == distance[-1] and h == height[-1]:
            continue
        if distance and p != "climb" and d > distance[-1] + spacing_m:
            count = int(np.ceil((d - distance[-1]) / spacing_m))
            inner = np.linspace(0.0, 1.0, count + 1)[1:-1]
            distance.extend((distance[-1] + inner * (d - distance[-1])).tolist())
            height.extend((height[-1] + inner * (h - height[-1])).tolist())
            phase.extend([p] * inner.size)
        distance.append(float(d))
        height.append(float(h))
        phase.append(p)
    return np.asarray(distance, dtype=float), np.asarray(height, dtype=float), tuple(phase)


def raised_floors(distance_m, terrain_m, clearance_m: float, band_bottom_m: float):
    """Stretches ``(from_m, to_m, floor_m)`` where terrain + clearance is above the band bottom.

    There the glides' floor follows the ground (:mod:`glidetask.engine.flight_ground`);
    ``floor_m`` is the highest floor in the stretch [m MSL]. Unknown terrain raises nothing.
    """
    distance = np.asarray(distance_m, dtype=float)
    floor = np.asarray(terrain_m, dtype=float) + clearance_m
    raised = np.isfinite(floor) & (floor > band_bottom_m)
    out = []
    edges = np.flatnonzero(np.diff(np.concatenate(([0], raised.astype(np.int8), [0]))))
    for first, end in zip(edges[::2], edges[1::2]):
        # The floor crosses the band bottom between samples: interpolate where it does.
        start = distance[first]
        if first > 0 and np.isfinite(floor[first - 1]):
            start = float(np.interp(band_bottom_m, [floor[first - 1], floor[first]],
                                    [distance[first - 1], distance[first]]))
        stop = distance[end - 1]
        if end < distance.size and np.isfinite(floor[end]):
            stop = float(np.interp(band_bottom_m, [floor[end], floor[end - 1]], [distance[end], distance[end - 1]]))
        out.append((float(start), float(stop), float(np.max(floor[first:end]))))
    return tuple(out)

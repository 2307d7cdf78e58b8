"""The day's thermals: their size and spacing from the depth of the convective layer.

The updraft model of Allen [1]_ gives the outer radius of a thermal at height ``z`` in a
convective layer ``zi`` deep, and the number of thermals in an area. From these come a
default thermal radius for the circling model (:func:`thermal_radii`, with narrow and
broad radii around it) and the mean distance flown along a straight track before meeting
the next thermal (:func:`thermal_search_distance`).

Heights here are above the ground: ``zi`` is the depth of the convective (mixed) layer,
about the thermal top above the terrain below.

References
----------
.. [1] M. J. Allen, "Updraft Model for Development of Autonomous Soaring Uninhabited Air
   Vehicles", AIAA 2006-1510, NASA Dryden Flight Research Center, 2006 (from memory):
   outer updraft radius ``r2 = max(10, 0.102 (z/zi)^(1/3) (1 - 0.25 z/zi) zi)`` [m];
   inner radius ``r1 = (0.0011 r2 + 0.14) r2`` for ``r2 < 600`` m, else ``0.8 r2``;
   updraft flat at its peak inside ``r1``, falling linearly to zero at ``r2``, the peak
   ``3 w_mean (r2^3 - r2^2 r1)/(r2^3 - r1^3)``; ``N = 0.6 X Y/(zi r2)`` thermals over an
   area ``X`` by ``Y``, after the spacing measured by Lenschow and Stephens [2]_.
.. [2] D. H. Lenschow, P. L. Stephens, "The role of thermals in the convective boundary
   layer", Boundary-Layer Meteorology 19, 1980 (from memory, through [1]_).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from glidetask.engine.arrays import scalar_or_array

ALLEN_RADIUS_COEFFICIENT = 0.102  # r2 = 0.102 (z/zi)^(1/3) (1 - 0.25 z/zi) zi [1], from memory
ALLEN_MIN_RADIUS_M = 10.0  # Allen's floor on r2 [m] [1], from memory
ALLEN_THERMAL_DENSITY = 0.6  # N = 0.6 X Y / (zi r2) [1], from memory
DEFAULT_HEIGHT_FRACTION = 0.6  # z/zi where the radius is taken: the middle of a working band
                               # from about 0.3 to 0.9 zi (common practice)
RADIUS_SPREAD = 1.5  # narrow and broad thermals: the typical radius divided and multiplied
                     # by this (our choice, to show the sensitivity; not from [1])




def allen_updraft_radius(height_m, layer_depth_m):
    """Outer radius of a thermal at a height in the convective layer, Allen (2006) [m].

    Parameters
    ----------
    height_m : float or array_like
        Height above the ground [m].
    layer_depth_m : float or array_like
        Depth of the convective layer ``zi`` [m], > 0.

    Returns
    -------
    float or ndarray
        ``r2 = max(10, 0.102 (z/zi)^(1/3) (1 - 0.25 z/zi) zi)`` [m] [1]_; NaN where the
        height is outside ``(0, zi]`` or the depth is not positive.

    Notes
    -----
    The radius grows with height to ``0.0765 zi`` at the top of the layer
    (``d r2/dz = 0`` only at ``z = zi``).
    """
    z = np.asarray(height_m, dtype=float)
    zi = np.asarray(layer_depth_m, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        ratio = z / zi
        radius = np.maximum(ALLEN_MIN_RADIUS_M, ALLEN_RADIUS_COEFFICIENT * np.cbrt(ratio) * (1.0 - 0.25 * ratio) * zi)
    inside = (zi > 0.0) & (ratio > 0.0) & (ratio <= 1.0)
    return scalar_or_array(np.where(inside, radius, np.nan))


@dataclass(frozen=True)
class ThermalRadii:
    """Narrow, typical and broad thermal radii for a day [m] (e-folding radii of the
    circling model's Gaussian core, :func:`glidetask.engine.circling.updraft`)."""

    narrow_m: float
    typical_m: float
    broad_m: float


def thermal_radii(layer_depth_m, height_fraction=DEFAULT_HEIGHT_FRACTION, spread=RADIUS_SPREAD) -> ThermalRadii:
    """Default thermal radii for the circling model from the depth of the convective layer.

    Parameters
    ----------
    layer_depth_m : float or array_like
        Depth of the convective layer ``zi`` above the ground [m], > 0.
    height_fraction : float, default 0.6
        Height ``z/zi`` at which the radius is taken [-], in ``(0, 1]``.
    spread : float, default 1.5
        Narrow is the typical radius divided by this, broad multiplied by it [-], >= 1.

    Returns
    -------
    ThermalRadii
        The typical radius is Allen's outer radius ``r2`` at ``z = height_fraction zi``
        (:func:`allen_updraft_radius`): 0.0731 zi at the default height.

    Raises
    ------
    ValueError
        A height fraction outside ``(0, 1]`` or a spread below 1.

    Notes
    -----
    The circling model's thermal is a Gaussian ``W exp(-(r/R)^2)``; taking ``R = r2``
    matches Allen's profile (flat to ``r1``, linear to zero at ``r2``) where gliders
    circle, at ``0.3-0.6 r2``, to within 0.17 of the core strength for ``r2`` of 100-200 m;
    the Gaussian's tail beyond ``r2`` (where no glider circles) carries updraft that
    Allen's profile does not. Allen's model has no spread of sizes at one height; the
    narrow and broad radii (a factor ``spread^2`` = 2.25 apart by default) are our choice,
    to show how much an answer depends on thermal size.
    """
    if not 0.0 < height_fraction <= 1.0:
        raise ValueError("height_fraction must be in (0, 1]")
    if not spread >= 1.0:
        raise ValueError("spread must be at least 1")
    zi = np.asarray(layer_depth_m, dtype=float)
    typical = np.asarray(allen_updraft_radius(height_fraction * zi, zi))
    return ThermalRadii(narrow_m=scalar_or_array(typical / spread), typical_m=scalar_or_array(typical),
                        broad_m=scalar_or_array(typical * spread))


def thermal_search_distance(layer_depth_m, density=ALLEN_THERMAL_DENSITY):
    """Mean distance flown along a straight track to the next thermal [m].

    Parameters
    ----------
    layer_depth_m : float or array_like
        Depth of the convective layer ``zi`` above the ground [m].
    density : float, default 0.6
        Allen's thermal density coefficient in ``N = density X Y / (zi r2)`` [-].

    Returns
    -------
    float or ndarray
        ``zi / (2 density)``: 0.83 zi by default; NaN where ``zi`` is not positive.

    Notes
    -----
    With ``N/(X Y) = 0.6/(zi r2)`` thermals per unit area, placed at random, a straight
    track meets the thermals whose centres lie within ``r2`` of it, ``2 r2 N/(X Y)`` per
    metre flown; the mean distance between meetings is the inverse, ``zi / 1.2``, whatever
    the thermals' radius ([1]_, the derivation ours). A pilot who reads clouds or other
    gliders finds thermals from further off, and one who rejects weak thermals flies
    further: this is the distance for taking the first thermal flown through.
    """
    zi = np.asarray(layer_depth_m, dtype=float)
    with np.errstate(invalid="ignore"):
        return scalar_or_array(np.where(zi > 0.0, zi / (2.0 * density), np.nan))

"""The glider polar: sink rate against airspeed, fitted and scaled.

A polar file gives a few (IAS, sink) points measured at a reference mass at sea-level
density (:class:`PolarSpec`). The engine fits the quadratic ``sink = a v^2 + b v + c``
by least squares and scales it for the flight's mass, bugs and air density
(:func:`scaled_polar`), giving a :class:`Polar` in true airspeed.

A :class:`Polar` may hold numpy arrays in its fields (one polar per element, e.g. a
sweep over ballast); every method broadcasts.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from glidetask.engine.arrays import scalar_or_array

# A polar file without a stall speed: the lowest valid speed is taken as 1.1 times the
# wings-level stall speed (shared/CONTRACT.md 2.4; a polar is measured down to about
# 1.1 Vs, common practice).
MIN_SPEED_OVER_STALL = 1.1


@dataclass(frozen=True)
class PolarSpec:
    """A polar as its file gives it (shared/CONTRACT.md 2.1), in SI units.

    Attributes
    ----------
    label : str
        Free text naming the example.
    wing_area_m2 : float
        Wing area [m^2].
    reference_mass_kg : float
        Mass at which ``points`` were measured [kg].
    empty_mass_kg : float
        Empty mass (with instruments, no pilot, no water) [kg].
    max_ballast_kg : float
        Largest water ballast load [kg].
    max_mass_kg : float or None
        Largest permitted flying mass [kg]; None for no limit.
    vne_ias_ms : float
        Never-exceed speed, indicated [m/s].
    min_speed_ias_ms : float
        Lowest indicated airspeed at which the polar is valid, wings level [m/s].
    points : tuple of (float, float)
        ``(IAS [m/s], sink [m/s])`` pairs at the reference mass, sea-level density.
    stall_speed_ias_ms : float or None, default None
        Wings-level stall speed, indicated, at the reference mass [m/s]; None where the
        file does not give it (see :attr:`stall_ias_ms`).
    """

    label: str
    wing_area_m2: float
    reference_mass_kg: float
    empty_mass_kg: float
    max_ballast_kg: float
    max_mass_kg: float | None
    vne_ias_ms: float
    min_speed_ias_ms: float
    points: tuple[tuple[float, float], ...]
    stall_speed_ias_ms: float | None = None

    @property
    def stall_speed_defaulted(self) -> bool:
        """True where the file gave no stall speed and :attr:`stall_ias_ms` is the default."""
        return self.stall_speed_ias_ms is None

    @property
    def stall_ias_ms(self) -> float:
        """The wings-level stall speed used, IAS at the reference mass [m/s].

        The given one, else ``min_speed / 1.1`` (:data:`MIN_SPEED_OVER_STALL`).
        """
        if self.stall_speed_ias_ms is None:
            return self.min_speed_ias_ms / MIN_SPEED_OVER_STALL
        return float(self.stall_speed_ias_ms)

    def fit(self) -> tuple[float, float, float, float]:
        """``(a, b, c, rms_ms)`` of the least-squares quadratic through ``points``."""
        return _fit_points(tuple(tuple(map(float, point)) for point in self.points))


@lru_cache(maxsize=256)
def _fit_points(points: tuple[tuple[float, float], ...]) -> tuple[float, float, float, float]:
    speeds, sinks = zip(*points)
    return fit_quadratic(speeds, sinks)


def fit_quadratic(speeds_ms, sinks_ms) -> tuple[float, float, float, float]:
    """Least-squares quadratic ``sink = a v^2 + b v + c`` through polar points.

    Parameters
    ----------
    speeds_ms : array_like
        Airspeeds [m/s], at least three distinct values.
    sinks_ms : array_like
        Sink rates at those speeds, positive downward [m/s].

    Returns
    -------
    a : float
        [s/m]
    b : float
        [-]
    c : float
        [m/s]
    rms_ms : float
        Root-mean-square residual of the fit [m/s].

    Raises
    ------
    ValueError
        Fewer than three points, or fewer than three distinct speeds.
    """
    v = np.asarray(speeds_ms, dtype=float)
    s = np.asarray(sinks_ms, dtype=float)
    if v.shape != s.shape or v.ndim != 1 or np.unique(v).size < 3:
        raise ValueError("a quadratic fit needs at least three points at distinct speeds")
    design = np.column_stack([v * v, v, np.ones_like(v)])
    (a, b, c), *_ = np.linalg.lstsq(design, s, rcond=None)
    residual = s - design @ np.array([a, b, c])
    return float(a), float(b), float(c), float(np.sqrt(np.mean(residual**2)))


@dataclass(frozen=True)
class Polar:
    """A quadratic polar in true airspeed for one mass, bug level and air density.

    ``sink(v) = a v^2 + b v + c`` with ``v`` TAS [m/s], sink positive downward [m/s].
    Fields may be arrays of one shape (one polar per element).

    Attributes
    ----------
    a, b, c : float or ndarray
        Coefficients [s/m], [-], [m/s].
    min_speed_ms : float or ndarray
        Lowest wings-level TAS at which the polar is valid [m/s].
    vne_ms : float or ndarray
        Never-exceed speed as TAS at this density [m/s].
    mass_kg : float or ndarray
        Flying mass [kg].
    wing_area_m2 : float or ndarray
        Wing area [m^2].
    fit_rms_ms : float or ndarray
        RMS residual of the fit, scaled like the sink rates [m/s].
    stall_speed_ms : float or ndarray, default NaN
        Wings-level stall speed as TAS at this mass and density [m/s]; NaN for not
        known, read as ``min_speed_ms / 1.1`` (see :attr:`wings_level_stall_ms`).
    """

    a: float
    b: float
    c: float
    min_speed_ms: float
    vne_ms: float
    mass_kg: float = float("nan")
    wing_area_m2: float = float("nan")
    fit_rms_ms: float = 0.0
    stall_speed_ms: float = float("nan")

    @property
    def wings_level_stall_ms(self):
        """Wings-level stall speed [m/s TAS]: ``stall_speed_ms``, or ``min_speed_ms / 1.1``
        where that is NaN (a polar file without a stall speed, shared/CONTRACT.md 2.4)."""
        stall = np.asarray(self.stall_speed_ms, dtype=float)
        return scalar_or_array(np.where(np.isnan(stall), np.asarray(self.min_speed_ms) / MIN_SPEED_OVER_STALL,
                                         stall))

    def sink(self, speed_ms):
        """Sink rate at a true airspeed [m/s] (the quadratic; no range check)."""
        v = np.asarray(speed_ms, dtype=float)
        return scalar_or_array((np.asarray(self.a) * v + self.b) * v + self.c)

    def sink_slope(self, speed_ms):
        """``d sink / d v`` at a true airspeed [-]."""
        v = np.asarray(speed_ms, dtype=float)
        return scalar_or_array(2.0 * np.asarray(self.a) * v + self.b)

    def clamp(self, speed_ms):
        """``speed_ms`` limited to the valid range ``[min_speed_ms, vne_ms]``."""
        v = np.asarray(speed_ms, dtype=float)
        return scalar_or_array(np.minimum(np.maximum(v, self.min_speed_ms), self.vne_ms))

    @property
    def min_sink_speed_ms(self):
        """Speed of minimum sink [m/s TAS]: the vertex ``-b/(2a)``, clamped to the valid range."""
        return self.clamp(-np.asarray(self.b) / (2.0 * np.asarray(self.a)))

    @property
    def min_sink_ms(self):
        """Minimum sink rate within the valid range [m/s]."""
        return self.sink(self.min_sink_speed_ms)

    @property
    def best_ld_speed_ms(self):
        """Speed of best glide [m/s TAS], clamped to the valid range.

        Notes
        -----
        The tangent from the origin: ``sink/v = a v + b + c/v`` is least at
        ``v = sqrt(c/a)`` (MacCready setting zero in still air).
        """
        with np.errstate(invalid="ignore"):
            tangent = np.sqrt(np.maximum(np.asarray(self.c, dtype=float), 0.0) / self.a)
        return self.clamp(tangent)

    @property
    def best_ld(self):
        """Best glide ratio (lift/drag = distance/height in still air) [-]."""
        speed = self.best_ld_speed_ms
        return scalar_or_array(np.asarray(speed) / np.asarray(self.sink(speed)))

    @property
    def wing_loading_kgm2(self):
        """Wing loading [kg/m^2]."""
        return scalar_or_array(np.asarray(self.mass_kg, dtype=float) / self.wing_area_m2)

    @property
    def shape(self) -> tuple[int, ...]:
        """The broadcast shape of the fields (``()`` for a single polar)."""
        return np.broadcast_shapes(*(np.shape(getattr(self, n)) for n in
                                     ("a", "b", "c", "min_speed_ms", "vne_ms", "stall_speed_ms")))


def scaled_polar(spec: PolarSpec, mass_kg, bugs_percent=0.0, sigma=1.0) -> Polar:
    """The polar of ``spec`` at a flying mass, bug level and air density.

    Parameters
    ----------
    spec : PolarSpec
        The polar as measured (IAS, reference mass, sea-level density).
    mass_kg : float or array_like
        Flying mass [kg], > 0.
    bugs_percent : float or array_like, default 0
        Sink-rate increase at every speed [%].
    sigma : float or array_like, default 1
        Density ratio ``rho/rho0`` [-], > 0 (see :mod:`glidetask.engine.atmosphere`).

    Returns
    -------
    Polar
        In true airspeed; array fields if any argument is an array.

    Raises
    ------
    ValueError
        A non-positive mass or density ratio, or bugs below -100 %.

    Notes
    -----
    At constant lift coefficient, speeds scale with ``k = sqrt(m/m_ref) / sqrt(sigma)``
    and so do sink rates, leaving the glide ratio unchanged [1]_ [2]_. With ``v' = k v``,
    ``s' = k s``: ``a' = a/k``, ``b' = b``, ``c' = c k``. Bugs multiply every sink rate
    by ``(1 + p/100)`` (a simple model: real contamination changes the polar's shape).
    ``min_speed`` and the stall speed scale like the polar's speeds (the stall happens
    at a fixed lift coefficient, so ``Vs`` grows as ``sqrt(m / (rho S))`` [1]_); ``vne``
    is an indicated limit, so its
    TAS is ``vne_ias / sqrt(sigma)`` whatever the mass (shared/CONTRACT.md section 3).

    References
    ----------
    .. [1] F. Thomas, Fundamentals of Sailplane Design, College Park Press, 1999,
       ch. on flight performance (wing-loading scaling of the polar) (from memory).
    .. [2] H. Reichmann, Cross-Country Soaring, Thomson Publications, 1978 (from memory).
    """
    mass = np.asarray(mass_kg, dtype=float)
    density = np.asarray(sigma, dtype=float)
    bugs = np.asarray(bugs_percent, dtype=float)
    if np.any(~(mass > 0.0)) or np.any(~(density > 0.0)):
        raise ValueError("mass and density ratio must be positive and finite")
    if np.any(~(bugs > -100.0)):
        raise ValueError("bugs_percent must be greater than -100")
    a, b, c, rms = spec.fit()
    k = np.sqrt(mass / spec.reference_mass_kg) / np.sqrt(density)
    dirt = 1.0 + bugs / 100.0
    return Polar(
        a=scalar_or_array(a / k * dirt),
        b=scalar_or_array(b * dirt * np.ones_like(k)),
        c=scalar_or_array(c * k * dirt),
        min_speed_ms=scalar_or_array(spec.min_speed_ias_ms * k * np.ones_like(dirt)),
        vne_ms=scalar_or_array(spec.vne_ias_ms / np.sqrt(density) * np.ones_like(k * dirt)),
        mass_kg=scalar_or_array(mass * np.ones_like(k * dirt)),
        wing_area_m2=float(spec.wing_area_m2),
        fit_rms_ms=scalar_or_array(rms * k * dirt),
        stall_speed_ms=scalar_or_array(spec.stall_ias_ms * k * np.ones_like(dirt)),
    )


"""The thermodynamics of the convective layer: potential temperature, the lifting
condensation level, the parcel's thermal top, CAPE, the heat stored by encroachment and
Deardorff's convective velocity scale w*.

:mod:`glidetask.engine.sounding` derives the soaring day from a sounding with these.
MetPy does the thermodynamics (potential temperature, LCL, parcel profile, CAPE); it is
imported inside the functions that need it, so that planning without a sounding never
pays for it. Units: SI (m, s, m/s, Pa, K).

References
----------
.. [1] J. W. Deardorff, "Convective velocity and temperature scales for the unstable
   planetary boundary layer and for Rayleigh convection", J. Atmos. Sci. 27 (1970) 1211-1213.
.. [2] R. B. Stull, *An Introduction to Boundary Layer Meteorology*, Kluwer, 1988:
   section 1.6 (w*), section 11.2 (mixed-layer growth by encroachment) (from memory).
.. [3] MetPy (Unidata): ``potential_temperature``, ``lcl``, ``parcel_profile``,
   ``cape_cin``; the LCL by the exact formula of D. M. Romps, J. Atmos. Sci. 74 (2017), as MetPy documents it.
"""

from __future__ import annotations

import math
import warnings

import numpy as np

from glidetask.engine.atmosphere import G0_MS2

#: Reference pressure of potential temperature [Pa].
THETA_REFERENCE_PA = 100000.0
#: Height step of the encroachment integral [m].
_INTEGRATION_STEP_M = 5.0


# ---------------------------------------------------------------- the mixed layer


def convective_velocity_scale(heat_flux_kms, layer_depth_m, potential_temperature_k):
    """Deardorff's convective velocity scale w* [m/s].

    ``w* = (g / theta * H * flux) ** (1/3)`` with the surface kinematic heat flux
    ``flux`` [K m/s], the convective layer depth ``H`` [m] and the layer's potential
    temperature ``theta`` [K] [1], [2]. Zero where the flux or the depth is not positive.
    """
    flux = np.asarray(heat_flux_kms, dtype=float)
    depth = np.asarray(layer_depth_m, dtype=float)
    buoyancy = G0_MS2 / np.asarray(potential_temperature_k, dtype=float) * np.maximum(depth, 0.0) * np.maximum(flux, 0.0)
    result = np.cbrt(buoyancy)
    return result if result.ndim else float(result)


def encroachment_heat_content(parcel_theta_k, heights_m, environment_theta_k, surface_m):
    """Heat stored in the mixed layer above the morning sounding [K m].

    Encroachment [2]: the layer is mixed to the parcel's potential temperature up to where
    it meets the sounding's; the heat put in by the surface is
    ``integral (theta_parcel - theta_env(z)) dz`` from the surface to that top. Returns
    one value per parcel temperature (``parcel_theta_k`` may be an array).
    """
    z = np.arange(surface_m, heights_m[-1] + 0.5 * _INTEGRATION_STEP_M, _INTEGRATION_STEP_M)
    theta_env = np.interp(z, heights_m, environment_theta_k)
    parcel = np.atleast_1d(np.asarray(parcel_theta_k, dtype=float))[:, None]
    excess = parcel - theta_env[None, :]
    # Only the air below the first level where the environment is as warm as the parcel mixes.
    mixed = np.cumprod(excess > 0.0, axis=1).astype(bool)
    return np.trapezoid(np.where(mixed, excess, 0.0), z, axis=1)



def thermal_top_m(parcel_theta_k, heights_m, theta_env_k, surface_m):
    """Height where the parcel's potential temperature first equals the environment's
    above ``surface_m`` (linear between levels); the surface where the parcel is not
    warmer there; NaN where the sounding ends first."""
    above = heights_m > surface_m
    z = np.concatenate(([surface_m], heights_m[above]))
    theta = np.concatenate(([np.interp(surface_m, heights_m, theta_env_k)], theta_env_k[above]))
    tops = np.full(np.shape(parcel_theta_k), np.nan)
    for index, parcel in np.ndenumerate(np.asarray(parcel_theta_k, dtype=float)):
        excess = parcel - theta
        if excess[0] <= 0.0:
            tops[index] = surface_m
            continue
        meets = np.nonzero(excess <= 0.0)[0]
        if meets.size:
            k = meets[0]
            tops[index] = z[k - 1] + (z[k] - z[k - 1]) * excess[k - 1] / (excess[k - 1] - excess[k])
    return tops


# ---------------------------------------------------------------- MetPy


def potential_temperature_k(pressure_pa, temperature_k):
    """Potential temperature [K] by Poisson's equation (MetPy [3])."""
    import metpy.calc as mpcalc  # heavy: only the sounding path pays for MetPy
    from metpy.units import units

    return np.asarray(mpcalc.potential_temperature(np.asarray(pressure_pa) * units.Pa,
                                                   np.asarray(temperature_k) * units.K).m_as("K"))


def temperature_from_potential_k(pressure_pa, theta_k):
    """Temperature [K] at ``pressure_pa`` of air with potential temperature ``theta_k`` (MetPy [3])."""
    import metpy.calc as mpcalc  # heavy: only the sounding path pays for MetPy
    from metpy.units import units

    return np.asarray(mpcalc.temperature_from_potential_temperature(
        np.asarray(pressure_pa) * units.Pa, np.asarray(theta_k) * units.K).m_as("K"))


def lcl_pressure_pa(pressure_pa, temperature_k, dewpoint_k):
    """Pressure of the lifting condensation level [Pa] of air at the given state (MetPy [3])."""
    import metpy.calc as mpcalc  # heavy: only the sounding path pays for MetPy
    from metpy.units import units

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        p_lcl, _ = mpcalc.lcl(np.asarray(pressure_pa) * units.Pa, np.asarray(temperature_k) * units.K,
                              np.asarray(dewpoint_k) * units.K)
    return np.asarray(p_lcl.m_as("Pa"))



def parcel_cape_jkg(pressure_pa, temperature_k, dewpoint_k) -> float:
    """CAPE [J/kg] of the lowest level's parcel through a profile, from the ground up
    (MetPy [3]); 0 where MetPy finds no level of free convection or equilibrium level."""
    import metpy.calc as mpcalc  # heavy: only the sounding path pays for MetPy
    from metpy.units import units

    p, t, td = (np.asarray(x, dtype=float) for x in (pressure_pa, temperature_k, dewpoint_k))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        try:
            profile = mpcalc.parcel_profile(p * units.Pa, t[0] * units.K, td[0] * units.K)
            cape, _ = mpcalc.cape_cin(p * units.Pa, t * units.K, td * units.K, profile)
        except (ValueError, IndexError):  # MetPy finds no LFC/EL on some dry profiles: no CAPE
            return 0.0
    value = float(cape.m_as("J/kg"))
    return value if math.isfinite(value) else 0.0

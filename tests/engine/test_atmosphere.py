"""The ISO 2533 standard atmosphere against its published table."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from glidetask.engine.atmosphere import (
    air_density,
    density_ratio,
    geopotential_altitude,
    ias_from_tas,
    isa_pressure,
    isa_temperature,
    tas_from_ias,
)

# Source: ISO 2533:1975 / ICAO Doc 7488 standard atmosphere table, geometric altitude
# (from memory). Columns: altitude [m], temperature [degC], pressure [hPa],
# density [kg/m^3], density ratio sigma.
ISA_TABLE = [
    (0.0, 15.00, 1013.25, 1.2250, 1.0000),
    (1000.0, 8.50, 898.76, 1.1117, 0.9075),
    (2000.0, 2.00, 795.01, 1.0066, 0.8217),
    (3000.0, -4.49, 701.21, 0.9093, 0.7423),
    (5000.0, -17.47, 540.48, 0.7364, 0.6012),
]


@pytest.mark.parametrize("altitude_m, temp_c, pressure_hpa, rho, sigma", ISA_TABLE)
def test_matches_the_standard_atmosphere_table(altitude_m, temp_c, pressure_hpa, rho, sigma):
    # Tolerances: half a unit in the table's last printed digit, plus a little rounding slack.
    assert isa_temperature(altitude_m) - 273.15 == pytest.approx(temp_c, abs=0.006)
    assert isa_pressure(altitude_m) / 100.0 == pytest.approx(pressure_hpa, abs=0.006)
    assert air_density(altitude_m) == pytest.approx(rho, abs=0.00006)
    assert density_ratio(altitude_m) == pytest.approx(sigma, abs=0.00006)


def test_tropopause_values():
    # Source: ISO 2533:1975, tropopause at 11 000 m geopotential: 216.65 K, 226.32 hPa (from memory).
    geometric_11km = 11000.0 * 6356766.0 / (6356766.0 - 11000.0)  # inverse of H = r h/(r + h)
    assert geopotential_altitude(geometric_11km) == pytest.approx(11000.0, abs=1e-6)
    assert isa_temperature(geometric_11km) == pytest.approx(216.65, abs=1e-6)
    assert isa_pressure(geometric_11km) / 100.0 == pytest.approx(226.32, abs=0.006)


def test_warm_day_lowers_density_at_the_same_altitude():
    # Source: ideal gas law rho = p/(R T) (physics) in a column 20 C warmer at every height,
    # its pressure integrated hydrostatically (glidetask.engine.atmosphere.column_pressure;
    # checked against a numerical integral in tests/engine/test_day_model.py): the warm
    # column's pressure aloft is higher, its density still lower.
    from glidetask.engine.atmosphere import R_AIR, column_pressure, isa_pressure

    standard = air_density(1500.0)
    warm = air_density(1500.0, isa_deviation_c=20.0)
    temperature = isa_temperature(1500.0)
    assert column_pressure(1500.0, 20.0) > isa_pressure(1500.0)
    assert warm == pytest.approx(column_pressure(1500.0, 20.0) / (R_AIR * (temperature + 20.0)), rel=1e-12)
    assert warm < standard


def test_true_airspeed_from_indicated_uses_the_density_ratio():
    # Source: TAS = EAS / sqrt(sigma) (standard aerodynamics), sigma from the table above.
    assert tas_from_ias(100.0, 3000.0) == pytest.approx(100.0 / math.sqrt(0.7423), rel=1e-4)
    assert ias_from_tas(tas_from_ias(30.0, 2500.0, 10.0), 2500.0, 10.0) == pytest.approx(30.0, rel=1e-12)


def test_scalars_give_floats_and_arrays_give_arrays():
    assert isinstance(density_ratio(1000.0), float)
    sigma = density_ratio(np.array([0.0, 1000.0, 2000.0]))
    assert isinstance(sigma, np.ndarray) and sigma.shape == (3,)
    assert density_ratio(np.array([[0.0], [1000.0]]), np.array([0.0, 10.0])).shape == (2, 2)


def test_outside_the_model_is_nan():
    assert math.isnan(density_ratio(-2500.0))
    assert math.isnan(density_ratio(25000.0))
    assert math.isnan(density_ratio(1000.0, isa_deviation_c=-400.0))


@settings(max_examples=100, deadline=None)
@given(st.floats(-1000.0, 15000.0), st.floats(-1000.0, 15000.0))
def test_density_falls_with_height(h1, h2):
    # Source: hydrostatics (common knowledge): air thins with height.
    low, high = min(h1, h2), max(h1, h2)
    if high - low > 1.0:
        assert density_ratio(high) < density_ratio(low)

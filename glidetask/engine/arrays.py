"""Scalars in, scalars out: the array convention every engine function follows.

Engine functions accept scalars and arrays alike (numpy broadcasting) and give back the
same kind: a Python float for scalar inputs, an ndarray otherwise (as pyproj does).
"""

from __future__ import annotations

import numpy as np


def scalar_or_array(value):
    """``value`` as float64: a Python ``float`` when it is 0-dimensional, else an ndarray."""
    value = np.asarray(value, dtype=float)
    return float(value) if value.ndim == 0 else value

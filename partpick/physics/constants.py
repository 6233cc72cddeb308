"""Physical constants (CODATA, via scipy.constants) and temperature conversions."""

from __future__ import annotations

import numpy as np
from scipy import constants as _c

from partpick.physics._validate import scalar_or_array

BOLTZMANN: float = _c.k
"""Boltzmann constant k [J/K] (CODATA, exact since 2019)."""

ELEMENTARY_CHARGE: float = _c.e
"""Elementary charge q [C] (CODATA, exact since 2019)."""

ZERO_CELSIUS_K: float = _c.zero_Celsius
"""0 °C in kelvin [K]."""

T0_K: float = ZERO_CELSIUS_K + 25.0
"""Datasheet reference temperature, 25 °C [K]."""


def celsius_to_kelvin(temperature_c):
    """Convert °C to K (the boundary where user-facing °C enters the SI core)."""
    return scalar_or_array(np.asarray(temperature_c, dtype=float) + ZERO_CELSIUS_K, temperature_c)


def kelvin_to_celsius(temperature_k):
    """Convert K to °C (for output only)."""
    return scalar_or_array(np.asarray(temperature_k, dtype=float) - ZERO_CELSIUS_K, temperature_k)

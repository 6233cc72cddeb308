"""Argument checks shared by the physics modules.

Every public function validates its inputs with these and so raises a
`ValueError` naming the parameter and an offending value, instead of letting a
NaN travel silently into a result.
"""

from __future__ import annotations

import numpy as np


def _first_bad(values: np.ndarray, bad: np.ndarray) -> float:
    return float(values[bad].flat[0])


def finite(name: str, value) -> np.ndarray:
    """Return ``value`` as a float array; raise ValueError if any element is not finite."""
    arr = np.asarray(value, dtype=float)
    bad = ~np.isfinite(arr)
    if bad.any():
        raise ValueError(f"{name} must be finite, got {_first_bad(arr, bad)!r}")
    return arr


def positive(name: str, value) -> np.ndarray:
    """Return ``value`` as a float array; raise ValueError unless every element is finite and > 0."""
    arr = finite(name, value)
    bad = arr <= 0
    if bad.any():
        raise ValueError(f"{name} must be > 0, got {_first_bad(arr, bad)!r}")
    return arr


def nonnegative(name: str, value) -> np.ndarray:
    """Return ``value`` as a float array; raise ValueError unless every element is finite and ≥ 0."""
    arr = finite(name, value)
    bad = arr < 0
    if bad.any():
        raise ValueError(f"{name} must be ≥ 0, got {_first_bad(arr, bad)!r}")
    return arr


def in_range(name: str, value, low: float, high: float) -> np.ndarray:
    """Return ``value`` as a float array; raise ValueError unless low ≤ value ≤ high everywhere."""
    arr = finite(name, value)
    bad = (arr < low) | (arr > high)
    if bad.any():
        raise ValueError(f"{name} must be within [{low}, {high}], got {_first_bad(arr, bad)!r}")
    return arr


def scalar_or_array(result: np.ndarray, *inputs) -> np.ndarray | float:
    """Return a Python float when every input was a scalar, else the array."""
    if all(np.ndim(x) == 0 for x in inputs):
        return float(result)
    return result

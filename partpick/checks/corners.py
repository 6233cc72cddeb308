"""Corners: every combination of supply (min, max) × load (min, max) × ambient (min, max).

SPEC §4: every role evaluates every corner. The order is fixed (supply
slowest, ambient fastest) so that ties between equal corners break the same
way every time.
"""

from __future__ import annotations

import itertools

import numpy as np

__all__ = ["Corners", "corners_of"]


class Corners:
    """The eight corners of a requirement as parallel arrays (C = 8)."""

    def __init__(self, supply_V, load_A, ambient_C):
        self.supply_V = np.asarray(supply_V, dtype=float)
        self.load_A = np.asarray(load_A, dtype=float)
        self.ambient_C = np.asarray(ambient_C, dtype=float)

    def __len__(self) -> int:
        return self.supply_V.size


def corners_of(requirement) -> Corners:
    """The corners of ``requirement`` (supply × load × ambient, min before max)."""
    combos = list(itertools.product(
        (requirement.supply_min_V, requirement.supply_max_V),
        (requirement.load_min_A, requirement.load_max_A),
        (requirement.ambient_min_C, requirement.ambient_max_C),
    ))
    supply, load, ambient = (np.array(c, dtype=float) for c in zip(*combos))
    return Corners(supply, load, ambient)

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
        # Which end of each range a corner sits at (0 = min, 1 = max), in `corners_of` order.
        index = np.arange(self.supply_V.size)
        self.load_end = (index // 2) % 2
        self.ambient_end = index % 2

    def __len__(self) -> int:
        return self.supply_V.size

    def for_parts(self, count: int, overrides=None) -> tuple[np.ndarray, np.ndarray]:
        """(P, C) ambient [°C] and load [A] at each corner, per-part maxima replacing the requirement's.

        ``overrides`` is a `partpick.checks.roles.base.Overrides` (or None): its
        ``ambient_max_C`` and ``load_max_A`` arrays (P,) replace the max ends (NaN: not for that part).
        """
        ambient = np.broadcast_to(self.ambient_C, (count, len(self))).copy()
        load = np.broadcast_to(self.load_A, (count, len(self))).copy()
        for table, given, ends in ((ambient, getattr(overrides, "ambient_max_C", None), self.ambient_end),
                                   (load, getattr(overrides, "load_max_A", None), self.load_end)):
            if given is not None:  # NaN keeps the requirement's value for that part
                given = np.asarray(given, dtype=float)[:, None]
                table[:, ends == 1] = np.where(np.isfinite(given), given, table[:, ends == 1])
        return ambient, load


def corners_of(requirement) -> Corners:
    """The corners of ``requirement`` (supply × load × ambient, min before max)."""
    combos = list(itertools.product(
        (requirement.supply_min_V, requirement.supply_max_V),
        (requirement.load_min_A, requirement.load_max_A),
        (requirement.ambient_min_C, requirement.ambient_max_C),
    ))
    supply, load, ambient = (np.array(c, dtype=float) for c in zip(*combos))
    return Corners(supply, load, ambient)

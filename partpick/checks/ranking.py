"""Ranking by objective (SPEC §4 "Ranking"), vectorised over the candidates.

Passing parts first, ordered by the objective; then failing parts, fewest
failed checks first, then by their worst margin (least negative first). Ties
break on part number.

Objectives: ``drop`` and ``dissipation`` rank by the role's metric for them
(series: forward drop, dissipation; zener_shunt: regulation error, Zener
power); ``headroom`` by the smallest check margin, largest first; ``price``
(unknown last); ``balanced``: drop, dissipation, smallest margin and price each
scaled 0–1 across the passing parts (0 best), summed with equal weights, an
unknown price counting as the worst.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["Ranking", "rank_candidates", "margin_matrix"]


@dataclass(frozen=True)
class Ranking:
    """Arrays over P candidates plus the rank order."""

    order: np.ndarray          # candidate indices, best first
    rank: np.ndarray           # 1-based rank of each candidate
    passed: np.ndarray         # every present check passed
    failed_count: np.ndarray
    smallest_margin: np.ndarray  # min margin over present checks [%]; −inf where one is not computable


def margin_matrix(checks) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(margins (P, N) with −inf for a null margin and +inf for an absent check, present, failed)."""
    margins = np.stack([c.margin_pct for c in checks], axis=1)
    present = np.stack([c.present for c in checks], axis=1)
    passed = np.stack([c.passed for c in checks], axis=1)
    keyed = np.where(np.isnan(margins), -np.inf, margins)
    # a check that passes without a margin (reported "not rated", not checked) bounds nothing
    keyed = np.where(present & ~(passed & np.isnan(margins)), keyed, np.inf)
    return keyed, present, present & ~passed


def _scaled(x: np.ndarray, worst_when_unknown: bool = True) -> np.ndarray:
    finite = np.isfinite(x)
    if not finite.any():
        return np.ones_like(x)
    low, high = x[finite].min(), x[finite].max()
    span = high - low
    scaled = (x - low) / span if span > 0 else np.zeros_like(x)
    return np.where(finite, scaled, 1.0 if worst_when_unknown else 0.0)


def _objective_key(metrics: dict, name: str) -> np.ndarray:
    """The metric an objective ranks by, smallest first; a leading "-" ranks the largest first."""
    return -metrics[name[1:]] if name.startswith("-") else metrics[name]


def rank_candidates(result, parts, objective: str, objective_metrics: dict) -> Ranking:
    count = parts.count
    if count == 0:
        empty = np.zeros(0)
        return Ranking(np.zeros(0, dtype=int), np.zeros(0, dtype=int), empty.astype(bool), empty.astype(int), empty)
    keyed, present, failed = margin_matrix(result.checks)
    failed_count = failed.sum(axis=1)
    passed = failed_count == 0
    smallest = keyed.min(axis=1)
    drop = _objective_key(result.metrics, objective_metrics["drop"])
    dissipation = _objective_key(result.metrics, objective_metrics["dissipation"])
    price = parts.raw["price"]
    if objective == "drop":
        key = drop
    elif objective == "dissipation":
        key = dissipation
    elif objective == "headroom":
        key = -smallest
    elif objective == "price":
        key = price
    else:  # balanced
        key = np.full(count, np.inf)
        if passed.any():
            p = passed
            key_p = (_scaled(drop[p]) + _scaled(dissipation[p]) + _scaled(-smallest[p]) + _scaled(price[p]))
            key[p] = key_p
    key = np.where(np.isfinite(key), key, np.inf)
    numbers = np.array(parts.part_number, dtype=object)
    name_rank = np.empty(count, dtype=np.int64)
    name_rank[np.argsort(numbers, kind="stable")] = np.arange(count)
    k1 = np.where(passed, 0, 1)
    k2 = np.where(passed, key, failed_count.astype(float))
    k3 = np.where(passed, 0.0, -smallest)
    order = np.lexsort((name_rank, k3, k2, k1))
    rank = np.empty(count, dtype=int)
    rank[order] = np.arange(1, count + 1)
    return Ranking(order, rank, passed, failed_count, smallest)

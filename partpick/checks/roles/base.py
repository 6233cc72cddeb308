"""The small interface every circuit role implements.

A role says which part kinds it considers, and evaluates a whole set of
candidates at once (parts × points as numpy arrays) into a `RoleResult`:
its checks (`partpick.checks.results.CheckArray`), its metrics (SPEC §5 keys,
arrays over parts, NaN where not known) and the per-part internals the curves
and the check sheet need.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from partpick.checks.results import CheckArray, PointTable

__all__ = ["Role", "RoleResult", "Overrides"]


def _or_requirement(given, value, count: int) -> np.ndarray:
    if given is None:
        return np.full(count, float(value))
    given = np.asarray(given, dtype=float)
    return np.where(np.isfinite(given), given, float(value))


@dataclass
class Overrides:
    """Per-candidate values replacing the requirement's (operating limits, sensitivity).

    Each array has shape (P,), one value per candidate; None (or NaN for one
    candidate) keeps the requirement's value. A role that honours these can be bisected over all
    candidates in one call (`partpick.checks.limits`).

    Attributes
    ----------
    ambient_max_C : ndarray (P,), optional
        The highest ambient [°C] (the corners' max end and every "hottest ambient" state).
    load_max_A : ndarray (P,), optional
        The highest load current [A].
    thermal_resistance : ndarray (P,), optional
        RthJA in use [K/W], replacing the part's, the design's or the mount's.
    choices : dict of str to ndarray (P,)
        The role's discrete choices held fixed (from `Role.choices` of a base result),
        e.g. the chosen E-series resistor and its power class.
    """

    ambient_max_C: np.ndarray | None = None
    load_max_A: np.ndarray | None = None
    thermal_resistance: np.ndarray | None = None
    choices: dict = field(default_factory=dict)

    def ambient_max(self, requirement, count: int) -> np.ndarray:
        """(P,) the highest ambient in force [°C]."""
        return _or_requirement(self.ambient_max_C, requirement.ambient_max_C, count)

    def load_max(self, requirement, count: int) -> np.ndarray:
        """(P,) the highest load in force [A]."""
        return _or_requirement(self.load_max_A, requirement.load_max_A, count)

    def ambient_table(self, requirement, ambient_C, hot, count: int) -> np.ndarray:
        """(P, K) ambients [°C] of K points whose ``hot`` ones (bool (K,)) sit at the highest ambient."""
        table = np.broadcast_to(np.asarray(ambient_C, dtype=float), (count, len(ambient_C))).copy()
        if self.ambient_max_C is not None:
            table[:, np.asarray(hot, dtype=bool)] = self.ambient_max(requirement, count)[:, None]
        return table

    def choice(self, name: str, default):
        """A held discrete choice (P,), or ``default`` where the base check is being made."""
        return self.choices.get(name, default)


@dataclass
class RoleResult:
    """What a role computed for P candidates.

    Attributes
    ----------
    points : PointTable
        The points the checks refer to.
    checks : list of CheckArray
        In sheet order (``data_missing`` last).
    metrics : dict of str to ndarray (P,)
        SPEC §5 metric keys; NaN where not known.
    metric_points : dict of str to ndarray of int (P,)
        The point where each worst-case metric was found (−1: none).
    internals : dict of str to ndarray
        Per-part resolved parameters (forward model, RthJA, chosen resistor…),
        first axis P; see `partpick.checks.service.candidate_details`.
    """

    points: PointTable
    checks: list[CheckArray]
    metrics: dict[str, np.ndarray]
    metric_points: dict[str, np.ndarray] = field(default_factory=dict)
    internals: dict[str, np.ndarray] = field(default_factory=dict)


class Role:
    """Base class of a circuit role; subclass it in a module of `partpick.checks.roles`.

    Class attributes
    ----------------
    name : str
        The requirement's ``role`` value (``series``).
    label : str
        The words on screen (``Series diode``).
    kinds : tuple of str
        Part kinds the role considers.
    objective_metrics : dict
        Which metric the ``drop`` and ``dissipation`` objectives rank by.
    """

    name: str = ""
    label: str = ""
    kinds: tuple[str, ...] = ()
    objective_metrics: dict[str, str] = {}
    supports_yield: bool = False
    #: Part columns that enter the role's checks (the inputs of "what sets the worst case").
    part_inputs: tuple[str, ...] = ()
    #: Which operating limits apply (`partpick.checks.limits`): the highest ambient, the highest load,
    #: the largest thermal resistance. A role without a load or without steady heating lists fewer.
    limit_searches: tuple[str, ...] = ("ambient", "load", "thermal")
    #: How many listed candidates get operating limits and sensitivity by default (None: the
    #: service's `ANALYSED_CANDIDATES`; 0: on demand only, for roles whose evaluation is costly).
    analysed_candidates: int | None = None
    #: The common requirement keys this role needs besides name, role and the ambient range.
    required_keys: tuple[str, ...] = ("supply_min_V", "supply_max_V", "load_min_A", "load_max_A")
    #: Common keys this role does not use → the hint shown when a file gives one (SPEC §4a).
    unused_keys: dict[str, str] = {}
    #: The role's own requirement table (``[ac]``…), or None.
    table = None  # partpick.checks.role_table.RoleTable | None
    #: The curve sections `curves` returns, and the plots the window and the reports draw of them:
    #: (section, tab title, drawing options for `partpick.plots.draw_section`).
    curve_plots: tuple[tuple[str, str, dict], ...] = ()
    #: Words for the check sheet: how the role computes, its assumptions (one paragraph each).
    method_notes: tuple[str, ...] = ()
    #: Cautions this role adds to the general ones of SPEC §7 (JSON ``cautions``, every report).
    cautions: tuple[str, ...] = ()
    #: Report words of the role's own checks and metrics (`partpick.report.words` merges them),
    #: the shortlist's key metrics, and the part rating each check stresses (field, label, unit).
    check_labels: dict[str, str] = {}
    metric_labels: dict[str, str] = {}
    key_metrics: tuple[str, ...] = ()
    rating_of_check: dict[str, tuple[str, str, str]] = {}

    def considers(self, kind: str) -> bool:
        return kind in self.kinds

    def candidate_kinds(self, requirement) -> tuple[str, ...]:
        """The kinds this requirement's candidates may be (e.g. a bridge package only for a bridge)."""
        return self.kinds

    def choices(self, result: RoleResult) -> dict:
        """The discrete choices of a base result to hold fixed in `Overrides` (none by default)."""
        return {}

    def form_group(self):
        """The role's group of the requirement form (`partpick.checks.role_table.FormGroup`), or None."""
        return self.table.form_group(self.name) if self.table is not None else None

    def check_table(self, values: dict, common: dict, fail) -> None:
        """Cross-key checks of the role's table after each key was validated.

        ``values`` are the table's given keys, ``common`` the validated top-level
        keys; ``fail(key, message)`` raises the bad-input error naming the line.
        """

    def curves(self, requirement: dict, part: dict, candidate: dict, notes: list[str]) -> dict:
        """The role's curve sections of one part (see `partpick.checks.curves`); {} for none."""
        return {}

    def curves_many(self, requirement: dict, parts: list, candidates: list, notes_list: list) -> list[dict]:
        """The sections of several parts (a role may solve them in one vectorised call)."""
        return [self.curves(requirement, p, c, n) for p, c, n in zip(parts, candidates, notes_list)]

    def evaluate(self, requirement, parts, limits,
                 overrides: Overrides | None = None) -> RoleResult:  # pragma: no cover - interface
        """Evaluate every candidate at every point.

        Parameters
        ----------
        requirement : partpick.checks.requirement.Requirement
        parts : partpick.checks.partdata.PartArrays
            The candidates (all of kinds this role considers).
        limits : dict
            `partpick.checks.policy.resolve_limits` output (group → key → ResolvedLimit).
        overrides : Overrides, optional
            Per-candidate ambient max, load max, RthJA in use and held choices; the
            `PointTable` still names the requirement's corners.
        """
        raise NotImplementedError

    def yield_pct(self, requirement, parts, result: RoleResult, index: np.ndarray, runs: int,
                  seed: int) -> dict[str, np.ndarray]:  # pragma: no cover - interface
        """Monte Carlo yield of the candidates ``index`` (roles with ``supports_yield``).

        Returns metric key → (len(index),) [%]: ``yield_pct`` and its 95 % interval
        ``yield_low_pct``, ``yield_high_pct``.
        """
        raise NotImplementedError

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

__all__ = ["Role", "RoleResult"]


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

    def evaluate(self, requirement, parts, limits) -> RoleResult:  # pragma: no cover - interface
        """Evaluate every candidate at every point.

        Parameters
        ----------
        requirement : partpick.checks.requirement.Requirement
        parts : partpick.checks.partdata.PartArrays
            The candidates (all of kinds this role considers).
        limits : dict
            `partpick.checks.policy.resolve_limits` output (group → key → ResolvedLimit).
        """
        raise NotImplementedError

    def yield_pct(self, requirement, parts, result: RoleResult, index: np.ndarray, runs: int,
                  seed: int) -> np.ndarray:  # pragma: no cover - interface
        """Monte Carlo yield [%] of the candidates ``index`` (roles with ``supports_yield``)."""
        raise NotImplementedError

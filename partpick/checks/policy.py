"""Derating policies: named sets of limits per kind group, and where each limit in force came from.

A policy holds, for each kind group (``pn`` — rectifier, signal, fast
recovery —, ``schottky``, ``zener``; `partpick.library.fields.kind_group`),
the limits of SPEC §4 as fractions of the ratings, written in per cent:

============================  ==================================================
``reverse_pct``               reverse voltage ≤ this % of VRRM
``current_pct``               forward current ≤ this % of the derated IF(AV)
``power_pct``                 dissipation ≤ this % of Pallow(Ta)
``tj_cap_C``                  Tj ≤ this [°C] (none: no cap)
``tj_margin_K``               Tj ≤ Tj max − this [K]; the stricter of cap and margin applies
``resistor_power_pct``        resistor power ≤ this % of its class rating
``surge_pct``                 surge peak ≤ this % of IFSM (so I²t ≤ its square × the IFSM I²t rating)
``pulse_power_pct``           TVS pulse power ≤ this % of the moved, derated Ppp rating
============================  ==================================================

A requirement's own keys override the policy (`resolve_limits`); every limit
in force carries its source: ``policy <name>``, ``requirement <key>`` or
``default`` (no policy named: the built-in ``ratings_only``).

The library stores a policy as `Policy.to_dict` (JSON); files are TOML
(`policy_to_toml` / `policy_from_toml`).
"""

from __future__ import annotations

import difflib
import math
import re
import tomllib
from dataclasses import dataclass, field, fields
from typing import Any

from partpick.errors import InputError

__all__ = [
    "load_policies",
    "GROUPS",
    "GroupLimits",
    "Policy",
    "BUILTIN_POLICIES",
    "LIMIT_DESCRIPTIONS",
    "policy_from_toml",
    "policy_to_toml",
    "policy_from_dict",
    "ResolvedLimit",
    "resolve_limits",
    "NO_POLICY_NOTE",
    "HIGH_RELIABILITY_CAUTION",
]

GROUPS = ("pn", "schottky", "zener", "tvs")
GROUP_LABELS = {"pn": "pn rectifier, signal and fast-recovery diodes", "schottky": "Schottky diodes",
                "zener": "Zener diodes", "tvs": "transient-voltage suppressors (TVS)"}
NO_POLICY_NOTE = "no derating policy: ratings only"
HIGH_RELIABILITY_CAUTION = (
    "in line with MIL-STD-975M appendix A as transcribed (a cancelled public standard; verify "
    "before relying on it). Load your own organisation's derating policy for real reviews."
)

LIMIT_DESCRIPTIONS = {
    "reverse_pct": "reverse voltage, % of VRRM",
    "current_pct": "forward current, % of derated IF(AV)",
    "power_pct": "dissipation, % of Pallow(Ta)",
    "tj_cap_C": "junction temperature cap [°C]",
    "tj_margin_K": "junction temperature margin below Tj max [K]",
    "resistor_power_pct": "resistor power, % of its class rating",
    "surge_pct": "surge peak, % of IFSM (I²t then ≤ its square × the IFSM²·t/2 rating)",
    "pulse_power_pct": "TVS pulse power, % of the Ppp rating moved to the waveform and derated",
}
_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.\- ]{0,63}$")


@dataclass(frozen=True)
class GroupLimits:
    """The limits for one kind group; the defaults are the ratings themselves."""

    reverse_pct: float = 100.0
    current_pct: float = 100.0
    power_pct: float = 100.0
    tj_cap_C: float | None = None
    tj_margin_K: float = 0.0
    resistor_power_pct: float = 100.0
    surge_pct: float = 100.0
    pulse_power_pct: float = 100.0

    def to_dict(self) -> dict:
        return {f.name: getattr(self, f.name) for f in fields(self)}


@dataclass(frozen=True)
class Policy:
    """A named derating policy.

    Attributes
    ----------
    name : str
        Unique name (letters, digits, ``_ . -`` and spaces; at most 64 characters).
    description : str
        What the policy is and where its numbers come from.
    groups : dict
        `GroupLimits` for each of `GROUPS`.
    builtin : bool
        True for the three that ship with partpick.
    """

    name: str
    description: str = ""
    groups: dict = field(default_factory=lambda: {g: GroupLimits() for g in GROUPS})
    builtin: bool = field(default=False, compare=False)

    def limits(self, group: str) -> GroupLimits:
        return self.groups[group]

    def to_dict(self) -> dict:
        """The plain dict the library stores (and `from_dict` reads)."""
        return {"name": self.name, "description": self.description,
                "groups": {g: self.groups[g].to_dict() for g in GROUPS}}

    @classmethod
    def from_dict(cls, data: dict, source: str = "policy") -> "Policy":
        """Validate and build a policy from `to_dict`'s form; InputError names the key."""
        return policy_from_dict(data, source)


def _check_limit(source: str, where: str, key: str, value) -> float | None:
    if key == "tj_cap_C" and value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(f"{source}: {where}.{key}: {value!r} is not a finite number")
    value = float(value)
    if key.endswith("_pct") and not 0 < value <= 100:
        raise InputError(f"{source}: {where}.{key}: {value:g} is out of range (allowed: 0 < value ≤ 100 %)")
    if key == "tj_margin_K" and not 0 <= value <= 200:
        raise InputError(f"{source}: {where}.{key}: {value:g} is out of range (allowed: 0 ≤ value ≤ 200 K)")
    if key == "tj_cap_C" and not 25 < value <= 250:
        raise InputError(f"{source}: {where}.{key}: {value:g} is out of range (allowed: 25 < value ≤ 250 °C)")
    return value


def _suggest(word: str, valid) -> str:
    close = difflib.get_close_matches(word, list(valid), n=1, cutoff=0.6)
    return f" (did you mean '{close[0]}'?)" if close else ""


def policy_from_dict(data: dict, source: str = "policy", *, line_of=None) -> Policy:
    """Build a policy from ``{"name", "description", "groups": {group: {limit: value}}}``.

    A TOML file has the same shape with the groups as top-level tables
    (``[pn]``, ``[schottky]``, ``[zener]``); both are accepted. Limits left
    out of a group are the ratings (100 %, no Tj cap, no margin).
    """
    where = line_of or (lambda table, key: "")
    if not isinstance(data, dict):
        raise InputError(f"{source}: a policy must be a table of keys")
    groups_data = data.get("groups")
    if groups_data is None:
        groups_data = {g: data[g] for g in GROUPS if g in data}
        allowed_top = {"name", "description", *GROUPS}
    else:
        allowed_top = {"name", "description", "groups"}
    for key in data:
        if key not in allowed_top:
            raise InputError(f"{source}{where(None, key)}: unknown key {key!r}{_suggest(key, allowed_top)}")
    name = data.get("name")
    if not isinstance(name, str) or not _NAME.match(name):
        raise InputError(f"{source}{where(None, 'name')}: name {name!r} must be text of 1 to 64 letters, digits, "
                         "'_', '.', '-' or spaces, starting with a letter or digit")
    description = data.get("description", "")
    if not isinstance(description, str):
        raise InputError(f"{source}{where(None, 'description')}: description {description!r} is not text")
    if not isinstance(groups_data, dict):
        raise InputError(f"{source}: groups must be a table of {', '.join(GROUPS)}")
    groups = {}
    known = tuple(f.name for f in fields(GroupLimits))
    for group, values in groups_data.items():
        if group not in GROUPS:
            raise InputError(f"{source}: unknown kind group {group!r} (groups: {', '.join(GROUPS)})"
                             f"{_suggest(group, GROUPS)}")
        if not isinstance(values, dict):
            raise InputError(f"{source}: [{group}] must be a table of limits")
        checked = {}
        for key, value in values.items():
            if key not in known:
                raise InputError(f"{source}{where(group, key)}: [{group}] unknown limit {key!r}{_suggest(key, known)}")
            try:
                checked[key] = _check_limit(source, group, key, value)
            except InputError as exc:
                raise InputError(str(exc).replace(f"{source}:", f"{source}{where(group, key)}:", 1)) from None
        groups[group] = GroupLimits(**checked)
    for group in GROUPS:
        groups.setdefault(group, GroupLimits())
    return Policy(name=name, description=description, groups=groups)


def policy_from_toml(text: str, source: str = "policy") -> Policy:
    """Parse and validate a policy TOML file's text; errors name the line."""
    from partpick.inputs import parse_toml

    try:
        data = parse_toml(text, source)  # bounded: at most 32 levels of nesting
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"{source}: not valid TOML: {exc}") from exc
    from partpick.checks.requirement import _key_line

    def line_of(table, key):
        line = _key_line(text, table, key)
        return f", line {line}" if line else ""

    return policy_from_dict(data, source, line_of=line_of)


def policy_to_toml(policy: Policy) -> str:
    """The policy as TOML (one table per kind group; a missing Tj cap is left out)."""
    import tomli_w

    out: dict[str, Any] = {"name": policy.name, "description": policy.description}
    for group in GROUPS:
        out[group] = {k: v for k, v in policy.groups[group].to_dict().items() if v is not None}
    return tomli_w.dumps(out)


def _uniform(**limits) -> dict:
    return {g: GroupLimits(**limits) for g in GROUPS}


def _builtins() -> dict[str, Policy]:
    ratings_only = Policy(
        "ratings_only",
        "The ratings themselves, no derating (" + NO_POLICY_NOTE + ").",
        _uniform(), builtin=True,
    )
    # Ours (SPEC §4): a usual commercial practice, not taken from a standard.
    commercial_pn = GroupLimits(reverse_pct=80.0, current_pct=80.0, tj_cap_C=125.0, tj_margin_K=25.0,
                                resistor_power_pct=60.0)
    commercial = Policy(
        "commercial",
        "partpick's commercial derating: reverse voltage ≤ 80 % of VRRM (Schottky 75 %), forward current "
        "≤ 80 % of derated IF(AV), Tj ≤ min(125 °C, Tj max − 25 K), Zener power ≤ 60 % of Pallow, "
        "resistor power ≤ 60 % of its class rating, TVS pulse power ≤ 80 % of its rating.",
        {"pn": commercial_pn,
         "schottky": GroupLimits(**{**commercial_pn.to_dict(), "reverse_pct": 75.0}),
         "zener": GroupLimits(**{**commercial_pn.to_dict(), "power_pct": 60.0}),
         "tvs": GroupLimits(**{**commercial_pn.to_dict(), "pulse_power_pct": 80.0})},
        builtin=True,
    )
    # MIL-STD-975M appendix A as transcribed in REFERENCES.md (cancelled 1998): diodes PIV ≤ 70 %,
    # surge ≤ 50 %, current ≤ 50 %, Tj ≤ 125 °C; Zener power ≤ 50 %, Tj ≤ 125 °C; transient
    # suppressors power ≤ 50 %. SPEC §4 adds, from memory — verify: Tj ≤ Tj max − 40 K as well
    # (the stricter of the two applies) and resistor power ≤ 50 %. A limit the table does not name
    # is commercial's, so that no built-in policy is looser than commercial on any limit.
    hirel_common = dict(tj_cap_C=125.0, tj_margin_K=40.0, resistor_power_pct=50.0)
    hirel_diode = dict(reverse_pct=70.0, current_pct=50.0, surge_pct=50.0, **hirel_common)

    def stricter(group: str, **limits) -> GroupLimits:
        return GroupLimits(**{**commercial.groups[group].to_dict(), **limits})

    high_reliability = Policy(
        "high_reliability",
        "Reverse voltage ≤ 70 % of VRRM, forward current ≤ 50 %, surge ≤ 50 %; Zener power ≤ 50 %; "
        "TVS pulse power ≤ 50 %; Tj ≤ min(125 °C, Tj max − 40 K) (the 40 K from memory — verify); "
        "resistor power ≤ 50 % of its class rating (from memory — verify); every other limit as "
        "commercial — " + HIGH_RELIABILITY_CAUTION,
        {"pn": stricter("pn", **hirel_diode), "schottky": stricter("schottky", **hirel_diode),
         "zener": stricter("zener", power_pct=50.0, **hirel_common),
         # transient suppressors: power ≤ 50 % (the same transcribed table), on the pulse rating
         "tvs": stricter("tvs", pulse_power_pct=50.0, **hirel_diode)},
        builtin=True,
    )
    return {p.name: p for p in (ratings_only, commercial, high_reliability)}


BUILTIN_POLICIES: dict[str, Policy] = _builtins()


# ---------------------------------------------------------------------------
# the limits in force for one requirement

@dataclass(frozen=True)
class ResolvedLimit:
    """One limit in force for one kind group: its value and where it came from."""

    value: float | None
    source: str

    def to_dict(self) -> dict:
        return {"value": self.value, "source": self.source}


def resolve_limits(policy: Policy, requirement, *, named: bool = True) -> dict[str, dict[str, ResolvedLimit]]:
    """The limits in force per kind group, requirement keys overriding the policy.

    Parameters
    ----------
    policy : Policy
        The policy the requirement names (or ``ratings_only``).
    requirement : Requirement
        Its ``reverse_margin_pct``, ``tj_margin_K``, ``current_limit_pct``,
        ``power_limit_pct`` and ``resistor_power_limit_pct`` override.
    named : bool
        False when the requirement named no policy: the sources then read
        ``default (no derating policy: ratings only)``.

    Notes
    -----
    ``reverse_margin_pct`` m means reverse voltage ≤ VRRM/(1 + m/100); it is
    converted to the stored form, 100/(1 + m/100) % of VRRM (SPEC §4).
    """
    policy_source = f"policy {policy.name}" if named else f"default ({NO_POLICY_NOTE})"
    overrides = {
        "current_pct": ("current_limit_pct", requirement.current_limit_pct),
        "power_pct": ("power_limit_pct", requirement.power_limit_pct),
        "resistor_power_pct": ("resistor_power_limit_pct", requirement.resistor_power_limit_pct),
        "tj_margin_K": ("tj_margin_K", requirement.tj_margin_K),
    }
    if requirement.reverse_margin_pct is not None:
        overrides["reverse_pct"] = ("reverse_margin_pct", 100.0 / (1.0 + requirement.reverse_margin_pct / 100.0))
    out = {}
    for group in GROUPS:
        base = policy.groups[group].to_dict()
        limits = {}
        for key, value in base.items():
            if key in overrides and overrides[key][1] is not None:
                req_key, req_value = overrides[key]
                limits[key] = ResolvedLimit(float(req_value), f"requirement {req_key}")
            else:
                limits[key] = ResolvedLimit(value, policy_source)
        out[group] = limits
    return out


def load_policies(library) -> dict:
    """The library's stored policies as `Policy` objects (the built-ins are added by the checker).

    ``library`` is anything with ``list_policies()`` (dicts) and ``location`` — the store's
    `Library`; this layer never imports the database. Shared by ``partpick check`` and the window.

    Raises
    ------
    LibraryError
        A stored policy is not valid (the library's content is damaged, not the user's input).
    """
    from partpick.errors import LibraryError

    policies = {}
    for data in library.list_policies():
        name = data.get("name", "?") if isinstance(data, dict) else "?"
        try:
            policy = Policy.from_dict(data, f"{library.location}: stored policy {name!r}")
        except InputError as exc:
            raise LibraryError(f"{exc} (the stored policy is damaged; import it again)") from exc
        policies[policy.name] = policy
    return policies

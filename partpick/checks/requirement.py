"""The requirement: what the circuit position demands, read from and written to TOML.

A requirement file carries SI numbers with the unit in every key (SPEC §5).
`load_requirement` reads one with the standard library's ``tomllib`` and
validates every key; each problem is an `InputError` naming the file, the line,
the key and the value. `requirement_to_toml` writes one back (``tomli_w``).

Defaults live in `DEFAULTS` and `ZENER_DEFAULTS` only; `Requirement.to_dict`
echoes them filled in, so every output states what was assumed.
"""

from __future__ import annotations

import difflib
import math
import re
import tomllib
from dataclasses import dataclass, field, fields
from pathlib import Path
from typing import Any

from partpick.checks.role_table import RoleTable, TableValues
from partpick.errors import InputError
from partpick.library.fields import KINDS, LIFECYCLES

__all__ = [
    "Requirement",
    "ZenerRequirement",
    "ThermalRequirement",
    "THERMAL_DEFAULTS",
    "MOUNTS",
    "DEFAULTS",
    "ZENER_DEFAULTS",
    "OBJECTIVES",
    "AMBIENT_RANGE_C",
    "REQUIRED_KEYS",
    "ZENER_REQUIRED_KEYS",
    "load_requirement",
    "requirement_from_dict",
    "requirement_from_toml",
    "requirement_to_toml",
]

OBJECTIVES = ("drop", "dissipation", "headroom", "price", "balanced")
RESISTOR_SERIES = ("E12", "E24", "E48", "E96")
# Outside this the datasheet ratings (−65…+150/175 °C) mean nothing; a value
# like 298 is usually kelvin typed where °C was meant.
AMBIENT_RANGE_C = (-75.0, 200.0)

REQUIRED_KEYS = ("name", "role", "supply_min_V", "supply_max_V", "load_min_A", "load_max_A",
                 "ambient_min_C", "ambient_max_C")
"""The required keys of the series and Zener roles; another role names its own (`Role.required_keys`)."""
BASE_REQUIRED_KEYS = ("name", "role", "ambient_min_C", "ambient_max_C")
ZENER_REQUIRED_KEYS = ("target_V", "max_regulation_error_pct")

# ---------------------------------------------------------------------------
# THE defaults of a requirement (one place). A value of None is "not used"
# unless its entry in DEFAULT_RULES says how it is derived.
DEFAULTS: dict[str, Any] = {
    "policy": "ratings_only",          # SPEC §4: no policy → limits are the ratings
    "objective": "balanced",
    "reverse_margin_pct": None,        # policy's reverse limit applies
    "reverse_V": None,                 # derived: supply_max_V (the supply reversed)
    "reverse_transient_V": None,
    "max_forward_drop_V": None,
    "min_output_V": None,
    "max_leakage_A": None,
    "tj_margin_K": None,               # policy's Tj margin applies
    "current_limit_pct": None,         # at most this % of the rating; policy's limit applies
    "power_limit_pct": None,
    "resistor_power_limit_pct": None,
    "rth_ja_K_per_W": None,            # each part's own RthJA
    "inrush_capacitance_F": None,
    "inrush_source_ohm": None,
    "handover": None,                  # derived: true (series: it blocks straight from its hot, conducting state)
    "kinds": None,                     # every kind the role considers
    "packages": None,
    "lifecycle": None,
    "max_price": None,
}
ZENER_DEFAULTS: dict[str, Any] = {
    "min_zener_current_A": None,       # derived per part: its Izk
    "resistor_series": "E24",
    "resistor_tolerance_pct": None,    # derived: 5 % E12/E24, 1 % E48/E96
    "resistor_ohm": None,              # chosen from the series
    "resistor_rating_W": None,         # the chosen power class
    "resistor_rated_ambient_C": None,  # derived: 70 °C, full class rating up to here (film resistors)
    "resistor_zero_power_C": None,     # derived: 155 °C, linearly to none here
    "short_circuit": True,             # check an output short against the resistor's rating
    "vz_distribution": "normal",       # yield: Vz normal with tolerance = 3σ, or "uniform" (binned parts)
}
VZ_DISTRIBUTIONS = ("normal", "uniform")
# The [thermal] table (SPEC §3a): how the part is mounted.
MOUNTS = ("board", "heatsink")
THERMAL_DEFAULTS: dict[str, Any] = {
    "rth_cs_K_per_W": 1.0,             # case to sink: an insulating pad (from memory), heatsink mounts only
}
DEFAULT_RULES = {
    "reverse_V": "supply_max_V (the supply reversed)",
    "zener.min_zener_current_A": "each part's izk_A",
    "zener.resistor_tolerance_pct": "5 % for E12/E24, 1 % for E48/E96",
    "zener.resistor_ohm": "the largest value of resistor_series that keeps Iz ≥ Iz min",
    "zener.resistor_rating_W": "the smallest power class covering the resistor's power",
    "zener.resistor_rated_ambient_C": "70 °C (film resistors, common practice)",
    "zener.resistor_zero_power_C": "155 °C (film resistors, common practice)",
    "handover": "true: the series diode blocks straight from its hot, conducting state (false: from switch-on)",
}

# How each key is checked: (kind, lower bound, lower inclusive, upper bound).
_NUM = "number"
_KEY_RULES: dict[str, tuple] = {
    "supply_min_V": (_NUM, 0.0, False, 100e3),
    "supply_max_V": (_NUM, 0.0, False, 100e3),
    "load_min_A": (_NUM, 0.0, True, 10e3),
    "load_max_A": (_NUM, 0.0, True, 10e3),
    "ambient_min_C": (_NUM, AMBIENT_RANGE_C[0], True, AMBIENT_RANGE_C[1]),
    "ambient_max_C": (_NUM, AMBIENT_RANGE_C[0], True, AMBIENT_RANGE_C[1]),
    "reverse_margin_pct": (_NUM, 0.0, True, 1000.0),
    "reverse_V": (_NUM, 0.0, True, 100e3),
    "reverse_transient_V": (_NUM, 0.0, True, 100e3),
    "max_forward_drop_V": (_NUM, 0.0, False, 1000.0),
    "min_output_V": (_NUM, 0.0, True, 100e3),
    "max_leakage_A": (_NUM, 0.0, False, 10.0),
    "tj_margin_K": (_NUM, 0.0, True, 200.0),
    "current_limit_pct": (_NUM, 0.0, False, 100.0),
    "power_limit_pct": (_NUM, 0.0, False, 100.0),
    "resistor_power_limit_pct": (_NUM, 0.0, False, 100.0),
    "rth_ja_K_per_W": (_NUM, 0.0, False, 10e3),
    "inrush_capacitance_F": (_NUM, 0.0, False, 10.0),
    "inrush_source_ohm": (_NUM, 0.0, False, 1e6),
    "max_price": (_NUM, 0.0, True, 1e9),
}
_ZENER_KEY_RULES: dict[str, tuple] = {
    "target_V": (_NUM, 0.0, False, 1000.0),
    "max_regulation_error_pct": (_NUM, 0.0, False, 100.0),
    "min_zener_current_A": (_NUM, 0.0, False, 100.0),
    "resistor_tolerance_pct": (_NUM, 0.0, True, 50.0),
    "resistor_ohm": (_NUM, 0.0, False, 1e9),
    "resistor_rating_W": (_NUM, 0.0, False, 1e6),
    "resistor_rated_ambient_C": (_NUM, AMBIENT_RANGE_C[0], True, AMBIENT_RANGE_C[1]),
    "resistor_zero_power_C": (_NUM, AMBIENT_RANGE_C[0], True, 1000.0),
}
_THERMAL_KEY_RULES: dict[str, tuple] = {
    "copper_area_mm2": (_NUM, 0.0, False, 1e6),
    "rth_cs_K_per_W": (_NUM, 0.0, True, 10e3),
    "rth_sa_K_per_W": (_NUM, 0.0, True, 10e3),
}
# Which keys each mount needs and accepts.
_MOUNT_KEYS = {"board": (("copper_area_mm2",), ("copper_area_mm2",)),
               "heatsink": (("rth_sa_K_per_W",), ("rth_cs_K_per_W", "rth_sa_K_per_W"))}
THERMAL_KEYS = ("mount",) + tuple(_THERMAL_KEY_RULES)
_TEXT_KEYS = ("name", "role", "policy", "objective")
_BOOL_KEYS = ("handover",)
_LIST_KEYS = {"kinds": KINDS, "packages": None, "lifecycle": LIFECYCLES}
# Keys of earlier versions that now have another name (SPEC §4: every percentage is stated
# "at most x % of the rating"); a file giving one is bad input naming the new key.
RENAMED_KEYS: dict[str, str] = {
    "current_derating_pct": "current_limit_pct",
    "power_derating_pct": "power_limit_pct",
    "resistor_power_derating_pct": "resistor_power_limit_pct",
}


def renamed_key_hint(key: str, value) -> str:
    """The refusal of an earlier version's key name, naming the key to write instead."""
    return (f"this key was renamed: write {RENAMED_KEYS[key]} = {value!r} instead "
            "(the same number, read as \"at most this % of the rating\")")


TOP_KEYS = tuple(dict.fromkeys(REQUIRED_KEYS + tuple(DEFAULTS) + ("zener", "thermal")))
ZENER_KEYS = ZENER_REQUIRED_KEYS + tuple(ZENER_DEFAULTS)


@dataclass(frozen=True)
class ZenerRequirement:
    """The ``[zener]`` table of a ``zener_shunt`` requirement (SI units, % as written)."""

    target_V: float
    max_regulation_error_pct: float
    min_zener_current_A: float | None = ZENER_DEFAULTS["min_zener_current_A"]
    resistor_series: str = ZENER_DEFAULTS["resistor_series"]
    resistor_tolerance_pct: float | None = ZENER_DEFAULTS["resistor_tolerance_pct"]
    resistor_ohm: float | None = ZENER_DEFAULTS["resistor_ohm"]
    resistor_rating_W: float | None = ZENER_DEFAULTS["resistor_rating_W"]
    resistor_rated_ambient_C: float | None = ZENER_DEFAULTS["resistor_rated_ambient_C"]
    resistor_zero_power_C: float | None = ZENER_DEFAULTS["resistor_zero_power_C"]
    short_circuit: bool = ZENER_DEFAULTS["short_circuit"]
    vz_distribution: str = ZENER_DEFAULTS["vz_distribution"]

    @property
    def resistor_tolerance(self) -> float:
        """The resistor tolerance in force [%] (the series' usual one when not given)."""
        if self.resistor_tolerance_pct is not None:
            return self.resistor_tolerance_pct
        from partpick.physics.eseries import default_tolerance_pct

        return default_tolerance_pct(self.resistor_series)

    @property
    def rated_ambient_C(self) -> float:
        """The highest ambient at the resistor's full rating in force [°C] (70 °C when not given)."""
        from partpick.physics.eseries import RESISTOR_RATED_AMBIENT_C

        return RESISTOR_RATED_AMBIENT_C if self.resistor_rated_ambient_C is None else self.resistor_rated_ambient_C

    @property
    def zero_power_C(self) -> float:
        """The ambient at which the resistor's rating reaches zero [°C] (155 °C when not given)."""
        from partpick.physics.eseries import RESISTOR_ZERO_POWER_C

        return RESISTOR_ZERO_POWER_C if self.resistor_zero_power_C is None else self.resistor_zero_power_C

    def to_dict(self) -> dict:
        out = {f.name: getattr(self, f.name) for f in fields(self)}
        out["resistor_tolerance_pct"] = self.resistor_tolerance
        out["resistor_rated_ambient_C"] = self.rated_ambient_C
        out["resistor_zero_power_C"] = self.zero_power_C
        return out


@dataclass(frozen=True)
class ThermalRequirement:
    """The ``[thermal]`` table: how the part is mounted (SPEC §3a).

    ``mount = "board"``: on ``copper_area_mm2`` of copper (RthJA from the part's
    two datasheet areas, linear in ln area). ``mount = "heatsink"``: on a
    heatsink of ``rth_sa_K_per_W`` through an interface of ``rth_cs_K_per_W``
    (default 1.0 K/W): RthJA = RthJC + RthCS + RthSA.
    """

    mount: str
    copper_area_mm2: float | None = None
    rth_cs_K_per_W: float | None = None
    rth_sa_K_per_W: float | None = None

    @property
    def interface(self) -> float:
        """RthCS in force [K/W] (the default where not given)."""
        return self.rth_cs_K_per_W if self.rth_cs_K_per_W is not None else THERMAL_DEFAULTS["rth_cs_K_per_W"]

    def to_dict(self) -> dict:
        out = {f.name: getattr(self, f.name) for f in fields(self)}
        if self.mount == "heatsink":
            out["rth_cs_K_per_W"] = self.interface
        return {k: v for k, v in out.items() if v is not None}


@dataclass(frozen=True)
class Requirement:
    """What a circuit position demands (SPEC §5). Units are in the names; temperatures in °C.

    Build one with `load_requirement` or `requirement_from_dict`, which validate;
    the constructor itself does not.
    """

    name: str
    role: str
    ambient_min_C: float
    ambient_max_C: float
    supply_min_V: float | None = None   # required by the roles that name them (Role.required_keys)
    supply_max_V: float | None = None
    load_min_A: float | None = None
    load_max_A: float | None = None
    policy: str | None = None
    objective: str = DEFAULTS["objective"]
    reverse_margin_pct: float | None = None
    reverse_V: float | None = None
    reverse_transient_V: float | None = None
    max_forward_drop_V: float | None = None
    min_output_V: float | None = None
    max_leakage_A: float | None = None
    tj_margin_K: float | None = None
    current_limit_pct: float | None = None
    power_limit_pct: float | None = None
    resistor_power_limit_pct: float | None = None
    rth_ja_K_per_W: float | None = None
    inrush_capacitance_F: float | None = None
    inrush_source_ohm: float | None = None
    handover: bool | None = None
    kinds: tuple[str, ...] | None = None
    packages: tuple[str, ...] | None = None
    lifecycle: tuple[str, ...] | None = None
    max_price: float | None = None
    zener: ZenerRequirement | None = None
    thermal: ThermalRequirement | None = None
    tables: tuple[TableValues, ...] = ()   # the role's own table (RoleTable), validated
    source: str = field(default="requirement", compare=False)

    def table(self, name: str) -> TableValues | None:
        """The validated values of the role table ``name`` (``"ac"``…), or None when not given."""
        for values in self.tables:
            if values._table.name == name:
                return values
        return None

    @property
    def hands_over(self) -> bool:
        """Whether a series diode blocks straight from its conducting state (``handover``, default true)."""
        return self.handover is not False

    @property
    def policy_name(self) -> str:
        """The policy in force: the one named, else the built-in ``ratings_only``."""
        return self.policy if self.policy is not None else DEFAULTS["policy"]

    @property
    def reverse_voltage(self) -> float:
        """The continuous reverse voltage the blocking diode sees [V] (SPEC §4).

        A ``reverse_transient_V`` is a pulse, checked against the peak rating only
        (the ``reverse_transient`` check): it never enters leakage, reverse power or runaway.
        """
        return self.reverse_V if self.reverse_V is not None else self.supply_max_V

    def to_dict(self) -> dict:
        """Every key with the defaults filled in (plain JSON types)."""
        from partpick.checks.roles import ROLES

        unused = ROLES[self.role].unused_keys
        out: dict[str, Any] = {}
        for f in fields(self):
            if f.name in ("source", "zener", "thermal", "tables") or f.name in unused:
                continue
            value = getattr(self, f.name)
            out[f.name] = list(value) if isinstance(value, tuple) else value
        out["policy"] = self.policy_name
        if "reverse_V" in out:
            out["reverse_V"] = self.reverse_V if self.reverse_V is not None else self.supply_max_V
        if self.zener is not None:
            out["zener"] = self.zener.to_dict()
        if self.thermal is not None:
            out["thermal"] = self.thermal.to_dict()
        for values in self.tables:
            out[values._table.name] = values.to_dict()
        return out

    def with_changes(self, **changes) -> "Requirement":
        """A validated copy with some keys changed (used by the desktop app's form)."""
        data = self.to_raw_dict()
        for key, value in changes.items():
            if key in ("zener", "thermal") and isinstance(value, (ZenerRequirement, ThermalRequirement)):
                value = {k: v for k, v in vars(value).items() if v is not None}
            if isinstance(value, TableValues):
                value = value.given
            data[key] = value
        data = {k: v for k, v in data.items() if v is not None}
        for key in ("zener", "thermal"):  # keys not given stay not given (None is not a TOML value)
            if isinstance(data.get(key), dict):
                data[key] = {k: v for k, v in data[key].items() if v is not None}
        return requirement_from_dict(data, self.source)

    def to_raw_dict(self) -> dict:
        """The keys as given (None where not given), the form TOML is written from."""
        out: dict[str, Any] = {}
        for f in fields(self):
            if f.name in ("source", "tables"):
                continue
            value = getattr(self, f.name)
            if isinstance(value, tuple):
                value = list(value)
            if isinstance(value, (ZenerRequirement, ThermalRequirement)):
                value = {g.name: getattr(value, g.name) for g in fields(value)}
            out[f.name] = value
        for values in self.tables:
            out[values._table.name] = values.given
        return out


# ---------------------------------------------------------------------------
# reading and validating

def _key_line(text: str | None, table: str | None, key: str) -> int | None:
    """Line number (1-based) of ``key = ...`` inside ``[table]`` (or the top level)."""
    if not text:
        return None
    current: str | None = None
    pattern = re.compile(rf"^\s*(?:\"{re.escape(key)}\"|'{re.escape(key)}'|{re.escape(key)})\s*=")
    header = re.compile(r"^\s*\[\s*([^\]]+?)\s*\]")
    for number, line in enumerate(text.splitlines(), start=1):
        h = header.match(line)
        if h:
            current = h.group(1).strip().strip('"\'')
            if table is not None and current == table and key == "":
                return number
            continue
        if current == table and pattern.match(line):
            return number
    return None


class _Reader:
    """Collects the place of each problem: file, line, key."""

    def __init__(self, source: str, text: str | None):
        self.source = source
        self.text = text

    def where(self, key: str, table: str | None = None) -> str:
        line = _key_line(self.text, table, key)
        full = (f"{table}.{key}" if key else f"[{table}]") if table else key
        return f"{self.source}, line {line}: {full}" if line else f"{self.source}: {full}"

    def fail(self, key: str, message: str, table: str | None = None) -> None:
        raise InputError(f"{self.where(key, table)}: {message}")


def _suggest(word: str, valid) -> str:
    close = difflib.get_close_matches(word, list(valid), n=1, cutoff=0.6)
    if not close:
        close = difflib.get_close_matches(word.lower(), [v.lower() for v in valid], n=1, cutoff=0.6)
        close = [v for v in valid if v.lower() in close][:1]
    return f" (did you mean '{close[0]}'?)" if close else ""


def _number(reader: _Reader, key: str, value, rule: tuple, table: str | None = None) -> float:
    _, low, low_inclusive, high = rule
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        reader.fail(key, f"{value!r} is not a number (a plain SI number is expected, e.g. 0.5)", table)
    value = float(value)
    if not math.isfinite(value):
        reader.fail(key, f"{value!r} is not a finite number", table)
    too_low = value < low if low_inclusive else value <= low
    if too_low or value > high:
        op = "≤" if low_inclusive else "<"
        what = "must not be negative" if low == 0 and low_inclusive and too_low else "is out of range"
        reader.fail(key, f"{value:g} {what} (allowed: {low:g} {op} value ≤ {high:g})", table)
    return value


def _text(reader: _Reader, key: str, value) -> str:
    if not isinstance(value, str):
        reader.fail(key, f"{value!r} is not text (write it in quotes)")
    if not value.strip():
        reader.fail(key, "is empty")
    return value


def _text_list(reader: _Reader, key: str, value, allowed) -> tuple[str, ...]:
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        reader.fail(key, f"{value!r} is not a list of text, e.g. [\"a\", \"b\"]")
    if not value:
        reader.fail(key, "is an empty list (leave the key out to allow every value)")
    if allowed is not None:
        for item in value:
            if item not in allowed:
                reader.fail(key, f"{item!r} is not one of {', '.join(allowed)}{_suggest(item, allowed)}")
    return tuple(value)


def _roles() -> dict:
    from partpick.checks.roles import ROLES

    return ROLES


def _role_names() -> tuple[str, ...]:
    return tuple(_roles())


def _role_tables() -> dict[str, tuple[str, RoleTable]]:
    """Table name → (role name, its RoleTable), over every registered role."""
    return {r.table.name: (r.name, r.table) for r in _roles().values() if r.table is not None}


def requirement_from_dict(data: dict, source: str = "requirement", *, text: str | None = None) -> Requirement:
    """Validate a requirement given as a dict (the parsed TOML) and build it.

    Parameters
    ----------
    data : dict
        Keys of SPEC §5; ``zener`` is the ``[zener]`` table as a dict.
    source : str
        Where it came from (a file name), for the error messages.
    text : str, optional
        The TOML text, so that errors can name the line.

    Raises
    ------
    InputError
        The first problem, naming the source, line, key and value.
    """
    reader = _Reader(source, text)
    if not isinstance(data, dict):
        raise InputError(f"{source}: a requirement must be a table of keys, got {type(data).__name__}")
    role_tables = _role_tables()
    top_keys = TOP_KEYS + tuple(role_tables)
    for key in data:
        if key in RENAMED_KEYS:
            reader.fail(key, renamed_key_hint(key, data[key]))
        if key not in top_keys:
            reader.fail(key, f"unknown key{_suggest(key, top_keys)}")
    for key in ("name", "role"):
        if key not in data:
            raise InputError(f"{source}: required key {key!r} is missing")
    values: dict[str, Any] = {}
    for key in _TEXT_KEYS:
        if key in data:
            values[key] = _text(reader, key, data[key])
    roles = _role_names()
    if values["role"] not in roles:
        reader.fail("role", f"{values['role']!r} is not a role (roles: {', '.join(roles)})"
                            f"{_suggest(values['role'], roles)}")
    role = _roles()[values["role"]]
    for key in data:
        if key in role.unused_keys:
            reader.fail(key, f"role {role.name!r} does not use this key: {role.unused_keys[key]}")
        if key == "zener" and role.name != "zener_shunt":
            reader.fail("", f"the [zener] table belongs to role 'zener_shunt', not to {role.name!r}", key)
        if key in role_tables and role_tables[key][0] != role.name:
            reader.fail("", f"the [{key}] table belongs to role {role_tables[key][0]!r}, "
                            f"not to {role.name!r}", key)
    required = BASE_REQUIRED_KEYS[:2] + role.required_keys + BASE_REQUIRED_KEYS[2:]
    for key in required:
        if key not in data:
            raise InputError(f"{source}: required key {key!r} is missing (required for role "
                             f"{role.name!r}: {', '.join(required)})")
    if "objective" in values and values["objective"] not in OBJECTIVES:
        reader.fail("objective", f"{values['objective']!r} is not an objective (objectives: "
                                 f"{', '.join(OBJECTIVES)}){_suggest(values['objective'], OBJECTIVES)}")
    for key, rule in _KEY_RULES.items():
        if key in data:
            values[key] = _number(reader, key, data[key], rule)
    for key, allowed in _LIST_KEYS.items():
        if key in data:
            values[key] = _text_list(reader, key, data[key], allowed)
    for key in _BOOL_KEYS:
        if key in data:
            if not isinstance(data[key], bool):
                reader.fail(key, f"{data[key]!r} is not true or false")
            values[key] = data[key]

    for low, high, unit in (("supply_min_V", "supply_max_V", "V"), ("load_min_A", "load_max_A", "A"),
                            ("ambient_min_C", "ambient_max_C", "°C")):
        if low in values and high in values and values[low] > values[high]:
            reader.fail(low, f"{values[low]:g} {unit} is above {high} = {values[high]:g} {unit} (min above max)")
    if ("inrush_capacitance_F" in values) != ("inrush_source_ohm" in values):
        given = "inrush_capacitance_F" if "inrush_capacitance_F" in values else "inrush_source_ohm"
        other = "inrush_source_ohm" if given == "inrush_capacitance_F" else "inrush_capacitance_F"
        reader.fail(given, f"is given without {other} (the surge check needs both)")
    if values["role"] == "series" and values["load_max_A"] <= 0:
        reader.fail("load_max_A", f"{values['load_max_A']:g} A: a series diode needs a load current above 0")

    zener = None
    if "zener" in data:
        zener = _zener_table(reader, data["zener"])
    if values["role"] == "zener_shunt" and zener is None:
        raise InputError(f"{source}: role 'zener_shunt' needs a [zener] table with "
                         f"{', '.join(ZENER_REQUIRED_KEYS)}")
    if zener is not None and "supply_max_V" in values and zener.target_V >= values["supply_max_V"]:
        reader.fail("target_V", f"{zener.target_V:g} V is not below supply_max_V = {values['supply_max_V']:g} V "
                                "(a shunt regulator cannot raise its supply)", "zener")
    thermal = None
    if "thermal" in data:
        thermal = _thermal_table(reader, data["thermal"])
        if "rth_ja_K_per_W" in values:
            reader.fail("rth_ja_K_per_W", "is given together with a [thermal] table; give one or the other "
                                          "(rth_ja_K_per_W is one RthJA for every part, [thermal] says how each "
                                          "part is mounted)")
    tables = ()
    if role.table is not None:
        if role.table.name not in data:
            if role.table.required:
                raise InputError(f"{source}: role {role.name!r} needs an [{role.table.name}] table with "
                                 f"{', '.join(role.table.required)}")
            tables = (TableValues(role.table, {}),)
        else:
            tables = (_table_values(reader, role, data[role.table.name], values),)
    return Requirement(**values, zener=zener, thermal=thermal, tables=tables, source=source)


def _thermal_table(reader: _Reader, table) -> ThermalRequirement:
    if not isinstance(table, dict):
        reader.fail("thermal", f"{table!r} must be a table: write [thermal] on its own line with its keys below it")
    for key in table:
        if key not in THERMAL_KEYS:
            reader.fail(key, f"unknown key in [thermal]{_suggest(key, THERMAL_KEYS)}", "thermal")
    if "mount" not in table:
        raise InputError(f"{reader.source}: [thermal] required key 'mount' is missing "
                         f"(one of {', '.join(MOUNTS)})")
    mount = table["mount"]
    if not isinstance(mount, str) or mount not in MOUNTS:
        reader.fail("mount", f"{mount!r} is not one of {', '.join(MOUNTS)}{_suggest(str(mount), MOUNTS)}",
                    "thermal")
    required, accepted = _MOUNT_KEYS[mount]
    for key in table:
        if key != "mount" and key not in accepted:
            reader.fail(key, f"does not apply to mount = {mount!r} (it takes {', '.join(accepted)})", "thermal")
    for key in required:
        if key not in table:
            raise InputError(f"{reader.source}: [thermal] mount = {mount!r} needs {key!r}")
    values: dict[str, Any] = {"mount": mount}
    for key, rule in _THERMAL_KEY_RULES.items():
        if key in table:
            values[key] = _number(reader, key, table[key], rule, "thermal")
    return ThermalRequirement(**values)


def _table_values(reader: _Reader, role, raw, common: dict) -> TableValues:
    """Validate a role's own table (`RoleTable`) key by key, then the role's cross-key rules."""
    spec: RoleTable = role.table
    name = spec.name
    if not isinstance(raw, dict):
        reader.fail(name, f"{raw!r} must be a table: write [{name}] on its own line with its keys below it")
    for key in raw:
        if spec.key(key) is None:
            reader.fail(key, f"unknown key in [{name}]{_suggest(key, spec.key_names)}", name)
    for key in spec.required:
        if key not in raw:
            raise InputError(f"{reader.source}: [{name}] required key {key!r} is missing "
                             f"(required: {', '.join(spec.required)})")
    given: dict[str, Any] = {}
    for key, value in raw.items():
        k = spec.key(key)
        if k.kind == "number":
            given[key] = _number(reader, key, value, (_NUM, k.low, k.low_inclusive, k.high), name)
        elif k.kind == "bool":
            if not isinstance(value, bool):
                reader.fail(key, f"{value!r} is not true or false", name)
            given[key] = value
        else:
            if not isinstance(value, str) or value not in k.choices:
                reader.fail(key, f"{value!r} is not one of {', '.join(k.choices)}{_suggest(str(value), k.choices)}",
                            name)
            given[key] = value
    role.check_table(given, common, lambda key, message: reader.fail(key, message, name))
    return TableValues(spec, given)


def _zener_table(reader: _Reader, table) -> ZenerRequirement:
    if not isinstance(table, dict):
        reader.fail("zener", f"{table!r} must be a table: write [zener] on its own line with its keys below it")
    for key in table:
        if key not in ZENER_KEYS:
            reader.fail(key, f"unknown key in [zener]{_suggest(key, ZENER_KEYS)}", "zener")
    for key in ZENER_REQUIRED_KEYS:
        if key not in table:
            raise InputError(f"{reader.source}: [zener] required key {key!r} is missing "
                             f"(required: {', '.join(ZENER_REQUIRED_KEYS)})")
    values: dict[str, Any] = {}
    for key, rule in _ZENER_KEY_RULES.items():
        if key in table:
            values[key] = _number(reader, key, table[key], rule, "zener")
    if "resistor_series" in table:
        series = table["resistor_series"]
        if not isinstance(series, str) or series.upper() not in RESISTOR_SERIES:
            reader.fail("resistor_series", f"{series!r} is not one of {', '.join(RESISTOR_SERIES)}"
                        f"{_suggest(str(series), RESISTOR_SERIES)}", "zener")
        values["resistor_series"] = series.upper()
    if "short_circuit" in table:
        if not isinstance(table["short_circuit"], bool):
            reader.fail("short_circuit", f"{table['short_circuit']!r} is not true or false", "zener")
        values["short_circuit"] = table["short_circuit"]
    if "vz_distribution" in table:
        shape = table["vz_distribution"]
        if not isinstance(shape, str) or shape not in VZ_DISTRIBUTIONS:
            reader.fail("vz_distribution", f"{shape!r} is not one of {', '.join(VZ_DISTRIBUTIONS)}"
                        f"{_suggest(str(shape), VZ_DISTRIBUTIONS)}", "zener")
        values["vz_distribution"] = shape
    from partpick.physics.eseries import RESISTOR_RATED_AMBIENT_C, RESISTOR_ZERO_POWER_C

    rated = values.get("resistor_rated_ambient_C", RESISTOR_RATED_AMBIENT_C)
    zero = values.get("resistor_zero_power_C", RESISTOR_ZERO_POWER_C)
    if zero <= rated:
        key = "resistor_zero_power_C" if "resistor_zero_power_C" in table else "resistor_rated_ambient_C"
        reader.fail(key, f"the resistor's zero-power ambient ({zero:g} °C) must be above its full-rating "
                         f"ambient resistor_rated_ambient_C ({rated:g} °C)", "zener")
    return ZenerRequirement(**values)


def requirement_from_toml(text: str, source: str = "requirement") -> Requirement:
    """Parse and validate requirement TOML text; see `requirement_from_dict`."""
    from partpick.inputs import parse_toml

    try:
        data = parse_toml(text, source)  # bounded: at most 32 levels of nesting
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"{source}: not valid TOML: {exc}") from exc
    from partpick.text import normalise_text, text_problem

    if isinstance(data.get("name"), str):  # shown on signed reports: the text rules of SPEC §5
        data["name"] = normalise_text(data["name"])
        reason = text_problem(data["name"], printable_only=True)
        if reason is not None:
            raise InputError(f"{source}: name {reason} (not allowed in text)")
    return requirement_from_dict(data, source, text=text)


def load_requirement(path: str | Path) -> Requirement:
    """Read and validate a requirement TOML file.

    Raises
    ------
    InputError
        The file cannot be read, is not TOML (the message gives tomllib's line
        and column), or a key is missing, unknown or out of range (the message
        names the line, key and value).
    """
    from partpick.inputs import read_input_bytes

    path = Path(path)
    raw = read_input_bytes(path, "requirement file")  # a regular file of at most 256 MiB
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise InputError(f"{path}: not UTF-8 text (byte {exc.start}); a requirement is a TOML text file") from exc
    return requirement_from_toml(text, str(path))


def requirement_to_toml(requirement: Requirement) -> str:
    """The requirement as TOML text (keys as given; defaults are not written, so they stay defaults)."""
    import tomli_w

    raw = requirement.to_raw_dict()
    zener = raw.pop("zener")
    thermal = raw.pop("thermal")
    tables = {values._table.name: raw.pop(values._table.name) for values in requirement.tables}
    top = {k: v for k, v in raw.items() if v is not None}
    if zener is not None:
        top["zener"] = {k: v for k, v in zener.items() if v is not None}
    if thermal is not None:
        top["thermal"] = {k: v for k, v in thermal.items() if v is not None}
    for name, given in tables.items():
        top[name] = dict(given)
    return tomli_w.dumps(top)

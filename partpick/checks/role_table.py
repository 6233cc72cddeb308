"""A role's own requirement table (``[ac]``, ``[coil]``, ``[surge]``…), declared as data.

A role module states its table once, as a `RoleTable` of `TableKey` rows
(key, unit, required or optional, default, allowed range, the words of the
form field and its help). `partpick.checks.requirement` validates the table
from that declaration with file, line and key in every error; the window
builds the role's form group from `RoleTable.form_group` (Qt-free); the JSON
echo and the TOML writer take the values back from `TableValues`.

The ``[zener]`` table predates this and keeps its own dataclass
(`partpick.checks.requirement.ZenerRequirement`).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

__all__ = ["TableKey", "RoleTable", "TableValues", "FormField", "FormGroup"]


@dataclass(frozen=True)
class TableKey:
    """One key of a role's table.

    Attributes
    ----------
    name : str
        The TOML key, unit in the name (``capacitance_F``).
    unit : str
        The unit as shown on screen (``F``, ``Ω``, ``V``, ``%``, ``Hz``, ``""``).
    label : str
        The form field's words (``Reservoir capacitor``).
    help : str
        One sentence: what the value means (tooltip and check sheet).
    kind : str
        ``"number"``, ``"choice"`` (one of ``choices``) or ``"bool"``.
    required : bool
    default : Any
        Used when the key is not given (None: not used / derived, see ``derived``).
    low, high : float
        Allowed range of a number; ``low_inclusive`` says whether ``low`` itself is allowed.
    choices : tuple of str
    derived : str
        Words for a default derived from other values (echoed in the sheet).
    """

    name: str
    unit: str
    label: str
    help: str
    kind: str = "number"
    required: bool = False
    default: Any = None
    low: float = 0.0
    low_inclusive: bool = True
    high: float = 1e12
    choices: tuple[str, ...] = ()
    derived: str = ""


@dataclass(frozen=True)
class FormField:
    """A Qt-free description of one form field (what `gui.models.ReqField` is built from)."""

    key: str          # the TOML key inside the table
    label: str
    kind: str         # "float" | "choice" | "bool"
    unit: str
    required: bool
    help: str
    choices: tuple[str, ...] = ()
    minimum: float | None = None


@dataclass(frozen=True)
class FormGroup:
    """The role's group in the requirement form: a title and its fields, in order."""

    role: str
    table: str
    title: str
    fields: tuple[FormField, ...]


class TableValues:
    """The validated values of a role's table: attribute access, defaults filled in, hashable.

    ``given`` holds only the keys the file gave (the TOML writer writes those
    back, so that defaults stay defaults).
    """

    __slots__ = ("_table", "_given")

    def __init__(self, table: "RoleTable", given: dict):
        object.__setattr__(self, "_table", table)
        object.__setattr__(self, "_given", tuple(sorted(given.items())))

    def __getattr__(self, name: str):
        table = object.__getattribute__(self, "_table")
        key = table.key(name)
        if key is None:
            raise AttributeError(f"[{table.name}] has no key {name!r}")
        return dict(object.__getattribute__(self, "_given")).get(name, key.default)

    def __setattr__(self, name, value):  # frozen, like the Requirement that holds it
        raise AttributeError("TableValues is read-only")

    @property
    def given(self) -> dict:
        return dict(self._given)

    def to_dict(self) -> dict:
        """Every key with the defaults filled in (plain JSON types)."""
        given = self.given
        return {k.name: given.get(k.name, k.default) for k in self._table.keys}

    def __eq__(self, other) -> bool:
        return isinstance(other, TableValues) and self._table.name == other._table.name \
            and self._given == other._given

    def __hash__(self) -> int:
        return hash((self._table.name, self._given))

    def __repr__(self) -> str:
        return f"TableValues([{self._table.name}] {self.given!r})"


@dataclass(frozen=True)
class RoleTable:
    """A role's requirement table: its name (the TOML table), title on screen and keys."""

    name: str
    title: str
    keys: tuple[TableKey, ...]

    def key(self, name: str) -> TableKey | None:
        for k in self.keys:
            if k.name == name:
                return k
        return None

    @property
    def key_names(self) -> tuple[str, ...]:
        return tuple(k.name for k in self.keys)

    @property
    def required(self) -> tuple[str, ...]:
        return tuple(k.name for k in self.keys if k.required)

    def form_group(self, role: str) -> FormGroup:
        kinds = {"number": "float", "choice": "choice", "bool": "choice"}
        fields = tuple(
            FormField(k.name, k.label, kinds[k.kind], k.unit, k.required,
                      k.help + (f" Default: {k.derived or _plain(k.default, k.unit)}."
                                if not k.required and (k.derived or k.default is not None) else ""),
                      k.choices if k.kind == "choice" else (("true", "false") if k.kind == "bool" else ()),
                      k.low if k.kind == "number" else None)
            for k in self.keys)
        return FormGroup(role, self.name, self.title, fields)


def _plain(value, unit: str) -> str:
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float):
        return f"{value:g} {unit}".rstrip()
    return str(value)

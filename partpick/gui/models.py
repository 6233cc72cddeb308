"""Qt-free models of the window: the requirement being edited, the library view, the latest result.

Views take a model, connect its signals to their ``_update_*`` methods and send
widget edits to the model's setters; the models never import Qt, so every rule
here (what a field accepts, when a check may run, which parts the filter shows)
is tested without a window.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from partpick.errors import InputError
from partpick.library.fields import KINDS
from partpick.gui.observer import Signal
from partpick.gui.thermal_fields import drop_empty_thermal, thermal_field_applies, thermal_fields
from partpick.units import format_quantity, parse_quantity

__all__ = [
    "ROLES",
    "OBJECTIVES",
    "KIND_WORDS",
    "RESISTOR_SERIES",
    "ReqField",
    "REQUIREMENT_FIELDS",
    "FieldState",
    "RequirementModel",
    "LibraryModel",
    "ResultModel",
    "describe_corner",
]

def _registered_roles() -> dict:
    """The role registry (`partpick.checks.roles`): series and Zener first, then the others by name."""
    from partpick.checks.roles import ROLES as registry

    first = [n for n in ("series", "zener_shunt") if n in registry]
    return {name: registry[name] for name in first + sorted(set(registry) - set(first))}


_REGISTRY = _registered_roles()
# SPEC §8: the words on screen for the file values.
ROLES = {name: role.label for name, role in _REGISTRY.items()}
OBJECTIVES = {
    "balanced": "Balanced",
    "drop": "Lowest drop",
    "dissipation": "Lowest dissipation",
    "headroom": "Most headroom",
    "price": "Lowest price",
}
RESISTOR_SERIES = ("E12", "E24", "E48", "E96")
KIND_WORDS = {"rectifier": "Rectifier", "signal": "Signal", "schottky": "Schottky",
              "fast_recovery": "Fast recovery", "zener": "Zener", "bridge": "Bridge", "tvs": "TVS"}
DEFAULT_POLICY = "commercial"  # SPEC §4: the window's new requirements start from it


@dataclass(frozen=True)
class ReqField:
    """One field of the requirement form: a key of the requirement TOML (SPEC §5).

    ``kind`` is ``"float"`` (engineering notation in ``unit``), ``"text"``,
    ``"choice"`` (one of ``choices``; "" = default) or ``"list"`` (comma-separated
    words, each one of ``choices`` when those are given).
    ``group`` places it in the form; ``roles`` says for which roles it applies
    (None: every role that does not list the key in `Role.unused_keys`).
    ``table`` is ``"zener"`` for the keys of the ``[zener]`` table, or the name
    of a role's own table (`partpick.checks.role_table`); those fields are
    keyed ``"<table>.<key>"`` (`toml_key` is the key inside the table).
    """

    key: str
    label: str
    kind: str = "float"
    unit: str = ""
    required: bool = False
    group: str = "Circuit"
    roles: tuple[str, ...] | None = None
    table: str = ""
    choices: tuple[str, ...] = ()
    minimum: float | None = None
    help: str = ""
    unit_words: str = ""   # the form's bracket when it says more than the unit ("% of rating")

    @property
    def form_label(self) -> str:
        """The form's row label: ``label [unit]`` (or ``[unit_words]``)."""
        shown = self.unit_words or self.unit
        return self.label + (f" [{shown}]" if shown else "")

    @property
    def toml_key(self) -> str:
        return self.key.split(".", 1)[1] if self.table and "." in self.key else self.key


def _zf(key, label, unit, required=False, help="", minimum=None, kind="float", choices=()):
    return ReqField(key, label, kind, unit, required, "Zener", ("zener_shunt",), "zener", choices, minimum, help)


REQUIREMENT_FIELDS: tuple[ReqField, ...] = (
    ReqField("name", "Name", "text", required=True, help="A name for this requirement (shown in reports)."),
    ReqField("role", "Role", "choice", required=True, choices=tuple(ROLES), help="The circuit position."),
    ReqField("supply_min_V", "Supply min", unit="V", required=True, help="Lowest supply voltage."),
    ReqField("supply_max_V", "Supply max", unit="V", required=True, help="Highest supply voltage."),
    ReqField("load_min_A", "Load min", unit="A", required=True, minimum=0.0, help="Lowest load current."),
    ReqField("load_max_A", "Load max", unit="A", required=True, minimum=0.0, help="Highest load current."),
    ReqField("ambient_min_C", "Ambient min", unit="°C", required=True, help="Coldest ambient."),
    ReqField("ambient_max_C", "Ambient max", unit="°C", required=True, help="Hottest ambient."),
    ReqField("policy", "Derating policy", "choice", group="Margins", help="The team's derating limits."),
    ReqField("objective", "Objective", "choice", group="Margins", choices=tuple(OBJECTIVES),
             help="What the ranking optimises."),
    ReqField("reverse_margin_pct", "Reverse margin", unit="%", group="Margins", minimum=0.0,
             help="Reverse voltage ≤ VRRM/(1 + margin/100); overrides the policy."),
    ReqField("tj_margin_K", "Tj margin", unit="K", group="Margins", minimum=0.0,
             help="Junction temperature margin below Tj max; overrides the policy."),
    ReqField("current_limit_pct", "Current ≤", unit="%", group="Margins", minimum=0.0, unit_words="% of rating",
             help="Forward current at most this % of the derated IF(AV) (60 means ≤ 60 % of the rating); "
                  "overrides the policy."),
    ReqField("power_limit_pct", "Power ≤", unit="%", group="Margins", minimum=0.0, unit_words="% of rating",
             help="Dissipation at most this % of the allowed power Pallow(Ta); overrides the policy."),
    ReqField("resistor_power_limit_pct", "Resistor power ≤", unit="%", group="Margins", minimum=0.0,
             roles=("zener_shunt",), unit_words="% of rating",
             help="Resistor power at most this % of its class rating; overrides the policy."),
    ReqField("reverse_V", "Reverse voltage", unit="V", group="Limits", roles=("series",),
             help="Reverse voltage in the blocking state (default: supply max)."),
    ReqField("reverse_transient_V", "Reverse transient", unit="V", group="Limits", roles=("series",),
             help="Peak of a non-repetitive reverse pulse (µs to ms): checked against VRSM, else VRRM, only; "
                  "it never heats the junction."),
    ReqField("handover", "Hand-over start", group="Limits", roles=("series",), kind="choice",
             choices=("true", "false"),
             help="true (default): the diode blocks straight from its hot, conducting state (OR-ing, steering); "
                  "false: it only ever blocks from switch-on (pure reverse-polarity protection)."),
    ReqField("max_forward_drop_V", "Max forward drop", unit="V", group="Limits", roles=("series",),
             help="Largest acceptable forward drop."),
    ReqField("min_output_V", "Min output", unit="V", group="Limits", roles=("series",),
             help="Lowest acceptable output voltage (supply − drop)."),
    ReqField("max_leakage_A", "Max leakage", unit="A", group="Limits", roles=("series", "tvs_clamp"), minimum=0.0,
             help="Largest acceptable reverse leakage at the hottest ambient."),
    ReqField("rth_ja_K_per_W", "Board RthJA", unit="K/W", group="Limits", minimum=0.0,
             help="The design's own junction-to-ambient thermal resistance; replaces every part's."),
    ReqField("inrush_capacitance_F", "Inrush capacitance", unit="F", group="Limits", roles=("series",),
             minimum=0.0, help="Capacitance charged at switch-on (with the source resistance: surge check)."),
    ReqField("inrush_source_ohm", "Inrush source R", unit="Ω", group="Limits", roles=("series",),
             minimum=0.0, help="Source resistance during inrush."),
    ReqField("kinds", "Kinds", "list", group="Filters", help="Only these kinds, comma-separated (empty: all).",
             choices=KINDS),
    ReqField("packages", "Packages", "list", group="Filters", help="Only these packages, comma-separated."),
    ReqField("lifecycle", "Lifecycle", "list", group="Filters", choices=("active", "nrnd", "obsolete"),
             help="Only these lifecycle states, comma-separated."),
    ReqField("max_price", "Max price", group="Filters", minimum=0.0, help="Highest unit price."),
    _zf("target_V", "Target output", "V", True, "The regulated output voltage wanted."),
    _zf("max_regulation_error_pct", "Max regulation error", "%", True,
        "Largest |Vout − target| as % of target over every corner.", 0.0),
    _zf("min_zener_current_A", "Min Zener current", "A", help="Iz min (default: the part's Izk).", minimum=0.0),
    _zf("resistor_series", "Resistor series", "", help="E-series for the resistor (default E24).",
        kind="choice", choices=RESISTOR_SERIES),
    _zf("resistor_tolerance_pct", "Resistor tolerance", "%", minimum=0.0,
        help="± tolerance (default 5 % E12/E24, 1 % E48/E96)."),
    _zf("resistor_ohm", "Fixed resistor", "Ω", minimum=0.0,
        help="Review a finished design with this resistor instead of sizing one."),
    _zf("resistor_rating_W", "Resistor rating", "W", minimum=0.0,
        help="A finished design's resistor rating at 70 °C (default: the smallest power class that covers it)."),
    _zf("resistor_rated_ambient_C", "Resistor full rating to", "°C",
        help="Highest ambient at the full rating (default 70 °C, film resistors)."),
    _zf("resistor_zero_power_C", "Resistor zero power at", "°C",
        help="Ambient where the resistor's rating reaches zero, linearly (default 155 °C)."),
    _zf("short_circuit", "Output short check", "", kind="choice", choices=("true", "false"),
        help="Check an output short (supply max across the resistor) against its rating (default true)."),
    _zf("vz_distribution", "Vz spread (yield)", "", kind="choice", choices=("normal", "uniform"),
        help="Yield draws Vz normal with tolerance = 3σ, or uniform for binned parts (default normal)."),
)


def _role_group_fields() -> tuple[ReqField, ...]:
    """The fields of every role's own table, from its Qt-free `FormGroup` (`Role.form_group`)."""
    out = []
    for role in _REGISTRY.values():
        group = role.form_group()
        if group is None:
            continue
        for f in group.fields:
            out.append(ReqField(f"{group.table}.{f.key}", f.label, f.kind, f.unit, f.required, group.role,
                                (group.role,), group.table, f.choices, f.minimum, f.help))
    return tuple(out)


ROLE_GROUPS = {role.name: role.form_group().title for role in _REGISTRY.values() if role.table is not None}
"""Role → the title of its own group in the form."""
ROLE_CAUTIONS = {role.name: role.cautions for role in _REGISTRY.values() if role.cautions}
"""Role → the cautions it adds (shown in its form group; SPEC §7)."""
REQUIREMENT_FIELDS = REQUIREMENT_FIELDS + thermal_fields(ReqField) + _role_group_fields()
FIELDS_BY_KEY = {f.key: f for f in REQUIREMENT_FIELDS}
ROLE_TABLES = {f.table for f in REQUIREMENT_FIELDS if f.table and f.table != "zener"}


@dataclass
class FieldState:
    """What a field holds: the text as typed, the parsed value, the error if any."""

    text: str = ""
    value: object = None
    error: str = ""


def _format_value(spec: ReqField, value) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if spec.kind == "float":
        return re.sub(r"(?<=[\d ])u(?=[A-Za-zΩ]|$)", "µ", format_quantity(float(value), spec.unit))
    if spec.kind == "list":
        return ", ".join(str(v) for v in value)
    return str(value)


def _parse_field(spec: ReqField, text: str):
    """The value of a field's text, or raise InputError naming the field (None = not given)."""
    raw = text.strip()
    if spec.kind == "text":
        if not raw and spec.required:
            raise InputError(f"{spec.label}: required")
        return raw or None
    if not raw:
        if spec.required:
            raise InputError(f"{spec.label}: required")
        return None
    if spec.kind == "choice":
        if spec.choices and raw not in spec.choices:
            raise InputError(f"{spec.label}: {raw!r} is not one of {', '.join(spec.choices)}")
        if spec.choices == ("true", "false"):
            return raw == "true"
        return raw
    if spec.kind == "list":
        words = [w.strip() for w in raw.split(",")]
        if any(not w for w in words):
            raise InputError(f"{spec.label}: {raw!r} has an empty item (separate words with commas)")
        if spec.choices:
            bad = [w for w in words if w not in spec.choices]
            if bad:
                raise InputError(f"{spec.label}: {', '.join(bad)} not one of {', '.join(spec.choices)}")
        return words
    value = parse_quantity(raw, spec.unit, name=spec.label)
    if spec.minimum is not None and value < spec.minimum:
        raise InputError(f"{spec.label}: {raw} is below {spec.minimum:g} {spec.unit}".rstrip())
    return value


class RequirementModel:
    """The requirement being edited: every field as text, parsed value and error.

    A bad entry keeps its text and its error and never reaches the checker:
    `requirement_dict` refuses while any applicable field has an error.

    Signals
    -------
    field_changed(key)
        Text, value or error of one field changed (views re-draw that field).
    values_changed()
        The set of valid values changed (the window schedules a recheck).
    role_changed(role)
        The role changed (the form shows or hides the Zener table).
    loaded()
        Every field was replaced (opened a requirement file).
    """

    def __init__(self) -> None:
        self.fields: dict[str, FieldState] = {f.key: FieldState() for f in REQUIREMENT_FIELDS}
        self.policy_names: tuple[str, ...] = (DEFAULT_POLICY,)
        self.source = "window"
        self.path = None  # the TOML file this requirement came from / was saved to
        self.form_error = ""  # a cross-field error reported by the checker's reader
        self.form_error_key = ""  # the field that error names, if it names one
        self.field_changed = Signal()
        self.values_changed = Signal()
        self.role_changed = Signal()
        self.loaded = Signal()
        self.errors_changed = Signal()
        self.edited = Signal()  # edited(key, old_text, new_text): a user's edit (the undo stack records it)
        self.modified = False  # edited since it was loaded, reset or saved (quitting asks)
        self.choices_changed = Signal()  # the library's values the list filters pick from changed
        self._list_choices: dict[str, tuple] = {}
        self.reset()

    # -- state ------------------------------------------------------------
    @property
    def role(self) -> str:
        return self.fields["role"].value or "series"

    def spec(self, key: str) -> ReqField:
        return FIELDS_BY_KEY[key]

    def applies(self, key: str) -> bool:
        """Whether a field belongs to the current role's requirement."""
        spec = FIELDS_BY_KEY[key]
        if spec.table == "thermal" and not thermal_field_applies(key, self.fields["thermal.mount"].value):
            return False
        if spec.roles is not None:
            return self.role in spec.roles
        role = _REGISTRY.get(self.role)
        return role is None or key not in role.unused_keys

    def text(self, key: str) -> str:
        return self.fields[key].text

    def value(self, key: str):
        return self.fields[key].value

    def error(self, key: str) -> str:
        return self.fields[key].error

    def errors(self) -> dict[str, str]:
        """The errors of the fields that apply to the current role."""
        return {k: s.error for k, s in self.fields.items() if s.error and self.applies(k)}

    def set_list_choices(self, choices: dict) -> None:
        """What the library holds for the list filters (``{"kinds": (...), "packages": ..., "lifecycle": ...}``):
        the form offers these, not free text (SPEC §6)."""
        choices = {k: tuple(v) for k, v in choices.items()}
        if choices != self._list_choices:
            self._list_choices = choices
            self.choices_changed.emit()

    def list_choices(self, key: str) -> tuple:
        """The values a list filter offers: the library's, and any the requirement names already."""
        held = list(self._list_choices.get(key, ()))
        for value in self.fields[key].value or ():
            if value not in held:
                held.append(value)
        return tuple(held)

    def set_policy_names(self, names) -> None:
        self.policy_names = tuple(names)
        self._revalidate("policy")

    # -- setters (from the widgets) ----------------------------------------
    def edit_text(self, key: str, text: str) -> None:
        """A user's edit of a field (the widgets call this): as `set_text`, and recorded for undo."""
        old = self.fields[key].text
        if old == text:
            return
        self.set_text(key, text)
        self.modified = True
        self.edited.emit(key, old, text)

    def snapshot(self) -> dict:
        """Every field's text, the source, the file and the modified flag (undo of a load)."""
        return {"texts": {k: s.text for k, s in self.fields.items()}, "source": self.source, "path": self.path,
                "modified": self.modified}

    def restore(self, snapshot: dict) -> None:
        """Put back a `snapshot` (every field re-parsed, one `loaded`)."""
        for key, text in snapshot["texts"].items():
            state = self.fields[key]
            state.text = text
            try:
                state.value, state.error = _parse_field(FIELDS_BY_KEY[key], text), ""
            except InputError as exc:
                state.value, state.error = None, str(exc)
        self.source, self.path, self.modified = snapshot["source"], snapshot["path"], snapshot["modified"]
        self._set_form_error("")
        self.loaded.emit()
        self.errors_changed.emit()
        self.role_changed.emit(self.role)
        self.values_changed.emit()

    def set_text(self, key: str, text: str) -> None:
        """Take a field's text as typed; parse it; emit what changed."""
        state = self.fields[key]
        spec = FIELDS_BY_KEY[key]
        old_value, old_error = state.value, state.error
        state.text = text
        try:
            if key == "policy" and text.strip() and text.strip() not in self.policy_names:
                raise InputError(f"{spec.label}: {text.strip()!r} is not one of {', '.join(self.policy_names)}")
            state.value, state.error = _parse_field(spec, text), ""
        except InputError as exc:
            state.error = str(exc)
        self.field_changed.emit(key)
        if state.error != old_error:
            self.errors_changed.emit()
        if not state.error and (state.value != old_value or old_error):
            self._set_form_error("")
            if key == "role":
                self.role_changed.emit(self.role)
            self.values_changed.emit()

    def set_value(self, key: str, value) -> None:
        """Set a field from a value in base units (formats it the way the field shows it)."""
        self.set_text(key, _format_value(FIELDS_BY_KEY[key], value))

    def _revalidate(self, key: str) -> None:
        self.set_text(key, self.fields[key].text)

    # -- whole requirement ---------------------------------------------------
    def reset(self) -> None:
        """A new requirement: a 12 V series diode at 1 A, policy `commercial`."""
        self.load_dict(
            {
                "name": "New requirement",
                "role": "series",
                "policy": DEFAULT_POLICY,
                "objective": "balanced",
                "supply_min_V": 11.0,
                "supply_max_V": 13.0,
                "load_min_A": 0.1,
                "load_max_A": 1.0,
                "ambient_min_C": -20.0,
                "ambient_max_C": 60.0,
                "zener": {"target_V": 5.1, "max_regulation_error_pct": 5.0},
            }
        )
        self.path = None

    def load_dict(self, data: dict, *, source: str = "window") -> None:
        """Replace every field from a requirement dict (the TOML's keys, `[zener]` as a sub-dict)."""
        known = set(FIELDS_BY_KEY) | {"zener"} | ROLE_TABLES
        from partpick.checks.requirement import RENAMED_KEYS, renamed_key_hint

        for key in sorted(set(data) & set(RENAMED_KEYS)):
            raise InputError(f"{source}: {key}: {renamed_key_hint(key, data[key])}")
        unknown = sorted(set(data) - known)
        if unknown:
            raise InputError(f"{source}: unknown requirement key(s) {', '.join(unknown)}")
        for spec in REQUIREMENT_FIELDS:
            value = (data.get(spec.table) or {}).get(spec.toml_key) if spec.table else data.get(spec.key)
            state = self.fields[spec.key]
            state.text = _format_value(spec, value)
            try:
                state.value, state.error = _parse_field(spec, state.text), ""
            except InputError as exc:
                state.value, state.error = None, str(exc)
        self.source = source
        self.modified = False
        self._set_form_error("")
        self.loaded.emit()
        self.errors_changed.emit()
        self.role_changed.emit(self.role)
        self.values_changed.emit()

    def requirement_dict(self) -> dict:
        """The requirement as the TOML's dict (SPEC §5), only the fields that apply.

        Raises
        ------
        InputError
            Some field that applies has an error; the message lists them all.
        """
        errors = self.errors()
        if errors:
            raise InputError("; ".join(errors.values()))
        data: dict = {}
        for spec in REQUIREMENT_FIELDS:
            if not self.applies(spec.key):
                continue
            if spec.table:
                data.setdefault(spec.table, {})
            value = self.fields[spec.key].value
            if value is None:
                continue
            (data[spec.table] if spec.table else data)[spec.toml_key] = value
        return drop_empty_thermal(data)

    def build_requirement(self):
        """The checker's `Requirement` for the current fields.

        Raises InputError for a field error or for what the checker's reader
        refuses across fields (e.g. supply min above supply max); the latter is
        kept in `form_error` for the window to show.
        """
        from partpick.checks.requirement import requirement_from_dict

        data = self.requirement_dict()
        try:
            requirement = requirement_from_dict(data, self.source)
        except InputError as exc:
            self._set_form_error(str(exc))
            raise
        self._set_form_error("")
        return requirement

    def _set_form_error(self, text: str) -> None:
        if text != self.form_error:
            old_key = self.form_error_key
            self.form_error = text
            self.form_error_key = _key_named_in(text)
            self.errors_changed.emit()
            for key in {old_key, self.form_error_key} - {""}:
                self.field_changed.emit(key)

    def field_error(self, key: str) -> str:
        """The error shown at a field: its own, or the checker's reader's when that names this key."""
        own = self.fields[key].error
        if own:
            return own
        return self.form_error if self.form_error and key == self.form_error_key else ""


class LibraryModel:
    """The open library as the window sees it: every part, and the filter of the parts table.

    The store does the work (validation, transactions); this model keeps the
    list the views show in step with it.

    Signals
    -------
    library_changed()
        Another library was opened.
    parts_changed()
        Parts were added, replaced or removed.
    filter_changed()
        The parts table's filter changed.
    """

    def __init__(self, library=None) -> None:
        self.library = None
        self.parts: list[dict] = []
        self._by_number: dict[str, dict] = {}
        self._content_hash: str | None = None
        self._arrays = None  # the checker's PartArrays of `parts`, built at the first check after a change
        self.filter_kind = ""
        self.filter_package = ""
        self.filter_text = ""
        self.filter_min_vrrm: float | None = None  # VRRM ≥ this [V]
        self.filter_min_if: float | None = None  # IF(AV) ≥ this [A]
        self.library_changed = Signal()
        self.parts_changed = Signal()
        self.filter_changed = Signal()
        if library is not None:
            self.set_library(library)

    # -- library ------------------------------------------------------------
    @property
    def location(self) -> str:
        return self.library.location if self.library is not None else ""

    def set_library(self, library) -> None:
        """Make ``library`` the open one — only once its parts have been read.

        A library whose parts cannot be read (damaged content) raises here and is closed; the
        previous library stays open and bound, so later imports and edits still go to it.
        """
        try:
            parts = library.list_parts() if library is not None else []
        except BaseException:
            if library is not None and library is not self.library:
                library.close()
            raise
        if self.library is not None and self.library is not library:
            self.library.close()
        self.library = library
        self._set_parts(parts)
        self.library_changed.emit()
        self.parts_changed.emit()

    def close(self) -> None:
        if self.library is not None:
            self.library.close()
            self.library = None

    def reload(self) -> None:
        self._load()
        self.parts_changed.emit()

    def _load(self) -> None:
        self._set_parts(self.library.list_parts() if self.library is not None else [])

    def _set_parts(self, parts: list[dict]) -> None:
        self.parts = parts
        self._by_number = {p["part_number"]: p for p in self.parts}
        self._content_hash = None
        self._arrays = None

    def library_info(self) -> dict:
        """``{"location", "content_hash"}`` for run_check (SPEC §5 `library`).

        The hash is the store's, taken once per change of the library (hashing
        10,000 parts on every keystroke-settled recheck would cost more than the check).
        """
        if self.library is None:
            return {"location": "", "content_hash": ""}
        if self._content_hash is None:
            self._content_hash = self.library.content_hash()
        return {"location": self.library.location, "content_hash": self._content_hash}

    def part_arrays(self):
        """`parts` as the checker's `PartArrays`, converted once per change of the library.

        Every recheck passes it to ``run_check`` in place of the dicts (the same parts, so the
        same result), which skips the dict → array conversion on each settled edit. It is never
        modified (the checker works on subsets), so a worker thread may read it while the UI
        thread builds the next job; a reload makes a new one.
        """
        if self._arrays is None:
            from partpick.checks.partdata import PartArrays

            self._arrays = PartArrays(self.parts)
        return self._arrays

    def policies(self) -> dict:
        """The library's own derating policies as the CLI loads them (the checker adds the built-ins)."""
        from partpick.checks.policy import load_policies

        return load_policies(self.library) if self.library is not None else {}

    def policy_names(self) -> list[str]:
        """Every policy a requirement may name: the built-ins and the library's own."""
        from partpick.checks.policy import BUILTIN_POLICIES

        return sorted(set(BUILTIN_POLICIES) | set(self.policies()))

    # -- parts --------------------------------------------------------------
    def get_part(self, part_number: str) -> dict | None:
        return self._by_number.get(part_number)

    def part_numbers(self) -> list[str]:
        return [p["part_number"] for p in self.parts]

    def save_part(self, part: dict, *, replace: str | None = None) -> None:
        """Store a part in one transaction (the store validates; InputError on a bad part)."""
        record = {k: v for k, v in part.items() if k != "fit_residual_mV"}
        self.library.save_part(record, replace=replace)
        self.reload()

    def delete_part(self, part_number: str) -> None:
        self.library.delete_part(part_number)
        self.reload()

    def free_part_number(self, base: str) -> str:
        """A part number not yet in the library, for a duplicate: ``base-copy``, ``base-copy2``..."""
        candidate = f"{base}-copy"
        count = 2
        while candidate in self._by_number:
            candidate = f"{base}-copy{count}"
            count += 1
        return candidate

    # -- filter -------------------------------------------------------------
    def set_filter(self, *, kind: str | None = None, package: str | None = None, text: str | None = None,
                   min_vrrm: float | None | str = "", min_if: float | None | str = "") -> None:
        """Change the parts table's filter ("" leaves a rating floor as it is, None clears it)."""
        changed = False
        for name, value in (("filter_kind", kind), ("filter_package", package), ("filter_text", text)):
            if value is not None and getattr(self, name) != value:
                setattr(self, name, value)
                changed = True
        for name, value in (("filter_min_vrrm", min_vrrm), ("filter_min_if", min_if)):
            if value != "" and getattr(self, name) != value:
                setattr(self, name, value)
                changed = True
        if changed:
            self.filter_changed.emit()

    def packages(self) -> list[str]:
        return sorted({p.get("package") or "" for p in self.parts} - {""})

    def matches(self, part: dict) -> bool:
        if self.filter_kind and part.get("kind") != self.filter_kind:
            return False
        if self.filter_package and (part.get("package") or "") != self.filter_package:
            return False
        for floor, key in ((self.filter_min_vrrm, "vrrm_V"), (self.filter_min_if, "if_avg_A")):
            if floor is not None and (part.get(key) is None or part[key] < floor):
                return False
        if self.filter_text:
            needle = self.filter_text.casefold()
            haystack = " ".join(
                str(part.get(k) or "") for k in ("part_number", "manufacturer", "package", "kind", "notes")
            ).casefold()
            return all(word in haystack for word in needle.split())
        return True

    def visible_parts(self) -> list[dict]:
        return [p for p in self.parts if self.matches(p)]


def _key_named_in(message: str) -> str:
    """The requirement key a checker message names (longest match), or ""."""
    named = [f.key for f in REQUIREMENT_FIELDS if f.key in message]
    return max(named, key=len) if named else ""


def describe_corner(corner: dict | None) -> str:
    """A corner in words (SPEC §8): ``"11.0 V · 1.00 A · −20 °C · steady"``."""
    if not corner:
        return ""
    bits = []
    for key, value in corner.items():  # a role's own corner columns (e.g. the AC voltage) lead
        if key.endswith("_Vrms") and value is not None:
            bits.append(format_quantity(value, "V", digits=3) + " rms")
        elif key.endswith("_F") and value is not None:
            bits.append(re.sub(r"(?<=[\d ])u(?=F)", "µ", format_quantity(value, "F", digits=3)))
    if corner.get("supply_V") is not None:
        bits.append(format_quantity(corner["supply_V"], "V", digits=3))
    if corner.get("load_A") is not None:
        bits.append(format_quantity(corner["load_A"], "A", digits=3))
    if corner.get("ambient_C") is not None:
        bits.append(f"{corner['ambient_C']:g} °C".replace("-", "−"))
    state = corner.get("state")
    if state:
        bits.append({"cold_start": "cold start", "steady": "steady", "reverse": "reverse"}.get(state, state))
    for key, label in (("vz_end", "Vz"), ("resistor_end", "R")):
        if corner.get(key):
            bits.append(f"{label} {corner[key]}")
    return " · ".join(bits)


class ResultModel:
    """The latest check result (run_check's dict, SPEC §5) and the shortlist selection.

    Signals
    -------
    changed()
        A new result arrived (or the result was cleared).
    state_changed()
        `stale` / `message` changed (the requirement has errors, a check is running).
    selection_changed()
        The selected shortlist parts changed (the curves follow).
    """

    def __init__(self) -> None:
        self.result: dict | None = None
        self.elapsed_ms: float = math.nan
        self.part_count = 0
        self.stale = False
        self.message = ""
        self.selected: list[str] = []
        self._select_top = False
        self.changed = Signal()
        self.state_changed = Signal()
        self.selection_changed = Signal()

    @property
    def candidates(self) -> list[dict]:
        return self.result["candidates"] if self.result else []

    def candidate(self, part_number: str) -> dict | None:
        for candidate in self.candidates:
            if candidate["part_number"] == part_number:
                return candidate
        return None

    def pass_count(self) -> int:
        """Passing candidates: the result's summary (which counts beyond a ``top`` limit), else the list."""
        summary = (self.result or {}).get("summary")
        if summary:
            return int(summary["passing"])
        return sum(1 for c in self.candidates if c["passed"])

    def candidate_count(self) -> int:
        summary = (self.result or {}).get("summary")
        return int(summary["candidates"]) if summary else len(self.candidates)

    @property
    def empty_reason(self) -> str:
        """Why the latest result lists no candidate ("" when it lists some, or there is none)."""
        if self.result is None or self.candidates:
            return ""
        return self.result.get("empty_reason") or "no part passes the candidate selection"

    def forget_selection(self) -> None:
        """The next result selects its top part (another requirement was loaded: the curves must not
        keep showing a part chosen for the previous one)."""
        self._select_top = True

    def set_result(self, result: dict, elapsed_ms: float, part_count: int) -> None:
        self.result = result
        self.elapsed_ms = elapsed_ms
        self.part_count = part_count
        numbers = {c["part_number"] for c in self.candidates}
        kept = [] if self._select_top else [p for p in self.selected if p in numbers]
        self._select_top = False
        # The selection follows the parts that are still candidates, else the top part;
        # views re-read it on `changed` (one redraw per result, not two).
        self.selected = kept or ([self.candidates[0]["part_number"]] if self.candidates else [])
        self.stale = False
        self.message = ""
        self.changed.emit()
        self.state_changed.emit()

    def clear(self) -> None:
        self.result = None
        self.selected = []
        self.stale = False
        self.message = ""
        self.changed.emit()
        self.selection_changed.emit()
        self.state_changed.emit()

    def set_stale(self, message: str) -> None:
        """The shown result no longer matches the form (bad field, or a failed check): say why."""
        self.stale = True
        self.message = message
        self.state_changed.emit()

    def set_selected(self, part_numbers) -> None:
        part_numbers = list(part_numbers)
        if part_numbers != self.selected:
            self.selected = part_numbers
            self.selection_changed.emit()

    def status_text(self) -> str:
        """The status-bar line: ``"N of M parts pass · t ms"``."""
        if self.result is None:
            return self.message or "No result yet"
        if not self.candidates:
            text = f"No candidates: {self.empty_reason} · {self.elapsed_ms:.0f} ms"
            return f"{self.message} — showing the last good result ({text})" if self.stale else text
        text = f"{self.pass_count()} of {self.candidate_count()} parts pass · {self.elapsed_ms:.0f} ms"
        if len(self.candidates) < self.candidate_count():
            text += f" · first {len(self.candidates)} listed"
        if self.stale:
            text = f"{self.message} — showing the last good result ({text})"
        return text

"""The part editor's Qt-free model: every `PART_FIELDS` field as text, its value and its error.

Numbers are typed in engineering notation with the field's unit (``4.7k``,
``10 mA``, ``1e-14``) and parsed by `partpick.units.parse_quantity`; the whole
record is then judged by the library's own `validate_part`, whose messages are
put back at the field they name. The editor's OK is enabled only when nothing
is wrong, and the store validates again when it saves.
"""

from __future__ import annotations

import re

import numpy as np

from partpick.errors import InputError
from partpick.gui.observer import Signal
from partpick.library.fields import FIELD_NAMES, FIELDS_BY_NAME, PART_FIELDS, empty_part, kind_group, part_problems
from partpick.units import format_quantity, parse_quantity

__all__ = ["PartEditModel", "parse_points", "format_points", "FitPreview", "on_screen_words"]

_SEPARATORS = re.compile(r"[;\n]")
_PAIR = re.compile(r"\s*[,:\t]\s*")


def parse_points(text: str) -> list[tuple[float, float]]:
    """(IF [A], VF [V]) pairs from pasted text: one pair a line (or ``;``-separated), IF then VF.

    Each pair is separated by a comma, colon or tab (or a space when both are
    plain numbers); engineering notation and units are allowed
    (``10 mA, 0.62 V``). Raises InputError naming the line.
    """
    points = []
    entries = [e.strip() for e in _SEPARATORS.split(text)]
    for number, entry in enumerate(entries, start=1):
        if not entry:
            continue
        pieces = [p for p in _PAIR.split(entry) if p]
        if len(pieces) == 1:
            pieces = entry.split()
        if len(pieces) != 2:
            raise InputError(f"VF points, entry {number} {entry!r}: give IF and VF, e.g. '10 mA, 0.62'")
        current = parse_quantity(pieces[0], "A", name=f"VF points, entry {number} IF")
        voltage = parse_quantity(pieces[1], "V", name=f"VF points, entry {number} VF")
        points.append((current, voltage))
    return points


_MICRO = re.compile(r"(?<=[\d ])u(?=[A-Za-zΩ]|$)")


def _quantity(value: float, unit: str, digits: int = 4) -> str:
    """Engineering notation as the fields show it, with the micro sign (``5 µA``, not ``5 uA``)."""
    return _MICRO.sub("µ", format_quantity(value, unit, digits=digits))


def format_points(points) -> str:
    return "\n".join(f"{_quantity(i, 'A')}, {_quantity(v, 'V')}" for i, v in points or [])


def _format(spec, value) -> str:
    if value is None:
        return ""
    if spec.type == "points":
        return format_points(value)
    if spec.type == "float":
        if spec.unit in ("", "°C", "%", "%/K", "K", "eV"):
            return f"{value:.6g} {spec.unit}".strip()
        return _quantity(value, spec.unit, digits=6)
    return str(value)


class FitPreview:
    """The forward model fitted to the VF points, for the editor's plot (or why there is none)."""

    def __init__(self, fit=None, error: str = "", points=(), curve=None, refused=None) -> None:
        self.fit = fit
        self.error = error
        self.points = list(points)
        self.curve = curve  # (current [A], voltage [V]) arrays along the fitted (or best refused) model
        self.refused = refused  # a refused fit: the best the solver found (never used as the part's model)

    @property
    def residuals_mV(self) -> list[float]:
        shown = self.fit if self.fit is not None else self.refused
        return [] if shown is None else [float(r) * 1e3 for r in shown.residuals_V]


class PartEditModel:
    """A part being edited.

    Signals
    -------
    field_changed(name)
        A field's text, value or error changed.
    validity_changed()
        The set of problems changed (OK button, messages).
    fit_changed()
        The VF points or the parameters that move the fit changed.
    """

    def __init__(self, part: dict | None = None, *, existing=(), replace: str | None = None) -> None:
        base = empty_part()
        if part:
            base.update({k: v for k, v in part.items() if k in FIELD_NAMES})
        self.replace = replace if replace is not None else (part or {}).get("part_number")
        self.existing = set(existing) - ({self.replace} if self.replace else set())
        self.texts = {spec.name: _format(spec, base.get(spec.name)) for spec in PART_FIELDS}
        self.values = {spec.name: base.get(spec.name) for spec in PART_FIELDS}
        self.parse_errors: dict[str, str] = {}
        self.problems: list[str] = []
        self.field_problems: dict[str, list[str]] = {}
        self.general_problems: list[str] = []
        self.field_changed = Signal()
        self.validity_changed = Signal()
        self.fit_changed = Signal()
        if not self.values.get("kind"):
            self.values["kind"] = "rectifier"
            self.texts["kind"] = "rectifier"
        self._validate()

    # -- fields -------------------------------------------------------------
    def error(self, name: str) -> str:
        if name in self.parse_errors:
            return self.parse_errors[name]
        return "\n".join(self.field_problems.get(name, []))

    def set_text(self, name: str, text: str) -> None:
        spec = FIELDS_BY_NAME[name]
        old = (dict(self.parse_errors), list(self.problems))
        self.texts[name] = text
        try:
            value = self._parse(spec, text)
        except InputError as exc:
            self.parse_errors[name] = str(exc)
        else:
            self.parse_errors.pop(name, None)
            self.values[name] = value
        self._validate(old)
        self.field_changed.emit(name)
        if name in ("vf_points", "kind", "junction", "eg_eV", "is_temp_exponent"):
            self.fit_changed.emit()

    def set_value(self, name: str, value) -> None:
        self.set_text(name, _format(FIELDS_BY_NAME[name], value))

    @staticmethod
    def _parse(spec, text: str):
        raw = text.strip()
        if spec.type == "points":
            return parse_points(text)
        if not raw:
            return None
        if spec.type == "float":
            return parse_quantity(raw, spec.unit, name=spec.label)
        if spec.type == "choice" and raw not in spec.choices:
            raise InputError(f"{spec.label}: {raw!r} is not one of {', '.join(spec.choices)}")
        return raw

    # -- the whole part -----------------------------------------------------
    def part(self) -> dict:
        """The part record (valid or not; `is_valid` says)."""
        record = dict(self.values)
        for spec in PART_FIELDS:
            if spec.type in ("text", "choice") and record[spec.name] == "":
                record[spec.name] = None
        record["vf_points"] = list(record.get("vf_points") or [])
        return record

    def is_valid(self) -> bool:
        return not self.parse_errors and not self.problems

    def _validate(self, old=None) -> None:
        if old is None:
            old = (dict(self.parse_errors), list(self.problems))
        part = self.part()
        # A field that does not parse is left out of the record judged, so every other field's
        # range error still shows (one typo must not hide the rest).
        for name in self.parse_errors:
            part[name] = [] if FIELDS_BY_NAME[name].type == "points" else None
        located = [(f, m) for f, m in part_problems(part) if f not in self.parse_errors]
        number = part.get("part_number")
        if number and number in self.existing:
            located.append(("part_number", f"part {number}: part_number {number!r} is already in the library"))
        self.problems = [message for _, message in located]
        self.field_problems = {}
        self.general_problems = []
        for field_name, message in located:
            name = field_name if field_name in FIELD_NAMES else _field_named(message)
            if name:
                self.field_problems.setdefault(name, []).append(on_screen_words(_without_who(message)))
            else:
                self.general_problems.append(on_screen_words(_without_who(message)))
        if (dict(self.parse_errors), list(self.problems)) != old:
            for name in FIELD_NAMES:
                self.field_changed.emit(name)
            self.validity_changed.emit()

    # -- fit ----------------------------------------------------------------
    def fit_preview(self) -> FitPreview:
        """Fit Is, n, Rs to the VF points as typed (the physics core's fit), with the fitted curve."""
        from partpick.physics.constants import T0_K
        from partpick.physics.fit import FitRefused, fit_forward_model

        if "vf_points" in self.parse_errors:
            return FitPreview(error=self.parse_errors["vf_points"])
        points = self.values.get("vf_points") or []
        if len(points) < 2:
            return FitPreview(error="Paste two or more (IF, VF) points to fit the forward model.", points=points)
        schottky = kind_group(self.values.get("kind") or "", self.values.get("junction")) == "schottky"
        band_gap = self.values.get("eg_eV") or (0.69 if schottky else 1.11)  # SPEC §3 defaults
        exponent = self.values.get("is_temp_exponent") or (2.0 if schottky else 3.0)
        current = np.array([p[0] for p in points])
        voltage = np.array([p[1] for p in points])
        try:
            fit = fit_forward_model(current, voltage, T0_K, band_gap, exponent)
        except FitRefused as exc:
            error = f"Fit refused: {exc}." + (f" What to change: {exc.advice}." if exc.advice else "")
            if exc.best is None:
                return FitPreview(error=error, points=points)
            best = exc.best
            return FitPreview(error=error, points=points, refused=best, curve=self._curve(current, best))
        return FitPreview(fit=fit, points=points, curve=self._curve(current, fit))

    @staticmethod
    def _curve(current, fit):
        from partpick.physics.constants import T0_K
        from partpick.physics.junction import forward_voltage

        grid = np.geomspace(current.min() / 3, current.max() * 2, 120)
        return grid, forward_voltage(grid, fit.saturation_current, fit.ideality, fit.series_resistance, T0_K)

    def use_fit(self, preview: FitPreview) -> None:
        """Take the fitted Is, n, Rs as the part's forward model (model source: fitted)."""
        fit = preview.fit
        self.set_value("is_A", float(fit.saturation_current))
        self.set_value("n", float(fit.ideality))
        self.set_value("rs_ohm", float(fit.series_resistance))
        self.set_text("model_source", "fitted")


def on_screen_words(message: str) -> str:
    """A library message with its file keys (``vrrm_V``) replaced by the editor's labels (``VRRM [V]``)."""
    def label(match):
        spec = FIELDS_BY_NAME[match.group(0)]
        return spec.label + (f" [{spec.unit}]" if spec.unit else "")

    names = sorted((n for n in FIELD_NAMES if len(n) > 1 and "_" in n or n in ("n",)), key=len, reverse=True)
    pattern = re.compile(r"(?<![\w.])(" + "|".join(re.escape(n) for n in names) + r")(?![\w])")
    return pattern.sub(label, message)


def _without_who(message: str) -> str:
    head, sep, tail = message.partition(": ")
    return tail if sep and head.startswith("part") else message


def _field_named(message: str) -> str:
    """The part field a validation message is about (its first word after ``part X:``), or ""."""
    body = _without_who(message)
    first = re.split(r"[\s=]", body, maxsplit=1)[0]
    if first in FIELD_NAMES:
        return first
    for name in sorted(FIELD_NAMES, key=len, reverse=True):
        if len(name) > 2 and re.search(rf"\b{re.escape(name)}\b", body):
            return name
    return ""

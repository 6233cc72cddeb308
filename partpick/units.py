"""Engineering-notation numbers at the edge: fields, CSV cells, command-line points.

Parsing is done by `quantiphy` (a maintained library for numbers with SI
prefixes and units); this module adds the strictness a datasheet entry needs:
the unit, when written, must be the expected one; a value must be finite; a
stray suffix (``4.7kk``) or a thousands separator (``1,5``) is refused rather
than guessed at.
"""

from __future__ import annotations

import math
import re

from quantiphy import Quantity, QuantiPhyError

from partpick.errors import InputError

__all__ = ["parse_quantity", "format_quantity", "format_engineering"]

_ENGINEERING_PREFIXES = {-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}

# A number, an optional SI prefix (quantiphy's set, with 'u' and the micro
# signs), an optional unit of letters/Ω.  Anything else is refused before
# quantiphy sees it, so that '4.7kk' cannot become 4.7 k with unit 'k'.
_NUMBER = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?"
_PREFIX = r"[YZEPTGMkKmuµμnpfazy]?"
_SHAPE = re.compile(rf"^\s*({_NUMBER})\s*({_PREFIX})\s*([A-Za-zΩ°%/]*)\s*$")
# Units the user may type after a value, mapped to the canonical unit.
_UNIT_ALIASES = {"ohm": "Ω", "ohms": "Ω", "Ohm": "Ω", "R": "Ω", "Ω": "Ω", "°C": "°C", "C": "°C"}


def _canonical(unit: str) -> str:
    return _UNIT_ALIASES.get(unit, unit)


def parse_quantity(text: str | float | int, unit: str = "", *, name: str = "value") -> float:
    """Parse an engineering-notation entry into a float in SI base units.

    Parameters
    ----------
    text : str or number
        ``"4.7k"``, ``"10 mA"``, ``"1e-14"``, ``"300 mV"``, ``"2.2 kohm"``.
    unit : str
        The expected base unit (``"A"``, ``"V"``, ``"Ω"``, ``"W"``...). When the
        entry carries a unit it must be this one; an empty string accepts only
        bare numbers with an optional prefix.
    name : str
        The field's name, used in the error message.

    Returns
    -------
    float
        The value in base units (``"10 mA"`` gives 0.01).

    Raises
    ------
    InputError
        The entry is empty, malformed, carries a different unit or is not finite.
    """
    if isinstance(text, bool):
        raise InputError(f"{name}: {text!r} is not a number")
    if isinstance(text, (int, float)):
        value = float(text)
        if not math.isfinite(value):
            raise InputError(f"{name}: {text!r} is not a finite number")
        return value
    raw = str(text).strip()
    if not raw:
        raise InputError(f"{name}: empty entry, a number is needed")
    # The typographic minus (U+2212) is what partpick itself writes ("−40 °C"); so is a thin or
    # no-break space between number and unit. Read them as the ASCII minus and a space.
    raw = raw.replace("\u2212", "-").replace("\u2009", " ").replace("\u00a0", " ").replace("\u202f", " ")
    match = _SHAPE.match(raw)
    if match is None:
        raise InputError(f"{name}: {raw!r} is not a number in engineering notation (e.g. 4.7k, 10 mA, 1e-14)")
    number, prefix, written_unit = match.groups()
    # A lone trailing letter may be read as a unit where it was a prefix, or
    # the reverse ('1m' is milli, '2 A' is amperes); let the split below decide.
    if prefix and not written_unit and unit and _canonical(prefix) == _canonical(unit):
        prefix, written_unit = "", prefix
    # A unit that starts with a prefix letter ('K/W', 'mm²') is the unit, not kilo or milli of '/W' or 'm²'.
    if prefix and written_unit and unit and _canonical(prefix + written_unit) == _canonical(unit):
        prefix, written_unit = "", prefix + written_unit
    if written_unit:
        if written_unit.lower() in ("ohm", "ohms"):
            written_unit = "Ω"
        if not unit or _canonical(written_unit) != _canonical(unit):
            expected = f"'{unit}'" if unit else "no unit"
            raise InputError(f"{name}: {raw!r} has unit '{written_unit}', expected {expected}")
    if prefix in ("u", "μ"):
        prefix = "µ"
    if prefix == "K":
        prefix = "k"
    try:
        value = float(Quantity(f"{number}{prefix}"))
    except (QuantiPhyError, ValueError) as exc:
        raise InputError(f"{name}: {raw!r} is not a number ({exc})") from exc
    if not math.isfinite(value):
        raise InputError(f"{name}: {raw!r} is out of range (not a finite number)")
    return value


def format_quantity(value: float | None, unit: str = "", *, digits: int = 4) -> str:
    """Format a base-unit value in engineering notation (0.3, 'V' -> '300 mV').

    ``None`` (not known) formats as an empty string.
    """
    if value is None:
        return ""
    if not math.isfinite(value):
        raise ValueError(f"format_quantity: value {value!r} is not finite")
    if value == 0:
        return f"0 {unit}".strip()
    return Quantity(value, unit).render(prec=digits - 1, strip_zeros=True)


def format_engineering(value, unit: str = "", digits: int = 3) -> str:
    """``value`` in engineering notation with an SI prefix: 0.0123, "A" → "12.3 mA".

    Keeps ``digits`` significant digits (trailing zeros kept, as on a
    datasheet), uses the typographic minus and µ. ``None`` gives "—"; a
    non-finite value raises ValueError (it must never be shown as a result).
    """
    if value is None:
        return "—"
    value = float(value)
    if not math.isfinite(value):
        raise ValueError(f"format_engineering: {value!r} is not a finite number")
    sign = "−" if value < 0 else ""
    magnitude = abs(value)
    if magnitude == 0:
        return f"0 {unit}".rstrip()
    if unit in ("°C", "K", "K/W") or unit.startswith("%"):
        # Temperatures and ratios read without prefixes.
        text = f"{magnitude:#.{digits}g}".rstrip(".")
        if "e" in text:
            text = f"{magnitude:.{digits - 1}e}"
        return f"{sign}{text} {unit}".rstrip()
    exponent = int(math.floor(math.log10(magnitude) / 3.0) * 3)
    exponent = max(min(exponent, 9), -15)
    mantissa = magnitude / 10.0**exponent
    text = f"{mantissa:#.{digits}g}"
    if float(text) >= 1000.0 and exponent < 9:  # rounding carried into the next prefix
        exponent += 3
        text = f"{magnitude / 10.0**exponent:#.{digits}g}"
    text = text.rstrip(".")
    return f"{sign}{text} {_ENGINEERING_PREFIXES[exponent]}{unit}".rstrip()

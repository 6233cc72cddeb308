"""The part record: its fields, their units and allowed ranges, and validation.

This module is the one description of a part that every entry path shares:
the CSV reader, the desktop app's part editor (which builds its form from
`PART_FIELDS`), the store and the checker. It is plain Python (no database,
no Qt) so that `partpick.checks` may import it.

A part is a plain dict whose keys are the CSV columns of SPEC §5, in SI units
as the column names say (``_C`` columns in °C, ``ifsm_ms`` in milliseconds,
``_pct`` columns in per cent). Unknown values are ``None``; ``vf_points`` is a
list of ``(IF [A], VF [V])`` tuples, empty when the datasheet gives none.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = [
    "KINDS",
    "LIFECYCLES",
    "MODEL_SOURCES",
    "REF_POINTS",
    "JUNCTIONS",
    "BOOLEANS",
    "FieldSpec",
    "PART_FIELDS",
    "FIELDS_BY_NAME",
    "FIELD_NAMES",
    "MODEL_FIELDS",
    "kind_group",
    "parse_waveform",
    "validate_part",
    "part_problems",
    "empty_part",
    "columns_as_arrays",
]

KINDS = ("rectifier", "signal", "schottky", "fast_recovery", "zener", "bridge", "tvs")
REF_POINTS = ("ambient", "lead", "case")
JUNCTIONS = ("pn", "schottky")
BOOLEANS = ("true", "false")
LIFECYCLES = ("active", "nrnd", "obsolete")
MODEL_SOURCES = ("entered", "fitted")

# The forward-model parameters: given together, or fitted from vf_points.
MODEL_FIELDS = ("is_A", "n", "rs_ohm")


@dataclass(frozen=True)
class FieldSpec:
    """One column of the parts CSV and one field of the part editor.

    Attributes
    ----------
    name : str
        The CSV column and dict key, unit in the name (``vrrm_V``).
    type : str
        ``"float"``, ``"text"``, ``"choice"`` or ``"points"`` (``IF:VF;IF:VF``).
    unit : str
        The base unit for display (``"V"``, ``"A"``, ``"Ω"``, ``"°C"``...); the
        editor adds the engineering prefix. ``""`` for plain numbers and text.
    label : str
        The field's label on screen.
    minimum, maximum : float or None
        The allowed range of a number (of each IF and VF for ``points``).
    choices : tuple of str
        The allowed values of a ``choice`` field.
    help : str
        One sentence for the editor's tooltip and the error messages.
    exclusive_minimum : bool
        True where the minimum itself is not allowed (``vrrm_V > 0``).
    max_length : int or None
        Longest text accepted (the database column's size).
    """

    name: str
    type: str
    unit: str
    label: str
    minimum: float | None = None
    maximum: float | None = None
    choices: tuple[str, ...] = ()
    help: str = ""
    exclusive_minimum: bool = False
    max_length: int | None = None

    def range_text(self) -> str:
        """The allowed range in words, for error messages and tooltips."""
        if self.type == "choice":
            return "one of " + ", ".join(self.choices)
        if self.type == "text":
            return f"text of at most {self.max_length} characters" if self.max_length else "text"
        unit = f" {self.unit}" if self.unit else ""
        low = _number_text(self.minimum)
        high = _number_text(self.maximum)
        if self.minimum is not None and self.maximum is not None:
            op = "<" if self.exclusive_minimum else "≤"
            return f"{low} {op} value ≤ {high}{unit}"
        if self.minimum is not None:
            return f"value {'>' if self.exclusive_minimum else '≥'} {low}{unit}"
        if self.maximum is not None:
            return f"value ≤ {high}{unit}"
        return "any finite number"


def _number_text(value: float | None) -> str:
    if value is None:
        return ""
    return f"{value:g}"


def _f(name, unit, label, minimum=None, maximum=None, help="", exclusive_minimum=False):
    return FieldSpec(name, "float", unit, label, minimum, maximum, (), help, exclusive_minimum)


def _t(name, label, max_length, help=""):
    return FieldSpec(name, "text", "", label, help=help, max_length=max_length)


def _c(name, label, choices, help=""):
    return FieldSpec(name, "choice", "", label, choices=choices, help=help, max_length=max(map(len, choices)))


# Ranges are physical plausibility limits, wide enough for every real
# datasheet value and narrow enough to catch a unit slip (mA typed as A,
# °C typed as K). Temperatures span the −65…250 °C of device ratings.
PART_FIELDS: tuple[FieldSpec, ...] = (
    _t("part_number", "Part number", 64, "The part's unique number in this library."),
    _c("kind", "Kind", KINDS,
       "Rectifier, signal, Schottky, fast-recovery or Zener diode, a bridge (four legs) or a TVS."),
    _t("manufacturer", "Manufacturer", 128, "Who makes the part."),
    _t("package", "Package", 64, "The package name; substitutes are flagged same-package or not."),
    _t("datasheet", "Datasheet", 512, "A reference to the datasheet: file name, document number or link."),
    _f("vrrm_V", "V", "VRRM", 0.0, 100e3, "Repetitive peak reverse voltage.", True),
    _f("if_avg_A", "A", "IF(AV)", 0.0, 10e3, "Average forward current rating at if_ref_C.", True),
    _f("if_ref_C", "°C", "IF(AV) rated up to", -65.0, 250.0,
       "Case or ambient temperature up to which IF(AV) holds (default 25 °C)."),
    _f("ifsm_A", "A", "IFSM", 0.0, 100e3, "Non-repetitive surge current rating.", True),
    _f("ifsm_ms", "", "IFSM pulse [ms]", 0.0, 1000.0,
       "Surge pulse length in ms (default 8.3 ms, a half sine at 60 Hz).", True),
    _f("pd_W", "W", "Pd", 0.0, 10e3, "Power rating at pd_ref_C; with Tj max it gives RthJA.", True),
    _f("pd_ref_C", "°C", "Pd rated up to", -65.0, 250.0, "Temperature up to which Pd holds (default 25 °C)."),
    _f("tj_max_C", "°C", "Tj max", 25.0, 250.0, "Maximum junction temperature.", True),
    _f("rth_ja_K_per_W", "K/W", "RthJA", 0.0, 10e3, "Junction-to-ambient thermal resistance; with Tj max it gives Pd.",
       True),
    _f("is_A", "A", "Is", 0.0, 1e-2, "Saturation current of the forward model at 25 °C.", True),
    _f("n", "", "n", 0.5, 4.0, "Ideality factor of the forward model."),
    _f("rs_ohm", "Ω", "Rs", 0.0, 1e3, "Series resistance of the forward model at 25 °C."),
    _f("rs_temp_exponent", "", "Rs temperature exponent", -3.0, 5.0,
       "Rs(T) = Rs·(T/T0)^exponent (default 0: Rs constant)."),
    _f("eg_eV", "eV", "Eg", 0.1, 3.6, "Band gap or barrier height for Is(T) (default 1.11 eV pn, 0.69 eV Schottky)."),
    _f("is_temp_exponent", "", "Is temperature exponent", 0.0, 6.0,
       "Exponent m of Is(T) (default 3 pn, 2 Schottky)."),
    _c("model_source", "Model source", MODEL_SOURCES,
       "Whether Is, n and Rs were entered from the datasheet or fitted to its VF points."),
    FieldSpec("vf_points", "points", "", "VF points", 0.0, 100e3, (),
              "Datasheet forward curve at 25 °C as IF:VF pairs in A and V, e.g. 0.1:0.72;1:0.93.", True),
    _c("pd_ref_point", "Pd rated at", REF_POINTS,
       "Where Pd's rating temperature is measured: ambient (default), lead or case."),
    _c("if_ref_point", "IF(AV) rated at", REF_POINTS,
       "Where IF(AV)'s rating temperature is measured: ambient (default), lead or case."),
    _f("rth_jc_K_per_W", "K/W", "RthJC", 0.0, 10e3, "Junction-to-case thermal resistance (heatsink packages).",
       True),
    _f("rth_jl_K_per_W", "K/W", "RthJL", 0.0, 10e3, "Junction-to-lead (solder point) thermal resistance.", True),
    _f("rth_ja_area_mm2", "mm²", "RthJA copper area", 0.0, 1e6,
       "Copper area of the board on which the datasheet's RthJA was measured.", True),
    _f("rth_ja_large_K_per_W", "K/W", "RthJA, large copper", 0.0, 10e3,
       "Datasheet RthJA on the larger copper area rth_ja_large_area_mm2.", True),
    _f("rth_ja_large_area_mm2", "mm²", "Large copper area", 0.0, 1e6,
       "The larger copper area at which rth_ja_large_K_per_W is given.", True),
    _f("tau_th_s", "s", "Thermal time constant", 0.0, 1e4,
       "Junction thermal time constant for pulses: Zth(t) = RthJA·min(1, √(t/τ)).", True),
    _f("ifrm_A", "A", "IFRM", 0.0, 100e3, "Repetitive peak forward current rating.", True),
    _f("trr_s", "s", "trr", 0.0, 1e-3, "Reverse recovery time."),
    _f("qrr_C", "C", "Qrr", 0.0, 1e-3, "Reverse recovery charge."),
    _c("junction", "Junction", JUNCTIONS, "For a bridge: pn or Schottky legs (sets Eg, m and the policy limits)."),
    _f("vwm_V", "V", "VWM", 0.0, 100e3, "TVS stand-off (working peak reverse) voltage.", True),
    _f("vbr_min_V", "V", "VBR min", 0.0, 100e3, "TVS minimum breakdown voltage at it_A, 25 °C.", True),
    _f("vbr_max_V", "V", "VBR max", 0.0, 100e3, "TVS maximum breakdown voltage at it_A, 25 °C.", True),
    _f("it_A", "A", "IT", 0.0, 10.0, "TVS test current of the breakdown voltage.", True),
    _f("vc_V", "V", "VC", 0.0, 100e3, "TVS maximum clamping voltage at ipp_A.", True),
    _f("ipp_A", "A", "IPP", 0.0, 100e3, "TVS peak pulse current of the clamping voltage.", True),
    _f("ppp_W", "W", "PPP", 0.0, 1e8, "TVS peak pulse power rating for ppp_waveform.", True),
    _t("ppp_waveform", "PPP waveform", 32, "Pulse of the PPP rating as rise/decay in µs (default 10/1000)."),
    _f("ppp2_W", "W", "PPP, second point", 0.0, 1e8, "TVS peak pulse power for a second waveform.", True),
    _t("ppp2_waveform", "PPP2 waveform", 32, "Pulse of the second PPP rating as rise/decay in µs, e.g. 8/20."),
    _c("bidirectional", "Bidirectional", BOOLEANS, "For a TVS: true when it clamps both polarities."),
    _f("vbr_tc_pct_per_K", "%/K", "αVBR", -1.0, 1.0, "Temperature coefficient of the TVS breakdown voltage."),
    _f("vf_max_V", "V", "VF max", 0.0, 100.0, "Guaranteed maximum forward voltage at vf_max_at_A.", True),
    _f("vf_max_at_A", "A", "VF max at", 0.0, 100e3, "Current at which VF max is guaranteed.", True),
    _f("ir_A", "A", "IR max", 0.0, 1.0, "Maximum reverse current at ir_vr_V and ir_t_C.", True),
    _f("ir_vr_V", "V", "IR at VR", 0.0, 100e3, "Reverse voltage at which IR max is given.", True),
    _f("ir_t_C", "°C", "IR at Tj", -65.0, 250.0, "Junction temperature at which IR max is given."),
    _f("ir_hot_A", "A", "IR max, hot", 0.0, 1.0, "Maximum reverse current at ir_vr_V and the hot ir_hot_t_C.", True),
    _f("ir_hot_t_C", "°C", "IR hot at Tj", -65.0, 250.0, "Junction temperature of the hot IR max."),
    _f("ir_double_K", "K", "IR doubles every", 0.0, 100.0, "Temperature rise that doubles IR (default 10 K).", True),
    _f("vrsm_V", "V", "VRSM", 0.0, 100e3, "Non-repetitive peak reverse voltage (for reverse transients).", True),
    _f("vz_V", "V", "Vz", 0.0, 1000.0, "Zener voltage at Izt, 25 °C.", True),
    _f("vz_tol_pct", "%", "Vz tolerance", 0.0, 50.0, "± tolerance of Vz in per cent.", True),
    _f("izt_A", "A", "Izt", 0.0, 100.0, "Zener test current.", True),
    _f("zzt_ohm", "Ω", "Zzt", 0.0, 100e3, "Dynamic impedance at Izt.", True),
    _f("izk_A", "A", "Izk", 0.0, 100.0, "Knee current: below it the Zener does not regulate.", True),
    _f("zzk_ohm", "Ω", "Zzk", 0.0, 1e6, "Dynamic impedance at Izk.", True),
    _f("vz_tc_pct_per_K", "%/K", "αVz", -1.0, 1.0, "Temperature coefficient of Vz in %/K."),
    _f("price", "", "Price", 0.0, 1e6, "Unit price in the library's currency."),
    _c("lifecycle", "Lifecycle", LIFECYCLES, "Active, not recommended for new designs (nrnd) or obsolete."),
    _t("notes", "Notes", 4000, "Free text."),
)

FIELDS_BY_NAME: dict[str, FieldSpec] = {spec.name: spec for spec in PART_FIELDS}
FIELD_NAMES: tuple[str, ...] = tuple(spec.name for spec in PART_FIELDS)
_TEXT_FIELDS: tuple[str, ...] = tuple(spec.name for spec in PART_FIELDS if spec.type in ("text", "choice"))

# Fields that must be given together (a value means little without its partner).
_PAIRS = (("vf_max_V", "vf_max_at_A"), ("ir_A", "ir_vr_V"), ("ir_hot_A", "ir_hot_t_C"),
          ("rth_ja_large_K_per_W", "rth_ja_large_area_mm2"), ("ppp2_W", "ppp2_waveform"))
_TVS_REQUIRED = ("vwm_V", "vbr_min_V", "vbr_max_V", "it_A", "vc_V", "ipp_A", "ppp_W")
_ZENER_REQUIRED = ("vz_V", "vz_tol_pct", "izt_A", "zzt_ohm")
_DIODE_REQUIRED = ("vrrm_V", "if_avg_A")


def kind_group(kind: str, junction: str | None = None) -> str:
    """The derating-policy group of a kind: ``"pn"``, ``"schottky"``, ``"zener"`` or ``"tvs"``.

    A bridge follows its legs' ``junction`` (``"pn"`` when not known).
    """
    if kind == "zener":
        return "zener"
    if kind == "schottky" or (kind == "bridge" and junction == "schottky"):
        return "schottky"
    if kind == "tvs":
        return "tvs"
    if kind in KINDS:
        return "pn"
    raise ValueError(f"kind: {kind!r} is not one of {', '.join(KINDS)}")


def parse_waveform(text: str) -> tuple[float, float]:
    """A pulse waveform ``"rise/decay"`` in µs (``"10/1000"``) as (rise, decay) in seconds.

    Raises
    ------
    ValueError
        The text is not two positive numbers separated by ``/``.
    """
    parts = text.split("/") if isinstance(text, str) else []
    try:
        rise, decay = (float(p) for p in parts)
    except (TypeError, ValueError):
        raise ValueError(f"waveform {text!r} is not rise/decay in µs (e.g. 10/1000)") from None
    if not (math.isfinite(rise) and math.isfinite(decay) and 0 < rise < decay):
        raise ValueError(f"waveform {text!r}: rise and decay must be finite, positive and rise < decay (µs)")
    return rise * 1e-6, decay * 1e-6


def empty_part() -> dict:
    """A part dict with every field unknown (the editor's starting point)."""
    part = {name: None for name in FIELD_NAMES}
    part["vf_points"] = []
    return part


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _check_number(spec: FieldSpec, value, who: str, problems: "_Problems") -> bool:
    if not _is_number(value):
        problems.add(spec.name, f"{who}: {spec.name} = {value!r} is not a number ({spec.range_text()})")
        return False
    if not math.isfinite(value):
        problems.add(spec.name, f"{who}: {spec.name} = {value!r} is not a finite number ({spec.range_text()})")
        return False
    low, high = spec.minimum, spec.maximum
    too_low = low is not None and (value <= low if spec.exclusive_minimum else value < low)
    too_high = high is not None and value > high
    if too_low or too_high:
        unit = f" {spec.unit}" if spec.unit else ""
        problems.add(spec.name, f"{who}: {spec.name} = {value:g}{unit} is out of range (allowed: {spec.range_text()})")
        return False
    return True


def _check_points(spec: FieldSpec, points, who: str, problems: "_Problems") -> None:
    if not isinstance(points, (list, tuple)):
        problems.add("vf_points", f"{who}: vf_points = {points!r} is not a list of (IF, VF) pairs")
        return
    previous = None
    for index, pair in enumerate(points, start=1):
        if not isinstance(pair, (list, tuple)) or len(pair) != 2:
            problems.add("vf_points", f"{who}: vf_points point {index} = {pair!r} is not an (IF, VF) pair")
            return
        current, voltage = pair
        ok = True
        for quantity, value, unit, high in (("IF", current, "A", 100e3), ("VF", voltage, "V", 100.0)):
            if not _is_number(value) or not math.isfinite(value) or not 0 < value <= high:
                problems.add("vf_points",
                    f"{who}: vf_points point {index} {quantity} = {value!r} is out of range "
                    f"(allowed: 0 < {quantity} ≤ {high:g} {unit})"
                )
                ok = False
        if not ok:
            return
        if previous is not None:
            if current <= previous[0]:
                problems.add("vf_points",
                    f"{who}: vf_points point {index} IF = {current:g} A is not above the previous "
                    f"{previous[0]:g} A (points must rise strictly in IF)"
                )
            if voltage <= previous[1]:
                problems.add("vf_points",
                    f"{who}: vf_points point {index} VF = {voltage:g} V is not above the previous "
                    f"{previous[1]:g} V (points must rise strictly in VF)"
                )
        previous = (current, voltage)


class _Problems(list):
    """Problems as (field, message) pairs; `validate_part` returns the messages."""

    def add(self, field_name: str | None, message: str) -> None:
        self.append((field_name, message))


def validate_part(part: dict) -> list[str]:
    """Every problem with a part, as messages (see `part_problems`)."""
    return [message for _, message in part_problems(part)]


def part_problems(part: dict) -> list[tuple[str | None, str]]:
    """Every problem with a part, each naming the part, field, value and allowed range.

    Parameters
    ----------
    part : dict
        A part record (keys of `PART_FIELDS`; missing keys count as unknown).

    Returns
    -------
    list of (str or None, str)
        (field, message) for each problem; empty when the part may be
        stored. The checks: types and physical ranges of every field;
        required fields by kind (every diode needs VRRM, IF(AV) and a forward model — Is, n, Rs or VF points; a Zener
        needs Vz, its tolerance, Izt, Zzt, and Pd or RthJA); fields that go
        together; VF points rising strictly in IF and VF; rating temperatures
        below Tj max, so that Pd and RthJA give each other
        (RthJA = (Tj max − pd_ref_C)/Pd, SPEC §3).
    """
    problems = _Problems()
    if not isinstance(part, dict):
        problems.add(None, f"part: {part!r} is not a part record")
        return problems
    unknown = sorted(set(part) - set(FIELD_NAMES) - {"fit_residual_mV"})
    number = part.get("part_number")
    if isinstance(number, str) and number:
        who = f"part {number}" if number.isprintable() else f"part {number!r}"
    else:
        who = "part (no part number)"
    for name in unknown:
        problems.add(name, f"{who}: {name!r} is not a part field")

    given = {}
    for spec in PART_FIELDS:
        value = part.get(spec.name)
        if value is None and spec.type != "points":
            continue
        if type(value) is float and spec.type == "float":
            # The common case, checked inline; anything doubtful goes the long way for its message.
            low, high = spec.minimum, spec.maximum
            if (value > low if spec.exclusive_minimum else value >= low) and value <= high:
                given[spec.name] = value
                continue
        if spec.type == "points":
            if value is None:
                value = []
            _check_points(spec, value, who, problems)
            given[spec.name] = value
            continue
        if value is None:
            continue
        if spec.type in ("text", "choice"):
            if not isinstance(value, str):
                problems.add(spec.name, f"{who}: {spec.name} = {value!r} is not text")
                continue
            if value == "":
                continue  # empty text is "not known"
            if spec.type == "choice" and value not in spec.choices:
                problems.add(spec.name, f"{who}: {spec.name} = {value!r} is not allowed (allowed: {spec.range_text()})")
                continue
            if spec.max_length is not None and len(value) > spec.max_length:
                problems.add(
                    spec.name, f"{who}: {spec.name} is {len(value)} characters long (allowed: {spec.range_text()})"
                )
                continue
        elif not _check_number(spec, value, who, problems):
            continue
        given[spec.name] = value

    if number is None or number == "":
        problems.add("part_number", f"{who}: part_number is missing (a unique part number is required)")
    elif isinstance(number, str) and (number != number.strip() or any(c in number for c in "\r\n\t")):
        problems.add("part_number", f"{who}: part_number {number!r} has leading/trailing spaces or control characters")
    kind = part.get("kind")
    if kind is None or kind == "":
        problems.add("kind", f"{who}: kind is missing (allowed: one of {', '.join(KINDS)})")

    def has(name: str) -> bool:
        return name in given and given[name] not in ([], ())

    for first, second in _PAIRS:
        if has(first) != has(second):
            present, absent = (first, second) if has(first) else (second, first)
            problems.add(present, f"{who}: {present} is given without {absent} (give both or neither)")

    model_given = [name for name in MODEL_FIELDS if part.get(name) is not None]
    if model_given and len(model_given) != len(MODEL_FIELDS):
        missing = [name for name in MODEL_FIELDS if name not in model_given]
        problems.add(missing[0],
            f"{who}: forward model incomplete: {', '.join(model_given)} given without {', '.join(missing)} "
            "(give is_A, n and rs_ohm together, or only vf_points to have them fitted)"
        )
    source = given.get("model_source")
    if source and not model_given and not has("vf_points"):
        problems.add("model_source",
                     f"{who}: model_source = {source!r} but no forward model (is_A, n, rs_ohm) is given")
    if source == "fitted" and not has("vf_points"):
        problems.add("model_source", f"{who}: model_source = 'fitted' needs the vf_points the model was fitted to")

    if "tj_max_C" in given:
        tj_max = given["tj_max_C"]
        for ref in ("pd_ref_C", "if_ref_C", "ir_t_C"):
            if ref in given and given[ref] >= tj_max:
                problems.add(ref,
                    f"{who}: {ref} = {given[ref]:g} °C is not below tj_max_C = {tj_max:g} °C "
                    f"(allowed: {ref} < tj_max_C)"
                )
    if has("ir_vr_V") and has("vrrm_V") and given["ir_vr_V"] > given["vrrm_V"]:
        problems.add("ir_vr_V",
            f"{who}: ir_vr_V = {given['ir_vr_V']:g} V is above vrrm_V = {given['vrrm_V']:g} V "
            "(allowed: ir_vr_V ≤ vrrm_V)"
        )
    if has("zzk_ohm") and not has("izk_A"):
        problems.add("zzk_ohm", f"{who}: zzk_ohm is given without izk_A (the knee impedance needs its knee current)")
    if has("izk_A") and has("izt_A") and given["izk_A"] >= given["izt_A"]:
        problems.add("izk_A",
            f"{who}: izk_A = {given['izk_A']:g} A is not below izt_A = {given['izt_A']:g} A "
            "(allowed: izk_A < izt_A)"
        )

    from partpick.library.rules import contradiction_problems, text_field_problems

    problems.extend(text_field_problems(part, _TEXT_FIELDS, who))
    problems.extend(contradiction_problems(given, who))

    for name in ("ppp_waveform", "ppp2_waveform"):
        if has(name):
            try:
                parse_waveform(given[name])
            except ValueError as error:
                problems.add(name, f"{who}: {name}: {error}")
    for dependent, base in (("ir_hot_A", "ir_A"), ("rth_ja_area_mm2", "rth_ja_K_per_W")):
        if has(dependent) and not has(base):
            problems.add(dependent, f"{who}: {dependent} is given without {base} (it qualifies {base})")

    if kind == "tvs":
        for name in _TVS_REQUIRED:
            if not has(name) and part.get(name) is None:
                help_text = FIELDS_BY_NAME[name].help.rstrip(".")
                problems.add(name, f"{who}: {name} is required for a TVS ({help_text})")
    elif kind == "zener":
        for name in _ZENER_REQUIRED:
            if not has(name) and part.get(name) is None:
                help_text = FIELDS_BY_NAME[name].help.rstrip(".")
                problems.add(name, f"{who}: {name} is required for a Zener ({help_text})")
        if not has("pd_W") and not has("rth_ja_K_per_W") and part.get("pd_W") is None \
                and part.get("rth_ja_K_per_W") is None:
            problems.add("pd_W", f"{who}: a Zener needs pd_W or rth_ja_K_per_W (power or thermal data)")
    elif kind in KINDS:
        if kind == "bridge" and not has("junction"):
            problems.add("junction", f"{who}: junction is required for a bridge (pn or schottky legs)")
        for name in _DIODE_REQUIRED:
            if not has(name) and part.get(name) is None:
                help_text = FIELDS_BY_NAME[name].help.rstrip(".")
                problems.add(name, f"{who}: {name} is required for a {kind} diode ({help_text})")
        if not model_given and not has("vf_points") and not any(part.get(n) is not None for n in MODEL_FIELDS):
            problems.add("is_A",
                f"{who}: a {kind} diode needs a forward model: is_A, n and rs_ohm, or vf_points to fit them"
            )
    return problems


def columns_as_arrays(parts: list[dict], names: tuple[str, ...] | None = None) -> dict:
    """The numeric fields of many parts as numpy arrays (NaN where not known).

    Parameters
    ----------
    parts : list of dict
        Part records, e.g. from ``Library.list_parts()``.
    names : tuple of str, optional
        The fields to convert; default every ``float`` field.

    Returns
    -------
    dict of str to ndarray
        One float64 array per field, in the order of ``parts``.
    """
    import gc
    import operator

    import numpy as np  # only callers that want arrays pay for numpy

    if names is None:
        names = tuple(spec.name for spec in PART_FIELDS if spec.type == "float")
    names = tuple(names)
    if not parts or not names:
        return {name: np.empty(0, dtype=float) for name in names}
    # Many small tuples, no cycles: the cyclic collector would only slow this down.
    collecting = gc.isenabled()
    gc.disable()
    try:
        try:
            pick = operator.itemgetter(*names)
            picked = [pick(part) for part in parts]
        except KeyError:  # records lacking some keys: those values are unknown
            picked = [tuple(part.get(name) for name in names) for part in parts]
        if len(names) == 1:
            picked = [(value,) for value in picked]
        # One conversion for the whole table; None becomes NaN under dtype=float.
        table = np.ascontiguousarray(np.array(picked, dtype=float).T)
    finally:
        if collecting:
            gc.enable()
    return {name: table[index] for index, name in enumerate(names)}

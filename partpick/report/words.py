"""The words, units and published sources every report format shares (SPEC §8 vocabulary)."""

from __future__ import annotations

import math
import re

from partpick.checks.cautions import ALL_CAUTIONS
from partpick.checks.curves import corner_label
from partpick.units import format_engineering

__all__ = ["CHECK_LABELS", "METRIC_ORDER", "METRIC_LABELS", "metric_unit", "format_value", "corner_text",
           "clean_text", "CAUTIONS", "cautions_of", "short_reason", "price_text", "FORMULAS", "KEY_METRICS",
           "RATING_OF_CHECK", "smallest_margin", "first_failing", "ROLE_LABELS", "OBJECTIVE_LABELS", "LIMIT_ORDER",
           "margin_unit", "margin_text", "pct_text"]

ROLE_LABELS = {"series": "Series diode", "zener_shunt": "Zener shunt regulator"}
OBJECTIVE_LABELS = {"drop": "Lowest drop", "dissipation": "Lowest dissipation", "headroom": "Most headroom",
                    "price": "Lowest price", "balanced": "Balanced"}

CHECK_LABELS = {
    "data_missing": "Data missing",
    "feasible": "Resistor exists",
    "forward_drop": "Forward drop",
    "output_min": "Output minimum",
    "reverse_voltage": "Reverse voltage",
    "forward_current": "Forward current",
    "power": "Power",
    "junction_temp": "Junction temperature",
    "reverse_runaway": "Reverse-state runaway",
    "leakage": "Leakage",
    "surge": "Surge I²t",
    "surge_peak": "Surge peak",
    "reverse_transient": "Reverse transient",
    "zener_current_min": "Minimum Zener current",
    "zener_power": "Zener power",
    "regulation_error": "Regulation error",
    "resistor_power": "Resistor power",
    "short_circuit": "Output short (resistor)",
}

# SPEC §5 metric keys in their order.
METRIC_ORDER = (
    "forward_drop_V", "output_min_V", "output_max_V", "dissipation_W", "junction_temp_C", "reverse_voltage_V",
    "reverse_headroom_V", "reverse_stress_pct", "leakage_A", "reverse_power_W", "runaway_ambient_C",
    "runaway_rth_K_per_W", "inrush_peak_A", "vth0_V", "ron_ohm",
    "series_resistor_ohm", "resistor_power_W", "resistor_power_class_W", "zener_current_min_A",
    "zener_current_max_A", "zener_power_W", "regulation_error_pct", "line_regulation_mV_per_V",
    "load_regulation_mV_per_mA", "line_regulation_worst_mV_per_V", "load_regulation_worst_mV_per_mA",
    "short_circuit_power_W", "yield_pct", "yield_low_pct", "yield_high_pct",
)
METRIC_LABELS = {
    "forward_drop_V": "Forward drop", "output_min_V": "Output min", "output_max_V": "Output max",
    "dissipation_W": "Dissipation", "junction_temp_C": "Tj", "reverse_voltage_V": "Reverse voltage",
    "reverse_headroom_V": "Reverse headroom", "reverse_stress_pct": "Reverse stress", "leakage_A": "Leakage",
    "reverse_power_W": "Reverse power", "runaway_ambient_C": "Runaway ambient",
    "runaway_rth_K_per_W": "Runaway RthJA", "inrush_peak_A": "Inrush peak", "vth0_V": "Hand model Vth0", "ron_ohm": "Hand model Ron",
    "series_resistor_ohm": "Series resistor", "resistor_power_W": "Resistor power",
    "resistor_power_class_W": "Resistor class", "zener_current_min_A": "Iz min", "zener_current_max_A": "Iz max",
    "zener_power_W": "Zener power", "regulation_error_pct": "Regulation error",
    "line_regulation_mV_per_V": "Line regulation", "load_regulation_mV_per_mA": "Load regulation",
    "line_regulation_worst_mV_per_V": "Line regulation at the lowest Iz",
    "load_regulation_worst_mV_per_mA": "Load regulation at the lowest Iz",
    "short_circuit_power_W": "Resistor power, output shorted",
    "yield_pct": "Yield (per build over every corner)",
    "yield_low_pct": "Yield, 95 % interval low (Wilson)",
    "yield_high_pct": "Yield, 95 % interval high (Wilson)",
    "max_ambient_C": "Max ambient", "max_load_A": "Max load", "max_rth_ja_K_per_W": "Max RthJA",
    "max_rth_sa_K_per_W": "Smallest heatsink (max RthSA)", "min_copper_area_mm2": "Min copper area",
}
# SPEC §3a operating limits, in sheet order.
LIMIT_ORDER = ("max_ambient_C", "max_load_A", "max_rth_ja_K_per_W", "max_rth_sa_K_per_W", "min_copper_area_mm2")
KEY_METRICS = {
    "series": ("forward_drop_V", "dissipation_W", "junction_temp_C", "reverse_stress_pct"),
    "zener_shunt": ("series_resistor_ohm", "regulation_error_pct", "zener_power_W", "junction_temp_C"),
}
# The part's rating each check stresses: (field, label, unit).
RATING_OF_CHECK = {
    "reverse_voltage": ("vrrm_V", "VRRM", "V"),
    "forward_current": ("if_avg_A", "IF(AV)", "A"),
    "power": ("pd_W", "Pd", "W"),
    "zener_power": ("pd_W", "Pd", "W"),
    "junction_temp": ("tj_max_C", "Tj max", "°C"),
    "reverse_runaway": ("tj_max_C", "Tj max", "°C"),
    "surge": ("ifsm_A", "IFSM", "A"),
    "leakage": ("ir_A", "IR max (datasheet)", "A"),
    "zener_current_min": ("izk_A", "Izk", "A"),
}



def _merge_role_words() -> None:
    """Each role's own words (`Role.check_labels`, `metric_labels`, `key_metrics`, `rating_of_check`)."""
    global METRIC_ORDER
    from partpick.checks.roles import ROLES

    for role in ROLES.values():
        ROLE_LABELS.setdefault(role.name, role.label)
        for key, label in role.check_labels.items():
            CHECK_LABELS.setdefault(key, label)
        for key, label in role.metric_labels.items():
            METRIC_LABELS.setdefault(key, label)
        METRIC_ORDER += tuple(k for k in role.metric_labels if k not in METRIC_ORDER)
        if role.key_metrics:
            KEY_METRICS.setdefault(role.name, role.key_metrics)
        for key, rating in role.rating_of_check.items():
            RATING_OF_CHECK.setdefault(key, rating)


_merge_role_words()

_SUFFIX_UNITS = (("_Vpp", "V"), ("_Vrms", "V"), ("_deg", "°"), ("_Hz", "Hz"), ("_mm2", "mm²"),
                 ("_mV_per_mA", "mV/mA"), ("_mV_per_V", "mV/V"), ("_K_per_W", "K/W"), ("_pct_per_K", "%/K"),
                 ("_ohm", "Ω"), ("_pct", "%"), ("_ms", "ms"), ("_eV", "eV"), ("_V", "V"),
                 ("_A2s", "A²s"), ("_A", "A"), ("_W", "W"), ("_C", "°C"), ("_K", "K"), ("_F", "F"),
                 ("_J", "J"), ("_s", "s"))


def metric_unit(key: str) -> str:
    """The unit a metric key carries in its name (``forward_drop_V`` → ``V``)."""
    for suffix, unit in _SUFFIX_UNITS:
        if key.endswith(suffix):
            return unit
    return ""


def format_value(value, unit: str = "", digits: int = 4) -> str:
    """A result number for people: engineering notation, '—' when not known, yes/no for flags."""
    if value is None:
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, (int, float)):
        if not math.isfinite(value):
            raise ValueError(f"a result value is not finite ({value!r}); results never carry NaN or Infinity")
        if unit in ("mV/V", "mV/mA"):
            return f"{value:.{digits}g} {unit}".replace("-", "−")
        return format_engineering(value, unit, digits)
    return clean_text(str(value))


_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f]")


def clean_text(text) -> str:
    """User text with control characters (newlines, tabs, terminal escapes) shown as spaces."""
    return _CONTROL.sub(" ", "" if text is None else str(text))


_COMMON_CORNER_KEYS = {"supply_V", "load_A", "ambient_C", "state", "vz_end", "resistor_end"}


def _corner_column(key: str, value) -> str:
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        unit = "V rms" if key.endswith("_Vrms") else metric_unit(key)
        return format_engineering(value, "V" if unit == "V rms" else unit) + (" rms" if unit == "V rms" else "")
    return clean_text(f"{key.rsplit('_', 1)[0].replace('_', ' ')} {value}")


def corner_text(corner: dict | None) -> str:
    """A check's corner in the app's words: '11.0 V · 1.00 A · −20 °C · steady · Vz high · R low'."""
    if not corner:
        return "—"
    text = corner_label(corner.get("supply_V"), corner.get("load_A"), corner.get("ambient_C"), corner.get("state"))
    role_columns = [_corner_column(k, v) for k, v in corner.items() if k not in _COMMON_CORNER_KEYS]
    if role_columns:  # a role's own corner columns (e.g. the AC voltage) lead
        text = " · ".join(role_columns + [text])
    extra = []
    if corner.get("vz_end"):
        extra.append(f"Vz {corner['vz_end']}")
    if corner.get("resistor_end"):
        extra.append(f"R {corner['resistor_end']}")
    return " · ".join([text] + extra) if extra else text


# What a check's margin_pct is a share of, where it is not its limit (SPEC §4 "Margins"). Temperature
# checks (unit °C) are the share of the allowed rise, limit − ambient; the series role's runaway check
# is the share of the thermal resistance still unused.
_TEMPERATURE_BASIS = "of the allowed rise"
MARGIN_PCT_BASIS = {("series", "reverse_runaway"): "of the thermal resistance unused"}


def margin_unit(unit: str) -> str:
    """The unit of a check's ``margin``: the check's own, K for a temperature in °C."""
    return "K" if unit == "°C" else unit


def pct_text(value: float) -> str:
    """A margin in %: '41', '2.5', '−100' (two significant figures below 10, whole numbers above)."""
    return (f"{value:.0f}" if abs(value) >= 10 else f"{value:.1f}").replace("-", "−")


def _on_allowed_rise(check: dict) -> bool:
    """Whether a °C check's margin_pct is the share of limit − ambient (said only where it is true)."""
    margin, pct, limit = check.get("margin"), check.get("margin_pct"), check.get("limit")
    ambient = (check.get("corner") or {}).get("ambient_C")
    if check.get("reason") == "ambient at or above the limit":
        return True
    if None in (margin, pct, limit, ambient) or limit - ambient <= 0:
        return False
    return math.isclose(pct, 100.0 * margin / (limit - ambient), rel_tol=1e-6, abs_tol=1e-9)


def _on_limit(check: dict) -> bool:
    """Whether a check's margin_pct is the plain share of |limit| (the rule for every non-temperature check)."""
    margin, pct, limit = check.get("margin"), check.get("margin_pct"), check.get("limit")
    if None in (margin, pct, limit) or limit == 0:
        return limit == 0 and pct in (0.0, -100.0)
    return math.isclose(pct, 100.0 * margin / abs(limit), rel_tol=1e-6, abs_tol=1e-9)


def margin_text(check: dict, role: str | None = None) -> str:
    """A check's margin in its own unit beside its %: '+12.3 K (41 % of the allowed rise)', '+3.20 V (20 %)'.

    The same words in the text table, the HTML/PDF check sheet and the window (SPEC §8); '—' when
    neither is known; a temperature check without an allowed rise says so.
    """
    margin, pct = check.get("margin"), check.get("margin_pct")
    unit = check.get("unit") or ""
    if margin is None and pct is None:
        return "—"
    if unit == "°C" and _on_allowed_rise(check):
        basis = _TEMPERATURE_BASIS
    elif _on_limit(check):
        basis = ""
    else:
        basis = MARGIN_PCT_BASIS.get((role, check.get("name")), "")
    if pct is not None:
        share = f"{pct_text(pct)} %" + (f" {basis}" if basis else "")
        if check.get("reason") == "ambient at or above the limit":
            share += ": ambient at or above the limit"
    else:
        share = None
    if margin is None or not unit:
        return share
    own = ("+" if margin > 0 else "") + format_engineering(margin, margin_unit(unit), 3)
    return f"{own} ({share})" if share else own


def smallest_margin(candidate: dict) -> float | None:
    """The smallest margin over the candidate's checks [%].

    None when no check has one, and when a failing check has none (its value could not be
    computed, e.g. thermal runaway): the smallest margin is then not known, and a passing
    check's margin must not stand in for it.
    """
    checks = candidate.get("checks", [])
    if any(not c.get("passed") and c.get("margin_pct") is None and c.get("name") != "data_missing"
           for c in checks):
        return None
    margins = [c["margin_pct"] for c in checks if c.get("margin_pct") is not None]
    return min(margins) if margins else None


def short_reason(reason: str, limit: int = 40) -> str:
    """A reason cut to about ``limit`` characters for a table cell: at its first clause, else at a word."""
    reason = clean_text(reason)
    if len(reason) <= limit:
        return reason
    for mark in (":", ";", ","):
        head = reason.split(mark, 1)[0].strip()
        if 8 <= len(head) <= limit + 8:
            return head + " …"
    head = reason[:limit].rsplit(" ", 1)[0]
    return head + " …"


def price_text(price) -> str:
    """A price with two decimals, more only where the library holds them (0.10, 0.095); — unknown."""
    if not isinstance(price, (int, float)) or isinstance(price, bool) or not math.isfinite(price):
        return "—"
    text = f"{price:.4f}".rstrip("0")
    whole, _, decimals = text.partition(".")
    return f"{whole}.{decimals.ljust(2, '0')}"


def first_failing(candidate: dict) -> dict | None:
    """The first failing check (SPEC §4: the one with the most negative margin; `failed_checks` is in that order)."""
    names = candidate.get("failed_checks") or []
    checks = {c.get("name"): c for c in candidate.get("checks", [])}
    if names:
        return checks.get(names[0], {"name": names[0]})
    failing = [c for c in candidate.get("checks", []) if not c.get("passed")]
    return failing[0] if failing else None


CAUTIONS = ALL_CAUTIONS
"""SPEC §7 — what a report prints when a result carries no ``cautions`` of its own (older JSON)."""


def cautions_of(result: dict) -> list[str]:
    """The cautions a rendering of ``result`` prints: the result's list (general, role, assumptions)."""
    return list(result.get("cautions") or ALL_CAUTIONS)

# (what, formula, source) — the formulas the checks and curves use.
FORMULAS = (
    ("Thermal voltage", "VT = k·T/q (25.85 mV at 300 K)",
     "k and q: CODATA values via scipy.constants."),
    ("Forward branch (Shockley equation with series resistance)",
     "I = Is·(exp((V − I·Rs)/(n·VT)) − 1);  V = n·VT·ln(1 + I/Is) + I·Rs",
     "W. Shockley, “The theory of p-n junctions in semiconductors and p-n junction transistors”, "
     "Bell System Technical Journal 28(3), 435–489, 1949."),
    ("Source through a resistor (load line), exact",
     "I = (n·VT/Rt)·W((Is·Rt/(n·VT))·exp((Vb + Is·Rt)/(n·VT))) − Is, Rt = R + Rs, computed as "
     "W(e^z) = ω(z), z = ln(Is·Rt/(n·VT)) + (Vb + Is·Rt)/(n·VT)",
     "A. Banwell, A. Jayakumar, “Exact analytical solution for current flow through diode with series "
     "resistance”, Electronics Letters 36(4), 291–292, 2000; the Wright omega function ω: R. M. Corless, "
     "D. J. Jeffrey, “The Wright ω function”, LNCS 2385, 2002."),
    ("Temperature dependence",
     "Is(T) = Is(T0)·(T/T0)^(m/n)·exp((Eg·q/(n·k))·(1/T0 − 1/T));  Rs(T) = Rs·(T/T0)^p",
     "S. M. Sze, K. K. Ng, Physics of Semiconductor Devices, 3rd ed., Wiley, 2007. Defaults Eg 1.11 eV pn, "
     "0.69 eV Schottky; m 3 pn, 2 Schottky."),
    ("Maximum forward voltage",
     "Is scaled down so that the curve passes through VF max at its current (25 °C) where that lies above "
     "the typical curve; the checks use that model",
     "partpick's method."),
    ("Junction temperature and allowed power",
     "Tj = Ta + P·RthJA;  Pallow(Ta) = Pd for Ta ≤ Tref, Pd·(Tj max − Ta)/(Tj max − Tref) above;  "
     "RthJA = (Tj max − Tref)/Pd",
     "JEDEC JESD51 (the RthJA junction-to-ambient thermal resistance); the linear derating curve of "
     "datasheets."),
    ("Thermal path (board or heatsink mount)",
     "board: RthJA(A) = R1 + (R2 − R1)·ln(A/A1)/ln(A2/A1) through the datasheet's two copper areas, "
     "extended below A1 (extrapolated), held at R2 above A2; heatsink: RthJA = RthJC + RthCS + RthSA "
     "(RthCS default 1.0 K/W, an insulating pad); Pallow = (Tj max − Ta)/RthJA in use; a lead- or "
     "case-rated rating refers to Tj − P·RthJL (RthJC)",
     "JEDEC JESD51 (a datasheet RthJA is a test-board figure in still air); the ln-area line and the flat "
     "part above the larger area are partpick's assumptions; the pad value is from memory."),
    ("Operating limits",
     "the highest ambient max [ambient_min, Tj max] to 0.1 K, the highest load max [0, 10 × load_max] and "
     "the largest RthJA [0, 10 × RthJA in use] to 0.1 %, each at which every check passes, by bisection "
     "with the discrete choices (E-series resistor, power class) held",
     "partpick's method."),
    ("What sets the worst case",
     "change of the smallest margin (% points) for +1 % of each input (+1 K temperatures; from 0: 1 mA, "
     "0.01 %/K, one-sided), central differences, discrete choices held; the five largest, signed",
     "partpick's method."),
    ("Self-heating",
     "Tj = Ta + P(Tj)·RthJA solved per corner by Newton's method",
     "Standard numerical practice (Newton iteration on the electrothermal balance)."),
    ("Reverse leakage and reverse-state runaway",
     "IR(T) = IR,rated·2^((T − Trated)/d)·max(1, VR/VR,rated); stable Tj of Tj = Ta + VR·IR(Tj)·RthJA "
     "from the principal branch of Lambert W, runaway where none exists",
     "Doubling every d = 10 K by default: common practice. Lambert W: Corless et al., “On the Lambert W "
     "function”, Advances in Computational Mathematics 5, 329–359, 1996."),
    ("Zener branch",
     "Vz(Iz, Tj) = Vz·(1 + αVz·(Tj − 25 °C)) + ΔV(Iz); Z = Zzt above Izt, ln Z linear in ln Iz from Zzk at "
     "Izk to Zzt at Izt",
     "partpick's model of the datasheet's test and knee points."),
    ("Hand model at the operating point",
     "Ron = dV/dI = n·VT/(Iop + Is) + Rs;  Vth0 = Vf(Iop) − Iop·Ron, tangent at Iop = load_max_A at the Tj of "
     "the worst-drop corner",
     "The piecewise-linear diode model of the circuit textbooks."),
    ("Preferred resistor values and power classes",
     "E12, E24, E48, E96 across decades; classes 0.125, 0.25, 0.5, 1, 2, 3, 5 W",
     "IEC 60063 (preferred number series for resistors); power classes: common practice."),
    ("Margin",
     "margin = limit − value (upper limit) or value − limit (lower limit), in the check's own unit (K for "
     "temperatures); margin % = 100·margin/budget, budget = |limit|, or limit − ambient for a temperature (the "
     "share of the allowed rise unused; ≤ 0: fails at −100 %); negative = fails",
     "partpick's definition (one rule for every check)."),
    ("high_reliability policy",
     "reverse ≤ 70 % of VRRM, current ≤ 50 %, surge ≤ 50 %, Tj ≤ min(125 °C, Tj max − 40 K), Zener power "
     "≤ 50 %, resistor power ≤ 50 %, TVS pulse power ≤ 50 %; other limits as commercial",
     "In line with MIL-STD-975M appendix A as transcribed — a cancelled public standard; verify before "
     "relying on it; the 40 K and the resistor limit from memory — verify. Load your own organisation's "
     "derating policy for real reviews."),
)

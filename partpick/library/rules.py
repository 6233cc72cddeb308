"""Rules across a part's fields: text rules and values that contradict each other (SPEC §5).

`part_problems` (``fields.py``) checks each field on its own; the rules here
look at the text of every text field and at pairs of values. Each problem
names the part, the field, the values and the reason. Plain Python, like
``fields.py`` (the checker and the editor import it).
"""

from __future__ import annotations

import math

from partpick.text import text_problem

__all__ = ["text_field_problems", "contradiction_problems", "typical_forward_voltage"]

# CODATA 2018 exact values (SI redefinition of 2019).
_K_B = 1.380649e-23
_Q_E = 1.602176634e-19
_T0_K = 298.15
IS_MIN_A, IS_MAX_A = 1e-20, 1e-2
N_MIN_ENTERED, N_MAX_ENTERED = 1.0, 4.0


def text_field_problems(part: dict, text_fields, who: str) -> list[tuple[str, str]]:
    """Text rules of SPEC §5 for every text field of ``part`` (names of the text/choice fields)."""
    problems = []
    for name in text_fields:
        value = part.get(name)
        if not isinstance(value, str) or value == "":
            continue
        reason = text_problem(value, line_breaks=name == "notes", printable_only=name == "part_number")
        if reason is not None:
            problems.append((name, f"{who}: {name} {reason} (not allowed in text fields)"))
    return problems


def typical_forward_voltage(current_A: float, is_A: float, n: float, rs_ohm: float) -> float:
    """Shockley with series resistance at 25 °C: V = n·VT·ln(1 + I/Is) + I·Rs.

    The same equation as ``partpick.physics.junction.forward_voltage`` (Sze &
    Ng, *Physics of Semiconductor Devices*, 3rd ed., §2.3), written with
    ``math`` so that this module needs no numpy.
    """
    vt = _K_B * _T0_K / _Q_E
    return n * vt * math.log1p(current_A / is_A) + current_A * rs_ohm


def contradiction_problems(given: dict, who: str) -> list[tuple[str, str]]:
    """Values that contradict each other or physics (SPEC §5's list), for the fields in ``given``.

    ``given`` holds the fields that passed their own checks (numbers finite and in range).
    """
    problems: list[tuple[str, str]] = []

    def has(name):
        value = given.get(name)
        return isinstance(value, (int, float)) and not isinstance(value, bool)

    def refuse(name, text):
        problems.append((name, f"{who}: {text}"))

    if has("zzk_ohm") and has("zzt_ohm") and given["zzk_ohm"] < given["zzt_ohm"]:
        refuse("zzk_ohm", f"zzk_ohm = {given['zzk_ohm']:g} Ω is below zzt_ohm = {given['zzt_ohm']:g} Ω "
                          "(the knee impedance is always the larger: allowed zzk_ohm ≥ zzt_ohm)")
    if has("is_A") and not IS_MIN_A <= given["is_A"] <= IS_MAX_A:
        refuse("is_A", f"is_A = {given['is_A']:g} A is outside {IS_MIN_A:g} … {IS_MAX_A:g} A "
                       "(no diode's saturation current; check the unit)")
    entered = given.get("model_source") in (None, "entered")
    if entered and has("n") and has("is_A") and not N_MIN_ENTERED <= given["n"] <= N_MAX_ENTERED:
        refuse("n", f"n = {given['n']:g} is outside {N_MIN_ENTERED:g} … {N_MAX_ENTERED:g} for an entered model "
                    "(an ideality factor below 1 or above 4 is not a junction's)")
    model = all(has(name) for name in ("is_A", "n", "rs_ohm"))
    if model and has("vf_max_V") and has("vf_max_at_A") and IS_MIN_A <= given["is_A"]:
        typical = typical_forward_voltage(given["vf_max_at_A"], given["is_A"], given["n"], given["rs_ohm"])
        # A part per million of slack: a guaranteed maximum equal to the typical value is not a contradiction.
        if given["vf_max_V"] < typical * (1 - 1e-6):
            refuse("vf_max_V", f"vf_max_V = {given['vf_max_V']:g} V at {given['vf_max_at_A']:g} A is below the "
                               f"typical forward model's {typical:.4g} V there (a maximum below the typical value)")
    # Hot leakage point above the first one (SPEC §3, leakage in T).
    if has("ir_hot_t_C") and has("ir_t_C") and given["ir_hot_t_C"] <= given["ir_t_C"]:
        refuse("ir_hot_t_C", f"ir_hot_t_C = {given['ir_hot_t_C']:g} °C is not above ir_t_C = {given['ir_t_C']:g} °C")
    if has("ir_hot_A") and has("ir_A") and given["ir_hot_A"] <= given["ir_A"]:
        refuse("ir_hot_A", f"ir_hot_A = {given['ir_hot_A']:g} A is not above ir_A = {given['ir_A']:g} A "
                           "(leakage rises with temperature)")
    if has("vrsm_V") and has("vrrm_V") and given["vrsm_V"] < given["vrrm_V"]:
        refuse("vrsm_V", f"vrsm_V = {given['vrsm_V']:g} V is below vrrm_V = {given['vrrm_V']:g} V "
                         "(the non-repetitive rating is never the lower)")
    if has("vbr_min_V") and has("vbr_max_V") and given["vbr_min_V"] > given["vbr_max_V"]:
        refuse("vbr_min_V", f"vbr_min_V = {given['vbr_min_V']:g} V is above vbr_max_V = {given['vbr_max_V']:g} V")
    if has("vwm_V") and has("vbr_min_V") and given["vwm_V"] >= given["vbr_min_V"]:
        refuse("vwm_V", f"vwm_V = {given['vwm_V']:g} V is not below vbr_min_V = {given['vbr_min_V']:g} V "
                        "(the stand-off voltage lies below breakdown)")
    if has("rth_ja_large_area_mm2") and has("rth_ja_area_mm2") \
            and given["rth_ja_large_area_mm2"] <= given["rth_ja_area_mm2"]:
        refuse("rth_ja_large_area_mm2",
               f"rth_ja_large_area_mm2 = {given['rth_ja_large_area_mm2']:g} mm² is not above "
               f"rth_ja_area_mm2 = {given['rth_ja_area_mm2']:g} mm²")
    elif has("rth_ja_large_K_per_W") and has("rth_ja_K_per_W") \
            and given["rth_ja_large_K_per_W"] > given["rth_ja_K_per_W"]:
        refuse("rth_ja_large_K_per_W",
               f"rth_ja_large_K_per_W = {given['rth_ja_large_K_per_W']:g} K/W on the larger copper area is above "
               f"rth_ja_K_per_W = {given['rth_ja_K_per_W']:g} K/W (more copper never raises RthJA)")
    for inner in ("rth_jc_K_per_W", "rth_jl_K_per_W"):
        if has(inner) and has("rth_ja_K_per_W") and given[inner] >= given["rth_ja_K_per_W"]:
            refuse(inner, f"{inner} = {given[inner]:g} K/W is not below rth_ja_K_per_W = "
                          f"{given['rth_ja_K_per_W']:g} K/W (a part of the path is less than the whole)")
    return problems

"""Plausibility checks of the invented example library (parts.csv).

Not a test of partpick: a reviewer's aid for the demo data. It reads parts.csv
and prints
  1. counts per kind, maker and lifecycle, and that every text cell is safe;
  2. its own bounded least-squares fit of every `vf_points` curve (ln Is, n, Rs;
     1 <= n <= 4, Rs >= 0), the worst residual and the distance of n from its
     bounds, plus the same through partpick.physics.fit when that imports;
  3. forward voltages at the trade's reference points (common practice):
     1 A silicon rectifier about 0.9-1.1 V at 1 A, 3 A Schottky about
     0.45-0.55 V at 3 A, switching diode about 0.6-0.75 V at 10 mA;
  4. the Zener patterns: sign of the temperature coefficient, Zzt lowest
     around 6-8 V, Zzk > Zzt, Izk < Izt, Izt*Vz well below Pd;
  5. a rough, independent pre-check of the example requirements (this
     script's own simplified reading of SPEC section 4, scalar and slow; the real
     numbers come from `partpick check`), to see that each example has parts
     that pass and parts that fail.

Run:  .venv/bin/python resources/example_library/check_parts.py
Exits 1 when a hard check (2 or 4, or a bad cell) fails.
"""

from __future__ import annotations

import csv
import math
import sys
import tomllib
from collections import Counter
from pathlib import Path

import numpy as np
from scipy import constants
from scipy.optimize import brentq, least_squares

HERE = Path(__file__).resolve().parent
CSV_PATH = HERE / "parts.csv"
REQ_DIR = HERE.parent / "requirements"
T0 = 298.15
K_Q = constants.k / constants.e
TEXT = {"part_number", "kind", "manufacturer", "package", "datasheet", "model_source",
        "lifecycle", "notes", "ppp_waveform", "ppp2_waveform", "bidirectional", "junction",
        "pd_ref_point", "if_ref_point"}
failures: list[str] = []


def vt(t_k):
    return K_Q * t_k


def load_parts():
    with CSV_PATH.open(newline="", encoding="utf-8") as f:
        rows = list(csv.DictReader(f))
    parts = []
    for row in rows:
        p = {}
        for key, cell in row.items():
            if key in TEXT:
                if cell[:1] in ("=", "+", "-", "@", "'", "\t", "\r"):
                    failures.append(f"{row['part_number']}: {key} starts with {cell[0]!r}")
                p[key] = cell or None
            elif key == "vf_points":
                p[key] = [tuple(float(x) for x in pair.split(":")) for pair in cell.split(";")] if cell else []
            else:
                p[key] = float(cell) if cell else None
        parts.append(p)
    return parts


# --- 2. fit -------------------------------------------------------------------
def own_fit(points):
    current = np.array([i for i, _ in points])
    volts = np.array([v for _, v in points])

    def resid(x):
        return x[1] * vt(T0) * np.log1p(current / np.exp(x[0])) + current * x[2] - volts

    best = None
    for n0 in (1.1, 1.5, 2.0, 3.0):
        ls0 = math.log(current[0]) - volts[0] / (n0 * vt(T0))
        for rs0 in (0.0, 0.01, 0.3):
            sol = least_squares(resid, [ls0, n0, rs0], bounds=([-70, 1, 0], [0, 4, 1e3]),
                                x_scale="jac", xtol=1e-14, ftol=1e-14, gtol=1e-14)
            if best is None or sol.cost < best.cost:
                best = sol
    return math.exp(best.x[0]), best.x[1], best.x[2], float(np.max(np.abs(resid(best.x))))


def check_fits(parts):
    try:
        from partpick.physics.fit import fit_forward_model, FitRefused
    except Exception as exc:  # noqa: BLE001 - optional cross-check
        fit_forward_model = None
        print(f"  (partpick.physics.fit not importable: {exc})")
    worst = 0.0
    closest_n = 9.0
    print("  part          own fit: Is          n      Rs      max|res| mV   partpick fit")
    for p in parts:
        if not p["vf_points"]:
            continue
        is_a, n, rs, res = own_fit(p["vf_points"])
        worst = max(worst, res)
        closest_n = min(closest_n, n - 1, 4 - n)
        if res > 5e-3 or n - 1 < 0.02 or 4 - n < 0.02:
            failures.append(f"{p['part_number']}: fit residual {res*1e3:.2f} mV, n = {n:.3f}")
        other = ""
        if fit_forward_model is not None:
            i, v = zip(*p["vf_points"])
            try:
                fit = fit_forward_model(i, v)
                other = f"n={fit.ideality:.3f} res={fit.residual_max_V*1e3:.2f} mV"
            except FitRefused as exc:
                other = f"REFUSED: {exc}"
                failures.append(f"{p['part_number']}: partpick fit refused: {exc}")
        p["_model"] = (is_a, n, rs)
        print(f"  {p['part_number']:12s}  {is_a:10.3e}  {n:6.3f}  {rs:6.3f}   {res*1e3:5.2f}        {other}")
    print(f"  worst residual {worst*1e3:.2f} mV; n never closer than {closest_n:.3f} to a bound")


def model_of(p):
    if p.get("_model"):
        return p["_model"]
    if p.get("is_A") is not None:
        return p["is_A"], p["n"], p["rs_ohm"]
    return None


def vf(p, current, t_c=25.0, use_max=True):
    """Forward voltage with Is scaled to meet VF max at 25 degC (SPEC 3), Is(T) of SPEC 3."""
    is_a, n, rs = model_of(p)
    if use_max and p.get("vf_max_V") is not None:
        i_m = p["vf_max_at_A"]
        typ = n * vt(T0) * math.log1p(i_m / is_a) + i_m * rs
        if p["vf_max_V"] > typ:
            is_a = i_m / math.expm1((p["vf_max_V"] - i_m * rs) / (n * vt(T0)))
    schottky = p["kind"] == "schottky"
    eg = p.get("eg_eV") or (0.69 if schottky else 1.11)
    m = p.get("is_temp_exponent") or (2.0 if schottky else 3.0)
    t = t_c + 273.15
    is_t = is_a * (t / T0) ** (m / n) * math.exp(eg / (n * K_Q) * (1 / T0 - 1 / t))
    return n * vt(t) * math.log1p(current / is_t) + current * rs


def rth_of(p):
    if p.get("rth_ja_K_per_W") is not None:
        return p["rth_ja_K_per_W"]
    return (p["tj_max_C"] - (p.get("pd_ref_C") or 25.0)) / p["pd_W"]


# --- 3. reference points -------------------------------------------------------
def reference_points(parts):
    groups = [
        ("1 A silicon rectifier at 1 A (0.9-1.1 V)", lambda p: p["kind"] == "rectifier" and p["if_avg_A"] == 1.0, 1.0, 0.9, 1.1),
        ("3 A Schottky at 3 A (0.45-0.55 V)", lambda p: p["kind"] == "schottky" and p["if_avg_A"] == 3.0, 3.0, 0.45, 0.55),
        ("switching diode at 10 mA (0.6-0.75 V)", lambda p: p["kind"] == "signal", 0.01, 0.6, 0.75),
        ("1 A Schottky at 1 A", lambda p: p["kind"] == "schottky" and p["if_avg_A"] == 1.0, 1.0, None, None),
        ("1 A fast recovery at 1 A", lambda p: p["kind"] == "fast_recovery" and p["if_avg_A"] == 1.0, 1.0, None, None),
    ]
    for title, select, current, low, high in groups:
        chosen = [p for p in parts if select(p)]
        values = [(p["part_number"], vf(p, current, use_max=False)) for p in chosen]
        lo = min(values, key=lambda x: x[1])
        hi = max(values, key=lambda x: x[1])
        flag = ""
        if low is not None:
            outside = [pn for pn, v in values if not low <= v <= high]
            flag = "all inside" if not outside else f"outside: {', '.join(outside)}"
        print(f"  {title}: {len(values)} parts, typical {lo[1]:.3f} V ({lo[0]}) to "
              f"{hi[1]:.3f} V ({hi[0]}); {flag}")


# --- 4. Zener patterns --------------------------------------------------------
def zener_patterns(parts):
    zeners = [p for p in parts if p["kind"] == "zener"]
    for p in zeners:
        v, tc = p["vz_V"], p["vz_tc_pct_per_K"]
        pn = p["part_number"]
        if v <= 4.3 and not -0.09 <= tc <= -0.04:
            failures.append(f"{pn}: TC {tc} at {v} V")
        if 5.0 <= v <= 5.6 and abs(tc) > 0.025:
            failures.append(f"{pn}: TC {tc} at {v} V is not near zero")
        if v >= 6.2 and not 0.03 <= tc <= 0.1:
            failures.append(f"{pn}: TC {tc} at {v} V")
        if not p["zzk_ohm"] > p["zzt_ohm"] or not p["izk_A"] < p["izt_A"]:
            failures.append(f"{pn}: knee data out of order")
        if p["izt_A"] * v > 0.25 * p["pd_W"]:
            failures.append(f"{pn}: Izt*Vz = {p['izt_A']*v:.3f} W is a large share of Pd")
    for prefix in ("OSZ-", "QFZ-"):
        fam = sorted((p for p in zeners if p["part_number"].startswith(prefix)
                      and not p["part_number"].startswith("QFZ-S") and p["vz_tol_pct"] == 5),
                     key=lambda p: p["vz_V"])
        zmin = min(fam, key=lambda p: p["zzt_ohm"])
        print(f"  {prefix}* 5 %: {len(fam)} voltages {fam[0]['vz_V']:g}-{fam[-1]['vz_V']:g} V; "
              f"Zzt {fam[0]['zzt_ohm']:g} ohm at {fam[0]['vz_V']:g} V, lowest {zmin['zzt_ohm']:g} ohm "
              f"at {zmin['vz_V']:g} V, {fam[-1]['zzt_ohm']:g} ohm at {fam[-1]['vz_V']:g} V; "
              f"TC {fam[0]['vz_tc_pct_per_K']:+.3f} .. {fam[-1]['vz_tc_pct_per_K']:+.3f} %/K")
        if not 6.0 <= zmin["vz_V"] <= 8.2:
            failures.append(f"{prefix}: lowest Zzt at {zmin['vz_V']} V")


# --- 5. rough requirement pre-check --------------------------------------------
COMMERCIAL = dict(reverse={"pn": 0.80, "schottky": 0.75}, current=0.80, tj_cap=125.0,
                  tj_margin=25.0, zener_power=0.60)


def tj_limit(p):
    return min(COMMERCIAL["tj_cap"], p["tj_max_C"] - COMMERCIAL["tj_margin"])


def pallow(p, ta):
    pd = p["pd_W"] if p.get("pd_W") is not None else (p["tj_max_C"] - 25.0) / rth_of(p)
    ref = p.get("pd_ref_C") or 25.0
    return pd if ta <= ref else pd * max(p["tj_max_C"] - ta, 0.0) / (p["tj_max_C"] - ref)


def series_precheck(req, p):
    fails = []
    rth = req.get("rth_ja_K_per_W") or rth_of(p)
    thermal = req.get("thermal") or {}
    if thermal.get("mount") == "heatsink":  # RthJC + RthCS + RthSA
        if p.get("rth_jc_K_per_W") is None:
            return ["data_missing"]
        rth = p["rth_jc_K_per_W"] + thermal.get("rth_cs_K_per_W", 1.0) + thermal["rth_sa_K_per_W"]
    group = "schottky" if p["kind"] == "schottky" else "pn"
    drops, outs, tjs = [], [], []
    for vs in (req["supply_min_V"], req["supply_max_V"]):
        for i in (req["load_min_A"], req["load_max_A"]):
            for ta in (req["ambient_min_C"], req["ambient_max_C"]):
                cold = vf(p, i, ta)
                try:
                    tj = brentq(lambda t: t - ta - vf(p, i, t) * i * rth, ta - 1, ta + 2000)
                except ValueError:  # no self-heated solution: forward runaway
                    return fails + ["forward runaway"]
                hot = vf(p, i, tj)
                drops += [cold, hot]
                outs += [vs - cold, vs - hot]
                tjs.append(tj)
                if vf(p, i, tj) * i > pallow(p, ta):
                    fails.append("power")
    if req.get("max_forward_drop_V") and max(drops) > req["max_forward_drop_V"]:
        fails.append("forward_drop")
    if req.get("min_output_V") and min(outs) < req["min_output_V"]:
        fails.append("output_min")
    vr = max(req.get("reverse_V") or req["supply_max_V"], req.get("reverse_transient_V") or 0)
    if vr > COMMERCIAL["reverse"][group] * p["vrrm_V"]:
        fails.append("reverse_voltage")
    ta = req["ambient_max_C"]
    ref = p.get("if_ref_C") or 25.0
    if_der = p["if_avg_A"] * (1 if ta <= ref else max(p["tj_max_C"] - ta, 0) / (p["tj_max_C"] - ref))
    if req["load_max_A"] > COMMERCIAL["current"] * if_der:
        fails.append("forward_current")
    if max(tjs) > tj_limit(p):
        fails.append("junction_temp")
    # reverse state: IR doubling every ir_double_K, proportional above ir_vr_V
    dk = p.get("ir_double_K") or 10.0
    ir_at = p["ir_A"] * max(1.0, vr / p["ir_vr_V"])

    def pr(t):
        return vr * ir_at * 2 ** ((t - p["ir_t_C"]) / dk)

    g = lambda t: ta + pr(t) * rth - t  # noqa: E731
    # g(Ta) > 0 and g is convex; a stable solution exists only if g dips to <= 0
    # before its minimum, where g' = 0.
    t_min = ta + dk / math.log(2) * math.log(dk / (math.log(2) * rth * pr(ta)))
    if t_min <= ta or g(t_min) > 0:
        fails.append("reverse_runaway")
    elif brentq(g, ta, t_min) > tj_limit(p):
        fails.append("junction_temp(reverse)")
    return sorted(set(fails))


E24 = [1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7,
       5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1]


def zener_v(p, iz, tj, end):
    """SPEC 3 Zener branch: ln Z linear in ln Iz between Izk and Izt; Zzt above."""
    vz = p["vz_V"] * (1 + end * p["vz_tol_pct"] / 100)
    base = vz * (1 + p["vz_tc_pct_per_K"] / 100 * (tj - 25.0))
    izt, zzt, izk, zzk = p["izt_A"], p["zzt_ohm"], p["izk_A"], p["zzk_ohm"]
    if iz >= izt:
        return base + zzt * (iz - izt)
    q = math.log(zzt / zzk) / math.log(izt / izk)  # Z = zzk*(I/izk)^q
    integral = zzk * izk ** -q * (izt ** (q + 1) - iz ** (q + 1)) / (q + 1)
    return base - integral


def shunt_point(p, vs, r, il, ta, end, rth):
    def resid(iz):
        tj = ta
        for _ in range(30):
            tj = ta + zener_v(p, iz, tj, end) * iz * rth
        return (vs - zener_v(p, iz, tj, end)) / r - il - iz
    if resid(p["izk_A"] * 1e-3) < 0:
        return None
    iz = brentq(resid, p["izk_A"] * 1e-3, 1.0)
    tj = ta
    for _ in range(30):
        tj = ta + zener_v(p, iz, tj, end) * iz * rth
    return zener_v(p, iz, tj, end), iz, tj


def zener_precheck(req, p):
    z = req["zener"]
    rth = req.get("rth_ja_K_per_W") or rth_of(p)
    izmin = z.get("min_zener_current_A") or p["izk_A"]
    tol = (z.get("resistor_tolerance_pct") or 5.0) / 100
    if z.get("resistor_ohm"):
        r = z["resistor_ohm"]
    else:
        ta = req["ambient_max_C"] if p["vz_tc_pct_per_K"] > 0 else req["ambient_min_C"]
        tj = ta
        for _ in range(30):
            vout = zener_v(p, izmin, tj, +1)
            tj = ta + vout * izmin * rth
        r_high = (req["supply_min_V"] - vout) / (req["load_max_A"] + izmin)
        if r_high <= 0:
            return None, ["feasible"], {}
        limit = r_high / (1 + tol)
        r = max(d * 10 ** e for e in range(0, 7) for d in E24 if d * 10 ** e <= limit)
    fails, outs, izs, worst_ratio, pr = [], [], [], 0.0, 0.0
    for vs in (req["supply_min_V"], req["supply_max_V"]):
        for il in (req["load_min_A"], req["load_max_A"]):
            for ta in (req["ambient_min_C"], req["ambient_max_C"]):
                for end in (-1, 1):
                    for rr in (r * (1 - tol), r * (1 + tol)):
                        pt = shunt_point(p, vs, rr, il, ta, end, rth)
                        if pt is None:
                            izs.append(0.0)
                            continue
                        vout, iz, tj = pt
                        outs.append(vout)
                        izs.append(iz)
                        worst_ratio = max(worst_ratio, vout * iz / (pallow(p, ta) * COMMERCIAL["zener_power"]))
                        if tj > tj_limit(p):
                            fails.append("junction_temp")
                        pr = max(pr, (vs - vout) ** 2 / rr)
    err = 100 * max(abs(v - z["target_V"]) for v in outs) / z["target_V"] if outs else float("inf")
    if min(izs) < izmin * (1 - 1e-9):
        fails.append("zener_current_min")
    if worst_ratio > 1:
        fails.append("zener_power")
    if err > z["max_regulation_error_pct"]:
        fails.append("regulation_error")
    return r, sorted(set(fails)), dict(err=err, iz_max=max(izs), p_ratio=worst_ratio, pr=pr)


def requirement_prechecks(parts):
    for path in sorted(REQ_DIR.glob("*.toml")):
        req = tomllib.loads(path.read_text(encoding="utf-8"))
        allowed = set(req.get("lifecycle") or ["active", "nrnd", "obsolete"])
        kinds = set(req.get("kinds") or [])
        if req["role"] not in ("series", "zener_shunt"):
            print(f"  {path.name}: role {req['role']} is not pre-checked here (see `partpick check`)")
            continue
        if req["role"] == "series":
            cands = [p for p in parts if p["kind"] in ("rectifier", "signal", "schottky", "fast_recovery")]
        else:
            cands = [p for p in parts if p["kind"] == "zener"]
        cands = [p for p in cands if p["lifecycle"] in allowed and (not kinds or p["kind"] in kinds)]
        if req.get("packages"):
            cands = [p for p in cands if p["package"] in req["packages"]]
        passing, failing = [], Counter()
        notes = []
        for p in cands:
            if req["role"] == "series":
                fails = series_precheck(req, p)
            else:
                r, fails, info = zener_precheck(req, p)
                if req["zener"].get("target_V") and abs(p["vz_V"] - req["zener"]["target_V"]) < 0.01 \
                        or req["zener"].get("resistor_ohm") and abs(p["vz_V"] - req["zener"]["target_V"]) < 0.01:
                    notes.append(f"{p['part_number']}: R {r:g} ohm, error {info.get('err', float('nan')):.2f} %, "
                                 f"Iz max {info.get('iz_max', 0)*1e3:.1f} mA, power {100*info.get('p_ratio', 0):.0f} % "
                                 f"of limit, resistor {info.get('pr', 0):.3f} W -> {fails or 'pass'}")
            if fails:
                failing.update(fails)
            else:
                passing.append(p["part_number"])
        print(f"  {path.name}: {len(cands)} candidates, {len(passing)} pass: {', '.join(passing) or '-'}")
        print(f"    failed checks among the rest: {dict(failing.most_common())}")
        for note in notes:
            print(f"    {note}")


def main() -> int:
    parts = load_parts()
    print(f"1. {len(parts)} parts")
    print("   per kind:", dict(Counter(p["kind"] for p in parts)))
    print("   per maker:", dict(Counter(p["manufacturer"] for p in parts)))
    print("   lifecycle:", dict(Counter(p["lifecycle"] for p in parts)))
    print("   forward model: points", sum(1 for p in parts if p["vf_points"]),
          "entered", sum(1 for p in parts if p.get("model_source") == "entered"))
    try:
        from partpick.library.fields import validate_part
        problems = []
        for p in parts:
            problems += validate_part({k: v for k, v in p.items()})
        print(f"   partpick.library.fields.validate_part: {len(problems)} problems")
        failures.extend(problems)
    except Exception as exc:  # noqa: BLE001 - optional cross-check
        print(f"   (partpick.library.fields not importable: {exc})")
    print("2. fits of vf_points")
    check_fits(parts)
    print("3. forward voltage at reference points (typical curve, 25 degC)")
    reference_points(parts)
    print("4. Zener patterns")
    zener_patterns(parts)
    print("5. rough pre-check of the example requirements (this script's own reading)")
    requirement_prechecks(parts)
    if failures:
        print("FAILURES:")
        for f in failures:
            print("  ", f)
        return 1
    print("all hard checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())

"""`partpick fit`: Is, n and Rs from datasheet (IF, VF) points."""

from __future__ import annotations

import json
import sys

from partpick.errors import InputError
from partpick.units import format_quantity, parse_quantity

_KIND_DEFAULTS = {
    # kind: (band gap [eV], saturation-current temperature exponent [-]) — SPEC §3 defaults
    "rectifier": (1.11, 3.0),
    "signal": (1.11, 3.0),
    "fast_recovery": (1.11, 3.0),
    "zener": (1.11, 3.0),
    "schottky": (0.69, 2.0),
}


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "fit",
        help="fit the forward model (Is, n, Rs) to datasheet points",
        description="Fit the Shockley model with series resistance to datasheet (IF, VF) points. "
        "Two points fit Is and n with Rs = 0; three or more fit Is, n and Rs.",
    )
    p.add_argument("--point", action="append", default=[], metavar="IF,VF",
                   help="a datasheet point: current [A], voltage [V]; engineering notation allowed (10m,0.71)")
    p.add_argument("--temperature-C", dest="temperature_c", default="25", metavar="T",
                   help="junction temperature of the points [°C] (default 25); the result is reported at 25 °C")
    p.add_argument("--kind", choices=sorted(_KIND_DEFAULTS), default="rectifier",
                   help="part kind, which sets the band gap and temperature exponent used to move Is to 25 °C")
    p.add_argument("--format", choices=("table", "json"), default="table")
    p.set_defaults(func=run)


def parse_point(text: str, index: int) -> tuple[float, float]:
    """Parse one ``IF,VF`` argument; errors name the point."""
    parts = [s.strip() for s in text.split(",")]
    if len(parts) != 2:
        raise InputError(f"--point {index}: {text!r} must be IF,VF (e.g. 10m,0.71)")
    current = parse_quantity(parts[0], "A", name=f"--point {index} IF")
    voltage = parse_quantity(parts[1], "V", name=f"--point {index} VF")
    return current, voltage


def run(args) -> int:
    from partpick.physics.constants import celsius_to_kelvin
    from partpick.physics.fit import FitRefused, fit_forward_model

    points = [parse_point(text, i + 1) for i, text in enumerate(args.point)]
    temperature_c = parse_quantity(args.temperature_c, "°C", name="--temperature-C")
    if not -75.0 <= temperature_c <= 200.0:
        raise InputError(f"--temperature-C: {temperature_c:g} is outside −75…200 °C")
    band_gap, exponent = _KIND_DEFAULTS[args.kind]
    try:
        fit = fit_forward_model([p[0] for p in points], [p[1] for p in points],
                                temperature=celsius_to_kelvin(temperature_c),
                                band_gap=band_gap, temperature_exponent=exponent)
    except FitRefused as exc:
        if exc.best is not None:  # where the solver got to, and what to change, before the one-line error
            if args.format == "json":
                doc = _fit_document(exc.best, points, temperature_c)
                doc.update(refused=str(exc), advice=exc.advice)
                print(json.dumps(doc, indent=2))
            else:
                print("Fit refused. The best the model could do (reported at 25 °C):")
                _print_fit(exc.best, points)
                print(f"  what to change: {exc.advice}")
            sys.stdout.flush()
        raise InputError(f"fit refused: {exc}") from exc
    if args.format == "json":
        print(json.dumps(_fit_document(fit, points, temperature_c), indent=2))
        return 0
    print("Forward model fitted to datasheet points (reported at 25 °C)")
    _print_fit(fit, points)
    return 0


def _fit_document(fit, points, temperature_c) -> dict:
    """The JSON of a fit (or of the best a refused fit found)."""
    return {
            "is_A": fit.saturation_current,
            "n": fit.ideality,
            "rs_ohm": fit.series_resistance,
            "rs_fitted": fit.fitted_series_resistance,
            "residual_max_mV": fit.residual_max_V * 1e3,
            "temperature_C": temperature_c,
            "reported_at_C": 25.0,
            "note": fit.note,
            "points": [
                {"if_A": i, "vf_V": v, "residual_mV": float(r) * 1e3}
                for (i, v), r in zip(points, fit.residuals_V)
            ],
        }


def _print_fit(fit, points) -> None:
    print(f"  Is  = {fit.saturation_current:.4e} A")
    print(f"  n   = {fit.ideality:.4f}")
    rs_note = "" if fit.fitted_series_resistance else "  (assumed: two points)"
    print(f"  Rs  = {fit.series_resistance:.4g} Ω{rs_note}")
    print(f"  worst residual {fit.residual_max_V * 1e3:.3f} mV — {fit.note}")
    print(f"  {'IF':>10}  {'VF':>9}  {'residual':>9}")
    for (i, v), r in zip(points, fit.residuals_V):
        print(f"  {format_quantity(i, 'A'):>10}  {v:>7.4f} V  {float(r) * 1e3:>+6.3f} mV")

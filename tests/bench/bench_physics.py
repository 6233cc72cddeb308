"""Benchmarks of the physics core (SPEC §9).

- forward drop with self-heating, 10,000 parts × 8 corners, against a per-part brentq loop;
- model fits from datasheet points, parts per second (import fits every part without a model).

Run: .venv/bin/python tests/bench/bench_physics.py
Not collected by pytest (the name does not start with test_). Prints the vectorised
time (best of several runs) and a per-part scipy brentq loop over the same inputs.
"""

from __future__ import annotations

import time

import numpy as np
from scipy.optimize import brentq

from partpick.physics.constants import celsius_to_kelvin
from partpick.physics.junction import ForwardModel
from partpick.physics.thermal import self_heated_forward

PARTS, CORNERS = 10_000, 8


def make_inputs(seed=1):
    rng = np.random.default_rng(seed)
    schottky = rng.random(PARTS) < 0.3
    model = ForwardModel(
        saturation_current=np.where(schottky, 10 ** rng.uniform(-7, -5, PARTS), 10 ** rng.uniform(-12, -9, PARTS))[:, None],
        ideality=np.where(schottky, rng.uniform(1.0, 1.3, PARTS), rng.uniform(1.5, 2.0, PARTS))[:, None],
        series_resistance=rng.uniform(0.005, 0.3, PARTS)[:, None],
        band_gap=np.where(schottky, 0.69, 1.11)[:, None],
        temperature_exponent=np.where(schottky, 2.0, 3.0)[:, None],
        rs_temperature_exponent=np.where(rng.random(PARTS) < 0.3, rng.uniform(0.3, 1.0, PARTS), 0.0)[:, None],
    )
    rth = rng.uniform(20, 120, PARTS)[:, None]
    # eight distinct (load, ambient) corners, so no two cells repeat work
    load = np.array([0.05, 0.1, 0.5, 1.0, 1.5, 2.0, 3.0, 0.01])[None, :]
    ambient = celsius_to_kelvin(np.array([-40.0, 85.0, 25.0, 70.0, -20.0, 105.0, 0.0, 60.0]))[None, :]
    return model, load, ambient, rth


def vectorised(model, load, ambient, rth):
    return self_heated_forward(model, load, ambient, rth)


def brentq_loop(model, load, ambient, rth, parts):
    out = np.empty((parts, CORNERS))
    for p in range(parts):
        single = ForwardModel(*(float(np.asarray(getattr(model, f))[p, 0]) for f in (
            "saturation_current", "ideality", "series_resistance", "band_gap", "temperature_exponent",
            "rs_temperature_exponent")))
        for c in range(CORNERS):
            i, ta, r = load[0, c], ambient[0, c], rth[p, 0]
            out[p, c] = brentq(lambda t: t - ta - r * i * single.voltage(i, t), ta, ta + 3000.0, xtol=1e-9)
    return out


def bench_fit(parts: int = 500) -> float:
    """Fits per second on datasheet-like points (5 points, read to 1 mV)."""
    from partpick.physics.fit import fit_forward_model
    from partpick.physics.junction import forward_voltage

    rng = np.random.default_rng(3)
    currents = np.array([0.01, 0.1, 0.5, 1.0, 3.0])
    cases = [np.round(forward_voltage(currents, 10 ** rng.uniform(-12, -6), rng.uniform(1.05, 2.0),
                                      rng.uniform(0.005, 0.5)), 3) for _ in range(parts)]
    t0 = time.perf_counter()
    for voltages in cases:
        fit_forward_model(currents, voltages)
    return parts / (time.perf_counter() - t0)


def main() -> None:
    model, load, ambient, rth = make_inputs()
    vectorised(model, load, ambient, rth)  # warm-up
    times = []
    for _ in range(7):
        t0 = time.perf_counter()
        op = vectorised(model, load, ambient, rth)
        times.append(time.perf_counter() - t0)
    best = min(times)
    sample = 300
    t0 = time.perf_counter()
    ref = brentq_loop(model, load, ambient, rth, sample)
    loop_per_part = (time.perf_counter() - t0) / sample
    loop_total = loop_per_part * PARTS
    flagged = op.runaway[:sample]
    err = np.max(np.abs(ref - op.junction_temperature[:sample])[~flagged])
    # cells flagged as runaway must have no root below the 1500 K cut-off
    assert np.all(ref[flagged] > 1500.0), "a flagged cell has a physical root"
    assert err < 1e-6, err
    print(f"forward drop with self-heating, {PARTS} parts × {CORNERS} corners")
    print(f"  vectorised Newton : {best * 1e3:7.2f} ms (best of 7; median {np.median(times) * 1e3:.2f} ms); "
          f"runaway flagged in {int(op.runaway.sum())} cells")
    print(f"  brentq per part   : {loop_total * 1e3:7.0f} ms (extrapolated from {sample} parts)")
    print(f"  speed-up          : {loop_total / best:7.0f}×; max |ΔTj| vs brentq {err:.2e} K; "
          f"{int(flagged.sum())} sampled cells flagged have their only root above 1500 K")
    print(f"model fit from 5 datasheet points: {bench_fit():.0f} parts/s")


if __name__ == "__main__":
    main()

"""Benchmark of the coil-clamp and surge-clamp roles (SPEC §9): not collected by pytest; run it as a script.

    .venv/bin/python tests/bench/bench_clamps.py [--parts 10000]

Measures checker time (`partpick.checks.service.evaluate`: evaluate and rank every candidate) for
`inductive_clamp` (occasional, repetitive with a series Zener) and `tvs_clamp`, on a generated
library of invented parts (the series role's budget: < 100 ms of checker time on 10,000 parts,
< 300 ms for an edit → shortlist at 10,000), and `run_check` on the bundled example library with
the example requirements of both roles (< 100 ms).
"""

from __future__ import annotations

import argparse
import statistics
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from partpick.checks.partdata import PartArrays  # noqa: E402
from partpick.checks.requirement import requirement_from_dict  # noqa: E402
from partpick.checks.service import evaluate, run_check  # noqa: E402
from partpick.library.fields import empty_part  # noqa: E402

COMMON = dict(policy="commercial", supply_min_V=21.6, supply_max_V=26.4, ambient_min_C=-20.0, ambient_max_C=70.0)
COIL = dict(inductance_H=0.3, resistance_ohm=72.0, switch_max_V=60.0, dropout_A=0.1)
REQUIREMENTS = {
    "coil, occasional": dict(name="b1", role="inductive_clamp", **COMMON, coil=dict(COIL)),
    "coil, 200 Hz + Zener": dict(name="b2", role="inductive_clamp", **COMMON,
                                 coil=dict(COIL, switching_hz=200.0, duty_pct=50.0, clamp="diode_zener",
                                           zener_V=15.0, zener_pd_W=1.3, max_release_s=0.004)),
    "surge clamp": dict(name="b3", role="tvs_clamp", policy="commercial", ambient_min_C=-40.0, ambient_max_C=85.0,
                        max_leakage_A=1e-4, surge=dict(line_max_V=28.8, protected_max_V=60.0, surge_V=1000.0,
                                                       surge_source_ohm=42.0)),
}


def generate_parts(count: int, seed: int = 2) -> list[dict]:
    """Invented parts: 75 % diodes of four kinds, 25 % TVS, every field in its plausible range."""
    rng = np.random.default_rng(seed)
    kind = rng.choice(np.array(["rectifier", "signal", "schottky", "fast_recovery", "tvs"]), size=count,
                      p=[0.25, 0.1, 0.2, 0.2, 0.25])
    parts = []
    for i in range(count):
        k = str(kind[i])
        part = {"part_number": f"CX{i:05d}", "kind": k, "package": str(rng.choice(["SMA", "SMB", "SMC"])),
                "price": float(np.round(rng.uniform(0.02, 1.5), 3)), "lifecycle": "active",
                "tj_max_C": float(rng.choice([150.0, 175.0])), "vf_points": []}
        if k == "tvs":
            vwm = float(rng.uniform(20, 40))
            vbr_min = vwm * 1.11
            ppp = float(rng.choice([400.0, 600.0, 1500.0]))
            ipp = ppp / (vbr_min * 1.45)
            part.update(vwm_V=vwm, vbr_min_V=vbr_min, vbr_max_V=vbr_min * 1.1, it_A=1e-3, vc_V=vbr_min * 1.45,
                        ipp_A=ipp, ppp_W=ppp, ppp_waveform="10/1000", bidirectional=str(rng.random() < 0.3).lower(),
                        vbr_tc_pct_per_K=0.1, ir_A=1e-6, ir_vr_V=vwm, ir_t_C=25.0)
            if rng.random() < 0.5:
                part.update(ppp2_W=ppp * 6, ppp2_waveform="8/20")
        else:
            schottky = k == "schottky"
            part.update(vrrm_V=float(rng.choice([40, 60, 100, 200, 400, 1000])),
                        if_avg_A=float(rng.choice([0.5, 1.0, 2.0, 3.0])), ifsm_A=float(rng.uniform(5, 80)),
                        ifrm_A=float(rng.uniform(2, 20)) if rng.random() < 0.6 else None,
                        trr_s=None if schottky else float(10 ** rng.uniform(-8, -5.5)),
                        qrr_C=None if schottky else float(10 ** rng.uniform(-9, -6)),
                        tau_th_s=float(rng.uniform(0.05, 1.0)) if rng.random() < 0.5 else None,
                        rth_ja_K_per_W=float(rng.uniform(30, 200)),
                        is_A=float(10 ** rng.uniform(-7, -5) if schottky else 10 ** rng.uniform(-10, -8)),
                        n=float(rng.uniform(1.0, 1.3) if schottky else rng.uniform(1.6, 2.0)),
                        rs_ohm=float(rng.uniform(0.01, 0.3)))
        parts.append({**empty_part(), **part})
    return parts


def _best_of(fn, repeat=7):
    walls, cpus = [], []
    for _ in range(repeat):
        t, c = time.perf_counter(), time.process_time()
        fn()
        walls.append(time.perf_counter() - t)
        cpus.append(time.process_time() - c)
    return min(walls), statistics.median(walls), min(cpus)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--parts", type=int, default=10_000)
    args = ap.parse_args()
    parts = generate_parts(args.parts)
    table = PartArrays(parts)
    print(f"library: {args.parts} generated parts")
    for label, data in REQUIREMENTS.items():
        req = requirement_from_dict(data, f"bench {label}")
        n = evaluate(req, table).parts.count
        for what, fn, repeat in ((f"evaluate+rank {n} candidates (PartArrays)", lambda: evaluate(req, table), 5),
                                 ("run_check --top 20 (the JSON dict)", lambda: run_check(req, table, top=20), 3)):
            best, med, cpu = _best_of(fn, repeat)
            print(f"{label:22s} {what:44s} wall best {best*1e3:7.1f} ms, median {med*1e3:7.1f} ms; "
                  f"CPU best {cpu*1e3:7.1f} ms")
    _example_library()


def _example_library() -> None:
    from partpick.checks.requirement import load_requirement
    from partpick.library.store import open_library

    with tempfile.TemporaryDirectory() as tmp:
        with open_library(Path(tmp) / "example.sqlite", create=True) as lib:
            lib.import_csv(ROOT / "resources" / "example_library" / "parts.csv")
            parts = lib.list_parts()
    table = PartArrays(parts)
    for name in ("solenoid_valve_24V_diode", "solenoid_valve_24V_zener", "surge_input_24V"):
        req = load_requirement(ROOT / "resources" / "requirements" / f"{name}.toml")
        best, med, cpu = _best_of(lambda: run_check(req, table), 7)
        print(f"example library ({len(parts)} parts) run_check {name:26s} wall best {best*1e3:6.1f} ms, "
              f"median {med*1e3:6.1f} ms; CPU best {cpu*1e3:6.1f} ms")


if __name__ == "__main__":
    print(f"python {sys.version.split()[0]}, numpy {np.__version__}")
    main()

"""Benchmark of the checker (SPEC §9): not collected by pytest; run it as a script.

    .venv/bin/python tests/bench/bench_checks.py [--parts 10000]

Measures, on a generated library of invented parts:
- checker time to evaluate and rank every candidate, series and zener_shunt
  roles (target < 100 ms each; `partpick.checks.service.evaluate`);
- `run_check` building the JSON result of the top 20 and of every candidate;
- `partpick check ... --format json --top 20` end to end in a fresh process,
  start-up included, on a temporary SQLite library (target < 2 s);
- peak memory (resident set) of that process (target < 200 MB);
- `run_check` on the bundled example library with each example requirement;
- operating limits and "what sets the worst case" for the 20 candidates shown
  (SPEC §9 target ≤ 200 ms), on the example library and the generated one
  (``--limits-only`` runs just these).
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from partpick.checks.partdata import PartArrays  # noqa: E402
from partpick.checks.requirement import requirement_from_dict  # noqa: E402
from partpick.library.fields import empty_part  # noqa: E402
from partpick.checks.limits import operating_limits  # noqa: E402
from partpick.checks.sensitivity import sensitivities  # noqa: E402
from partpick.checks.service import analyse_candidates, evaluate, run_check  # noqa: E402

SERIES_REQ = dict(name="bench series", role="series", policy="commercial", supply_min_V=18.0, supply_max_V=32.0,
                  load_min_A=0.1, load_max_A=2.0, ambient_min_C=-40.0, ambient_max_C=85.0, min_output_V=16.5)
ZENER_REQ = dict(name="bench zener", role="zener_shunt", policy="commercial", supply_min_V=9.0, supply_max_V=15.0,
                 load_min_A=0.0, load_max_A=0.005, ambient_min_C=-20.0, ambient_max_C=70.0,
                 zener=dict(target_V=5.1, max_regulation_error_pct=5.0, min_zener_current_A=0.001))


def generate_parts(count: int, seed: int = 1) -> list[dict]:
    """Invented parts: 70 % diodes of four kinds, 30 % Zeners, every field in its plausible range."""
    rng = np.random.default_rng(seed)
    kinds = np.array(["rectifier", "signal", "schottky", "fast_recovery", "zener"])
    kind = rng.choice(kinds, size=count, p=[0.25, 0.1, 0.25, 0.1, 0.3])
    parts = []
    e24 = [2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1, 10, 11, 12, 13, 15]
    for i in range(count):
        k = str(kind[i])
        part = {"part_number": f"BX{i:05d}", "kind": k, "package": str(rng.choice(["SMA", "SMB", "SOD-123", "DO-41"])),
                "price": float(np.round(rng.uniform(0.02, 1.5), 3)) if rng.random() > 0.1 else None,
                "lifecycle": str(rng.choice(["active", "nrnd", "obsolete"], p=[0.8, 0.15, 0.05])),
                "tj_max_C": float(rng.choice([125.0, 150.0, 175.0])), "vf_points": []}
        if k == "zener":
            part.update(vz_V=float(rng.choice(e24)), vz_tol_pct=float(rng.choice([1.0, 2.0, 5.0])),
                        izt_A=float(rng.choice([1e-3, 5e-3, 20e-3])), zzt_ohm=float(rng.uniform(5, 80)),
                        vz_tc_pct_per_K=float(rng.uniform(-0.08, 0.09)), pd_W=float(rng.choice([0.3, 0.5, 1.0])))
            part["izk_A"] = part["izt_A"] * 0.05
            part["zzk_ohm"] = part["zzt_ohm"] * 10
        else:
            schottky = k == "schottky"
            part.update(vrrm_V=float(rng.choice([20, 40, 60, 100, 200, 400, 1000])),
                        if_avg_A=float(rng.choice([0.2, 1.0, 2.0, 3.0, 5.0])),
                        rth_ja_K_per_W=float(rng.uniform(20, 300)),
                        is_A=float(10 ** rng.uniform(-7, -4) if schottky else 10 ** rng.uniform(-12, -8)),
                        n=float(rng.uniform(1.0, 1.3) if schottky else rng.uniform(1.4, 2.0)),
                        rs_ohm=float(rng.uniform(0.01, 0.2)), ir_A=float(10 ** rng.uniform(-7, -3)),
                        ir_vr_V=None, ir_t_C=25.0, vf_max_V=None, vf_max_at_A=None)
            part["ir_vr_V"] = part["vrrm_V"]
        parts.append({**empty_part(), **part})  # every key, as Library.list_parts() gives them
    return parts


def _best_of(fn, repeat=7):
    """(best wall, median wall, best CPU) seconds; CPU time is less disturbed by other jobs on the machine."""
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
    ap.add_argument("--limits-only", action="store_true", help="only the operating limits and sensitivity figures")
    args = ap.parse_args()
    parts = generate_parts(args.parts)
    print(f"library: {args.parts} generated parts")
    _limits_and_sensitivity(parts)
    if args.limits_only:
        return
    for label, data in (("series", SERIES_REQ), ("zener_shunt", ZENER_REQ)):
        req = requirement_from_dict(data, f"bench {label}")
        evaluation = evaluate(req, parts)
        n = evaluation.parts.count
        table = PartArrays(parts)
        for what, fn, repeat in (
                (f"evaluate+rank {n} candidates from dicts (target < 100 ms)", lambda: evaluate(req, parts), 7),
                (f"evaluate+rank {n} candidates from a PartArrays", lambda: evaluate(req, table), 7),
                ("run_check --top 20 (the JSON dict)", lambda: run_check(req, parts, top=20), 3),
                ("run_check, every candidate listed", lambda: run_check(req, parts), 3)):
            best, med, cpu = _best_of(fn, repeat)
            print(f"{label:12s} {what:58s} wall best {best*1e3:7.1f} ms, median {med*1e3:7.1f} ms; "
                  f"CPU best {cpu*1e3:7.1f} ms")
    _example_library()
    _end_to_end(parts)


def _example_parts() -> list[dict] | None:
    csv_path = ROOT / "resources" / "example_library" / "parts.csv"
    from partpick.library.store import open_library

    with tempfile.TemporaryDirectory() as tmp:
        with open_library(Path(tmp) / "example.sqlite", create=True) as lib:
            lib.import_csv(csv_path)
            return lib.list_parts()


def _limits_and_sensitivity(generated: list[dict]) -> None:
    """Operating limits + sensitivity of the 20 candidates shown (SPEC §9: ≤ 200 ms), each role."""
    from partpick.checks.requirement import load_requirement

    cases = [(f"generated {label}", requirement_from_dict(data, label), generated)
             for label, data in (("series", SERIES_REQ), ("zener_shunt", ZENER_REQ))]
    example = _example_parts()
    cases += [(f"example {p.stem}", load_requirement(p), example)
              for p in sorted((ROOT / "resources" / "requirements").glob("*.toml"))]
    for label, req, parts in cases:
        ev = evaluate(req, parts)
        shown = ev.ranking.order[:20]
        lim = _best_of(lambda: operating_limits(ev.role, req, ev.parts, ev.limits, ev.result, shown), 5)
        sen = _best_of(lambda: sensitivities(ev.role, req, ev.parts, ev.limits, ev.result, shown, policy=ev.policy,
                                             policy_named=ev.policy_named), 5)
        both = _best_of(lambda: analyse_candidates(ev, shown), 5)
        print(f"{label:40s} limits+sensitivity of {shown.size} shown: wall best {both[0]*1e3:6.1f} ms, median "
              f"{both[1]*1e3:6.1f} ms (target ≤ 200 ms; limits {lim[0]*1e3:5.1f} ms, sensitivity "
              f"{sen[0]*1e3:5.1f} ms); CPU best {both[2]*1e3:6.1f} ms")


def _example_library() -> None:
    """run_check on the bundled example library with the example requirements (the GUI's re-check)."""
    csv_path = ROOT / "resources" / "example_library" / "parts.csv"
    try:
        from partpick.library.store import open_library
    except ImportError as exc:
        print(f"example library: skipped ({exc})")
        return
    if not csv_path.exists():
        print("example library: skipped (no resources/example_library/parts.csv)")
        return
    from partpick.checks.requirement import load_requirement

    with tempfile.TemporaryDirectory() as tmp:
        with open_library(Path(tmp) / "example.sqlite", create=True) as lib:
            lib.import_csv(csv_path)
            parts = lib.list_parts()
    for req_path in sorted((ROOT / "resources" / "requirements").glob("*.toml")):
        req = load_requirement(req_path)
        best, med, cpu = _best_of(lambda: run_check(req, parts), 7)
        print(f"example library ({len(parts)} parts) run_check {req_path.stem:28s} wall best {best*1e3:6.1f} ms, "
              f"median {med*1e3:6.1f} ms; CPU best {cpu*1e3:6.1f} ms")


def _end_to_end(parts: list[dict]) -> None:
    try:
        from partpick.library.store import open_library
    except ImportError as exc:  # the library layer is not there yet
        print(f"end to end: skipped ({exc})")
        return
    import tomli_w

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bench.sqlite"
        lib = open_library(path, create=True)
        t = time.perf_counter()
        csv_path = Path(tmp) / "parts.csv"
        _write_csv(parts, csv_path)
        lib.import_csv(csv_path)
        lib.close()
        print(f"(library built in {time.perf_counter() - t:.1f} s)")
        for label, data in (("series", SERIES_REQ), ("zener_shunt", ZENER_REQ)):
            req_path = Path(tmp) / f"{label}.toml"
            req_path.write_text(tomli_w.dumps(data))
            cmd = [sys.executable, "-m", "partpick", "check", str(req_path), "--library", str(path),
                   "--format", "json", "--top", "20", "--output", str(Path(tmp) / "out.json")]
            walls, rss, cpus = [], [], []
            for _ in range(3):
                t = time.perf_counter()
                proc = subprocess.run(["/usr/bin/time", "-f", "%M %U %S", *cmd], capture_output=True, text=True,
                                      env={**os.environ, "PYTHONPATH": str(ROOT)})
                walls.append(time.perf_counter() - t)
                try:
                    kb, user, system = proc.stderr.strip().splitlines()[-1].split()
                    rss.append(int(kb) / 1024)
                    cpus.append(float(user) + float(system))
                except (ValueError, IndexError):
                    rss.append(float("nan"))
                    cpus.append(float("nan"))
            result = json.loads((Path(tmp) / "out.json").read_text())
            print(f"{label:12s} partpick check end to end (exit {proc.returncode}, {len(result['candidates'])} "
                  f"listed): wall best {min(walls):.2f} s, median {statistics.median(walls):.2f} s (target < 2 s), "
                  f"CPU best {min(cpus):.2f} s; peak RSS {max(rss):.0f} MB (target < 200 MB)")


def _write_csv(parts: list[dict], path: Path) -> None:
    import csv

    from partpick.library.fields import FIELD_NAMES

    with path.open("w", newline="") as fh:
        writer = csv.DictWriter(fh, fieldnames=list(FIELD_NAMES))
        writer.writeheader()
        for p in parts:
            row = {k: ("" if p.get(k) is None else p.get(k)) for k in FIELD_NAMES}
            row["vf_points"] = ""
            writer.writerow(row)


if __name__ == "__main__":
    print(f"python {sys.version.split()[0]}, numpy {np.__version__}; max RSS so far "
          f"{resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024:.0f} MB")
    main()

"""The bundled example requirements tell a true story on the bundled example library.

Each test states what a reviewer reads from the example and checks it against the checker's own
result and against a re-run with one rule changed (so the story is caused by that rule).
"""

from __future__ import annotations

import json
from pathlib import Path

from partpick.cli import main

ROOT = Path(__file__).resolve().parents[2]
LIBRARY = ROOT / "library.sqlite.example"
REQUIREMENTS = ROOT / "resources" / "requirements"


def _result(tmp_path, toml: Path, name="r.json"):
    out = tmp_path / name
    code = main(["check", str(toml), "--library", str(LIBRARY), "--format", "json", "--output", str(out)])
    assert code in (0, 3)
    return json.loads(out.read_text(encoding="utf-8"))


def test_oring_the_hand_over_decides_which_schottkys_survive(tmp_path):
    hot = _result(tmp_path, REQUIREMENTS / "oring_12V.toml")
    passing = [c for c in hot["candidates"] if c["passed"]]
    assert passing and all(c["kind"] == "schottky" for c in passing)
    by = {c["part_number"]: c for c in hot["candidates"]}
    ran_away = [n for n, c in by.items() if c["kind"] == "schottky" and "reverse_runaway" in c["failed_checks"]]
    assert ran_away, "some Schottkys must run away after the hand-over"
    # the same requirement blocking from switch-on: several of those settle, so the hand-over is the cause
    cold_toml = tmp_path / "oring_cold.toml"
    cold_toml.write_text((REQUIREMENTS / "oring_12V.toml").read_text(encoding="utf-8")
                         .replace("handover = true", "handover = false"), encoding="utf-8")
    cold = {c["part_number"]: c for c in _result(tmp_path, cold_toml, "cold.json")["candidates"]}
    settles_cold = [n for n in ran_away if "reverse_runaway" not in cold[n]["failed_checks"]]
    assert settles_cold, "the hand-over, not the blocking voltage alone, makes them run away"
    for name in settles_cold:
        runaway = next(c for c in by[name]["checks"] if c["name"] == "reverse_runaway")
        assert runaway["margin"] < 0 and "after the hand-over" in runaway["note"]
    # the survivors keep a real distance to runaway (kelvin of ambient)
    for c in passing:
        runaway = next(k for k in c["checks"] if k["name"] == "reverse_runaway")
        assert runaway["margin"] > 10.0


def test_reverse_polarity_blocks_from_switch_on(tmp_path):
    result = _result(tmp_path, REQUIREMENTS / "reverse_polarity_24V.toml")
    assert result["requirement"]["handover"] is False
    assert any(c["passed"] for c in result["candidates"])

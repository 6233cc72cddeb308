"""SPEC §7: every output names the general caution and the assumptions that bound the numbers.

The texts are partpick's own; the test holds that each output — JSON ``cautions``, the text
table, the HTML report — carries every one of them, for every bundled example requirement
(one per role and more), so a new role or renderer cannot drop them.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from partpick.checks.cautions import ASSUMPTION_CAUTIONS, GENERAL_CAUTIONS
from partpick.cli import main

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted((ROOT / "resources" / "requirements").glob("*.toml"))
LIBRARY = ROOT / "library.sqlite.example"


@pytest.mark.parametrize("requirement", EXAMPLES, ids=lambda p: p.stem)
def test_every_output_carries_the_general_and_assumption_cautions(requirement, tmp_path):
    outputs = {}
    for fmt in ("json", "table", "html"):
        out = tmp_path / f"result.{fmt}"
        code = main(["check", str(requirement), "--library", str(LIBRARY), "--format", fmt, "--output", str(out)])
        assert code in (0, 3), (fmt, code)
        outputs[fmt] = out.read_text(encoding="utf-8")
    cautions = json.loads(outputs["json"])["cautions"]
    for text in GENERAL_CAUTIONS + ASSUMPTION_CAUTIONS:
        assert text in cautions
        assert text in outputs["table"]
        assert text.replace("'", "&#x27;") in outputs["html"]
    # RthJA on a test board, leakage growth as an assumption, DC steady state: the three of SPEC §7
    assert any("standard test board" in c for c in cautions)
    assert any("Leakage growth with temperature is an assumption" in c for c in cautions)
    assert any("DC steady state" in c for c in cautions)

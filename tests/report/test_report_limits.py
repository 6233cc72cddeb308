"""The check sheet's operating limits and "what sets the worst case" for every role (SPEC §3a)."""

from __future__ import annotations

from pathlib import Path

import pytest

from partpick.cli import main

ROOT = Path(__file__).resolve().parents[2]


@pytest.mark.parametrize("name", ["heatsink_rectifier_5A", "zener_5V1_reference", "solenoid_valve_24V_zener",
                                  "surge_input_24V"])
def test_html_check_sheet_has_limits_table_and_chart(name, tmp_path):
    out = tmp_path / "sheet.html"
    code = main(["check", str(ROOT / "resources" / "requirements" / f"{name}.toml"), "--library",
                 str(ROOT / "library.sqlite.example"), "--format", "html", "--output", str(out)])
    assert code in (0, 3)
    html = out.read_text(encoding="utf-8")
    assert "<h3>Operating limits</h3>" in html and "Max ambient" in html
    assert "<h3>What sets the worst case</h3>" in html
    assert 'alt="What sets the worst case"' in html  # the bar chart, drawn by partpick.plots
    if name == "heatsink_rectifier_5A":
        assert "Smallest heatsink" in html
        assert "RthCS 1 K/W" in html  # the heatsink stack stated on the sheet

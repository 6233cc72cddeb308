"""Reports of real checker results (partpick.checks.service.run_check), every format."""

import csv
import html as html_lib
import io
import json

import pytest
from report_data import EVIL, HOSTILE, RECTIFIER, SCHOTTKY, SERIES_REQ, ZENER, ZENER_REQ

from partpick.checks.requirement import requirement_from_dict
from partpick.checks.service import run_check
from partpick.report import render

LIBRARY = {"location": "/data/<team> & co/library.sqlite", "content_hash": "sha256:abc"}
PARTS = [SCHOTTKY, RECTIFIER, EVIL]
BY_NUMBER = {p["part_number"]: p for p in PARTS + [ZENER]}


@pytest.fixture(scope="module")
def series_req():
    return requirement_from_dict(dict(SERIES_REQ), "series.toml")


def test_every_format_of_a_series_result(series_req):
    result = run_check(series_req, PARTS, library=LIBRARY, reviewer="Q. <i>Checker</i>")
    numbers = [c["part_number"] for c in result["candidates"]]
    assert sorted(numbers) == sorted(p["part_number"] for p in PARTS)

    assert json.loads(render(result, "json", parts_by_number=BY_NUMBER, requirement=series_req)) == result

    rows = list(csv.DictReader(io.StringIO(render(result, "csv", parts_by_number=BY_NUMBER,
                                                  requirement=series_req).decode())))
    assert [r["part_number"] for r in rows] == numbers
    assert [r["passed"] == "true" for r in rows] == [c["passed"] for c in result["candidates"]]
    for row, cand in zip(rows, result["candidates"]):
        assert row["failed_checks"] == ";".join(cand["failed_checks"])
        for check in cand["checks"]:
            value = row[f"{check['name']}_value"]
            assert (value == "") if check["value"] is None else float(value) == check["value"]

    table = render(result, "table", parts_by_number=BY_NUMBER, requirement=series_req).decode()
    for number in numbers:
        assert number in table

    html = render(result, "html", parts_by_number=BY_NUMBER, requirement=series_req).decode()
    assert "Q. &lt;i&gt;Checker&lt;/i&gt;" in html  # the reviewer carried in the result, escaped
    assert "/data/&lt;team&gt; &amp; co/library.sqlite" in html
    top = result["candidates"][0]
    assert f"Check sheet: {top['part_number']}" in html
    for check in top["checks"]:
        assert html_lib.escape(check["limit_source"]) in html
    assert html.count("data:image/png;base64,") == 4 + bool(top["sensitivity"])  # curves + the sensitivity chart
    assert "<h3>Operating limits</h3>" in html and "<h3>What sets the worst case</h3>" in html
    pdf = render(result, "pdf", parts_by_number=BY_NUMBER, requirement=series_req)
    assert pdf.startswith(b"%PDF")


def test_part_report_of_the_hostile_part(series_req):
    result = run_check(series_req, PARTS, library=LIBRARY, part=HOSTILE)
    assert [c["part_number"] for c in result["candidates"]] == [HOSTILE]
    html = render(result, "html", parts_by_number=BY_NUMBER, requirement=series_req, part=HOSTILE).decode()
    assert "<script>" not in html
    assert "Check sheet: &lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; Co" in html


def test_substitutes_report(series_req):
    result = run_check(series_req, PARTS, library=LIBRARY, substitutes_for="TST-R100")
    table = render(result, "table", parts_by_number=BY_NUMBER, requirement=series_req).decode()
    assert "Substitutes for TST-R100" in table
    html = render(result, "html", parts_by_number=BY_NUMBER, requirement=series_req).decode()
    assert "Substitutes for <b>TST-R100</b>" in html
    if result["candidates"]:
        assert "Changes against the reference part" in table
        rows = list(csv.DictReader(io.StringIO(render(result, "csv", parts_by_number=BY_NUMBER,
                                                      requirement=series_req).decode())))
        assert "delta_same_package" in rows[0] and "→" in rows[0]["delta_lifecycle"]


def test_zener_report_with_yield():
    req = requirement_from_dict(dict(ZENER_REQ, zener={k: v for k, v in ZENER_REQ["zener"].items()
                                                       if v is not None}), "zener.toml")
    result = run_check(req, [ZENER], library=LIBRARY, yield_runs=2000, seed=1)
    table = render(result, "table", parts_by_number=BY_NUMBER, requirement=req).decode()
    assert "TST-Z51" in table and "Zener shunt regulator" in table
    html = render(result, "html", parts_by_number=BY_NUMBER, requirement=req).decode()
    assert "Yield" in html and "yield_pct" in html
    assert "Output against supply with the allowed band" in html
    assert "Vz high · R low" in html or "Vz low · R high" in html  # Zener corners name the tolerance ends


def test_yield_column_in_the_shortlist():
    req = requirement_from_dict(dict(ZENER_REQ, zener={k: v for k, v in ZENER_REQ["zener"].items()
                                                       if v is not None}), "zener.toml")
    result = run_check(req, [ZENER], library=LIBRARY, yield_runs=2000, seed=1)
    y = result["candidates"][0]["metrics"]["yield_pct"]
    table = render(result, "table", parts_by_number=BY_NUMBER, requirement=req).decode()
    header, _, row = table.splitlines()[5:8]
    assert header.rstrip().endswith("Lifecycle") and "Yield" in header
    assert f"{y:#.4g} %" in row

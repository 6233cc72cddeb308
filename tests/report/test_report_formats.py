"""The renderings of a check result: json, csv, table, html and pdf."""

import base64
import csv
import datetime as dt
import io
import json
import re
import shutil
import subprocess
from html.parser import HTMLParser

import pytest
from report_data import EVIL, HOSTILE, SERIES_REQ, ZENER_REQ

from partpick.errors import InputError
from partpick.report import FORMATS, render
from partpick.report.plain import guard_cell

NOW = dt.datetime(2026, 12, 1, 23, 0, tzinfo=dt.timezone.utc)


def _render(result, fmt, parts, requirement=SERIES_REQ, **kw):
    return render(result, fmt, parts_by_number=parts, requirement=requirement, **kw)


# --- json --------------------------------------------------------------------------------------
def test_json_round_trips_in_the_result_key_order(series, parts_by_number):
    text = _render(series, "json", parts_by_number).decode("utf-8")
    assert json.loads(text) == series
    assert list(json.loads(text)) == ["partpick_version", "requirement", "policy", "library", "candidates",
                                      "subject_passed"]
    assert text == _render(series, "json", parts_by_number).decode("utf-8")  # stable
    assert "NaN" not in text and "Infinity" not in text
    assert json.dumps(HOSTILE, ensure_ascii=False)[1:-1] in text  # carried as is, escaped only as JSON needs


@pytest.mark.parametrize("bad", [float("nan"), float("inf"), float("-inf")])
def test_json_refuses_non_finite_numbers(series, parts_by_number, bad):
    series["candidates"][1]["metrics"]["dissipation_W"] = bad
    with pytest.raises(ValueError, match=r"candidates\[1\]\.metrics\.dissipation_W is not a finite number"):
        _render(series, "json", parts_by_number)
    with pytest.raises(ValueError, match="not a finite number"):
        _render(series, "html", parts_by_number)


# --- csv ---------------------------------------------------------------------------------------
@pytest.mark.parametrize("text, guarded", [
    ("=1+1", "'=1+1"), ("+1", "'+1"), ("-cmd", "'-cmd"), ("@SUM(A1)", "'@SUM(A1)"), ("\tx", "'\tx"),
    ("\rx", "'\rx"), ("'quoted", "''quoted"), ("TST-S40", "TST-S40"), ("<b>", "<b>"), ("", ""),
])
def test_formula_guard(text, guarded):
    # SPEC §5: a text cell starting with = + - @ tab CR or ' gets one leading '.
    assert guard_cell(text) == guarded


def test_csv_one_row_per_candidate_and_guarded(series, parts_by_number):
    series["candidates"][2]["kind"] = "=HYPERLINK(\"http://x\")"
    rows = list(csv.DictReader(io.StringIO(_render(series, "csv", parts_by_number).decode("utf-8"))))
    assert [r["part_number"] for r in rows] == ["TST-S40", "TST-R100", HOSTILE]
    assert [r["passed"] for r in rows] == ["true", "true", "false"]
    evil = rows[2]
    assert evil["package"] == "'" + EVIL["package"]
    assert evil["kind"] == "'=HYPERLINK(\"http://x\")"
    assert evil["failed_checks"] == "reverse_runaway;forward_current"
    assert evil["first_failing_check"] == "reverse_runaway"
    # Numbers stay numbers: a negative margin is not text and is not guarded.
    assert float(evil["forward_current_margin_pct"]) == pytest.approx(-25.0)
    assert float(rows[0]["forward_drop_V"]) == 0.587
    assert rows[0]["price"] == "0.05" and rows[1]["lifecycle"] == "nrnd"
    for row in rows:
        for value in row.values():
            if value and value[0] in "=+@\t\r":
                raise AssertionError(f"unguarded formula cell {value!r}")


# --- table -------------------------------------------------------------------------------------
def test_table_is_aligned_and_readable(series, parts_by_number):
    series["candidates"][1]["part_number"] = "TST-R100\x1b[31m\nX"
    text = _render(series, "table", parts_by_number).decode("utf-8")
    assert "\x1b" not in text and "TST-R100 [31m X" in text  # control characters shown as spaces
    lines = text.splitlines()
    header = next(i for i, line in enumerate(lines) if line.startswith("Rank"))
    table = lines[header:header + 2 + 3]
    assert set(table[1]) <= {"-", " "}
    # Columns line up: every row has the Result column where the header has it.
    at = table[0].index("Result")
    assert [row[at:at + 4] for row in table[2:]] == ["pass", "pass", "FAIL"]
    assert "Reverse-state runaway" in table[4] and "+1 more" in table[4]
    assert "2 of 3 candidates pass" in text
    assert "587.0 mV" in table[2]
    assert "Verify every choice against the manufacturer's datasheet" in text


def test_table_of_a_zener_result(zener, parts_by_number):
    text = _render(zener, "table", parts_by_number, requirement=ZENER_REQ).decode("utf-8")
    assert "Zener shunt regulator" in text
    assert "Regulation error (−21.3 %)" in text
    assert "820.0 Ω" in text


def test_unknown_format(series, parts_by_number):
    with pytest.raises(InputError, match="'xlsx' is not a report format"):
        _render(series, "xlsx", parts_by_number)
    assert FORMATS == ("table", "json", "csv", "html", "pdf")


# --- html --------------------------------------------------------------------------------------
class _Tags(HTMLParser):
    def __init__(self):
        super().__init__()
        self.tags, self.images, self.text = [], [], []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        if tag == "img":
            self.images.append(dict(attrs)["src"])

    def handle_data(self, data):
        self.text.append(data)


@pytest.fixture
def series_html(series, parts_by_number):
    reviewer = 'R. <img src=x onerror=alert(1)> & "Sons"'
    series["library"]["location"] = '/tmp/<script>lib</script>.sqlite'
    return _render(series, "html", parts_by_number, reviewer=reviewer, now=NOW,
                   part=HOSTILE).decode("utf-8"), reviewer


def test_html_escapes_all_user_text(series_html):
    text, reviewer = series_html
    parsed = _Tags()
    parsed.feed(text)
    assert "script" not in parsed.tags  # neither the part number nor the library path became a tag
    assert all(src.startswith("data:image/png;base64,") for src in parsed.images)  # no injected <img>
    assert "<script>" not in text and "onerror=alert(1)>" not in text
    assert "&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; Co" in text
    plain = "".join(parsed.text)
    assert reviewer in plain and HOSTILE in plain  # shown as written, as text
    assert "/tmp/<script>lib</script>.sqlite" in plain


def test_html_report_contents(series_html):
    text, _ = series_html
    for needed in ("partpick version", "0.1.0", "2026-12-01 23:00 UTC", "sha256:0123abcd",
                   "policy commercial", "Shortlist", "Check sheet", "Worst corner", "Rating; stress ratio",
                   # formulas with their published sources
                   "Shockley", "Bell System Technical Journal 28(3)", "1949", "Banwell", "Electronics Letters 36(4)",
                   "Wright omega", "JESD51", "IEC 60063", "MIL-STD-975M appendix A",
                   # SPEC §7 cautions
                   "estimates", "manufacturer&#x27;s datasheet", "prototypes", "measurements", "fail violently",
                   "leave circuits live", "Local electrical codes", "licensed practice", "standard test board"):
        assert needed in text, needed
    # The check sheet is the --part asked for, with every check, its corner and limit source.
    assert "Check sheet: &lt;script&gt;" in text
    for label in ("Forward drop", "Reverse voltage", "Forward current", "Junction temperature",
                  "Reverse-state runaway"):
        assert label in text
    assert "30.0 V · 100 mA · 70 °C · reverse" in text
    assert "VRRM 100.0 V; stress 30.0 %" in text  # rating and stress ratio


def test_html_embeds_the_curves(series, parts_by_number):
    text = _render(series, "html", parts_by_number, now=NOW).decode("utf-8")
    parsed = _Tags()
    parsed.feed(text)
    assert len(parsed.images) == 4  # forward linear and log, Tj against ambient, power
    for src in parsed.images:
        png = base64.b64decode(src.split(",", 1)[1])
        assert png.startswith(b"\x89PNG") and len(png) > 10_000
    assert "Check sheet: TST-S40" in text  # no --part: the top part


def test_html_zener_report(zener, parts_by_number):
    text = _render(zener, "html", parts_by_number, requirement=ZENER_REQ, now=NOW).decode("utf-8")
    assert "Output against supply with the allowed band" in text
    assert text.count("data:image/png;base64,") == 4
    assert "Regulation error" in text and "FAIL" in text
    assert "14.0 V · 0 A · 70 °C · steady · Vz high · R low" in text  # the worst corner names both ends


def test_unknown_part_is_bad_input(series, parts_by_number):
    with pytest.raises(InputError, match="'NOPE' is not among the result's candidates"):
        _render(series, "html", parts_by_number, part="NOPE")


def test_missing_part_record_gives_a_note_not_a_crash(series):
    text = _render(series, "html", {}, now=NOW).decode("utf-8")
    assert "was not given: no curves" in text
    assert "data:image/png" not in text


# --- pdf ---------------------------------------------------------------------------------------
def test_pdf_has_pages_and_the_escaped_text(series, parts_by_number, tmp_path):
    pdf = _render(series, "pdf", parts_by_number, reviewer="A. <b>Reviewer</b>", part=HOSTILE, now=NOW)
    assert pdf.startswith(b"%PDF") and pdf.rstrip().endswith(b"%%EOF")
    path = tmp_path / "report.pdf"
    path.write_bytes(pdf)
    if shutil.which("pdfinfo") is None or shutil.which("pdftotext") is None:
        # Without poppler: count the page objects the PDF declares.
        assert len(re.findall(rb"/Type\s*/Page[^s]", pdf)) >= 3
        return
    info = subprocess.run(["pdfinfo", str(path)], capture_output=True, text=True, check=True).stdout
    pages = int(re.search(r"Pages:\s+(\d+)", info).group(1))
    assert pages >= 3
    assert "A4" in info
    text = subprocess.run(["pdftotext", "-layout", str(path), "-"], capture_output=True, text=True,
                          check=True).stdout
    assert "Review report: 24 V input protection" in text
    assert "A. <b>Reviewer</b>" in text  # markup in user text is shown, not interpreted
    assert '<script>alert("x")</script>' in text
    assert "Shockley" in text and "licensed practice" in text


def test_pdf_images_are_drawn(series, parts_by_number, tmp_path):
    if shutil.which("pdfimages") is None:
        pytest.skip("poppler-utils (pdfimages) not installed")
    path = tmp_path / "report.pdf"
    path.write_bytes(_render(series, "pdf", parts_by_number, now=NOW))
    listing = subprocess.run(["pdfimages", "-list", str(path)], capture_output=True, text=True, check=True).stdout
    images = [line for line in listing.splitlines()[2:] if line.strip() and " image " in line]
    assert len(images) >= 4


def test_text_formats_do_not_load_qt(tmp_path):
    # table/json/csv are for terminals and pipes: they must not pay for (or depend on) Qt.
    import sys

    script = (
        "import sys, json\n"
        "sys.path.insert(0, %r)\n"
        "import report_data as d\n"
        "from partpick.report import render\n"
        "parts = {p['part_number']: p for p in (d.SCHOTTKY, d.RECTIFIER, d.EVIL)}\n"
        "for fmt in ('table', 'json', 'csv'):\n"
        "    render(d.series_result(), fmt, parts_by_number=parts, requirement=d.SERIES_REQ)\n"
        "print(json.dumps(sorted(m for m in sys.modules if m.startswith(('PySide6', 'pyqtgraph')))))\n"
    ) % str(__import__("pathlib").Path(__file__).parent)
    out = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, check=True)
    assert json.loads(out.stdout) == []


def test_pdf_without_a_display_or_platform(tmp_path):
    # SPEC §2: report commands that need Qt choose the offscreen platform themselves.
    import os
    import sys

    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")}
    out = tmp_path / "r.pdf"
    script = (
        "import sys\n"
        "sys.path.insert(0, %r)\n"
        "import report_data as d\n"
        "from partpick.report import render\n"
        "parts = {p['part_number']: p for p in (d.SCHOTTKY, d.RECTIFIER, d.EVIL)}\n"
        "open(%r, 'wb').write(render(d.series_result(), 'pdf', parts_by_number=parts, requirement=d.SERIES_REQ))\n"
    ) % (str(__import__("pathlib").Path(__file__).parent), str(out))
    subprocess.run([sys.executable, "-c", script], env=env, check=True, timeout=120)
    assert out.read_bytes().startswith(b"%PDF")

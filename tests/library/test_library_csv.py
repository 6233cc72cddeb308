"""Parts CSV: engineering notation, the formula guard, line-exact errors, exact round trip."""

import io
import math

import pytest

from partpick.errors import InputError
from partpick.library import csvio
from partpick.library.fields import FIELD_NAMES, FIELDS_BY_NAME
from partpick.library.store import open_library

HEADER = "part_number,kind,vrrm_V,if_avg_A,is_A,n,rs_ohm"


# -- numbers ----------------------------------------------------------------------------

@pytest.mark.parametrize(
    "text, field, value",
    [
        ("4.7k", "rs_ohm", 4700.0),  # SI prefix k = 1e3 (SI Brochure, 9th ed., table 7)
        ("10m", "if_avg_A", 0.010),  # m = 1e-3
        ("10 mA", "if_avg_A", 0.010),  # with the column's unit
        ("1e-14", "is_A", 1e-14),
        ("2.2 kohm", "zzk_ohm", 2200.0),
        ("-40", "ir_t_C", -40.0),
        ("330u", "izk_A", 330e-6),
        ("0.0005", "is_A", 0.0005),
    ],
)
def test_engineering_notation_is_read(text, field, value):
    assert csvio.parse_number(text, FIELDS_BY_NAME[field]) == pytest.approx(value, rel=1e-15)


@pytest.mark.parametrize(
    "text, message",
    [
        ("4.7kk", r"'4.7kk' has unit 'k'"),
        ("1e400", r"'1e400' is out of range \(not a finite number\)"),  # beyond IEEE 754 double max 1.8e308
        ("nan", r"'nan' is not a number in engineering notation"),
        ("inf", r"'inf' is not a number"),
        ("1,5", r"'1,5' is not a number"),
        ("5 V", r"'5 V' has unit 'V', expected 'A'"),
        ("0x10", r"is not a number"),
    ],
)
def test_bad_numbers_are_refused_with_the_reason(text, message):
    with pytest.raises(InputError, match=message):
        csvio.parse_number(text, FIELDS_BY_NAME["if_avg_A"])


def test_numbers_are_written_as_the_shortest_exact_text():
    # repr of a float is the shortest string that reads back to the same double
    # (Python language reference, "float.__repr__"; Steele & White / Gay).
    for value in (4700.0, 1e-14, 0.1, 2.0039718467428608e-09, 1.7976931348623157e308, -40.0, 5e-324):
        text = csvio.format_number(value)
        assert float(text) == value
        assert csvio.parse_number(text, FIELDS_BY_NAME["price"]) == value
    assert csvio.format_number(4700.0) == "4700"


def test_points_are_read_and_bad_points_named():
    assert csvio.parse_points("10m:620m; 0.1:0.72;1:930 mV") == [(0.01, 0.62), (0.1, 0.72), (1.0, 0.93)]
    with pytest.raises(InputError, match=r"point 2 '0.1-0.72' is not an IF:VF pair"):
        csvio.parse_points("0.01:0.62;0.1-0.72")
    with pytest.raises(InputError, match=r"point 2 is empty"):
        csvio.parse_points("0.01:0.62;;1:0.9")
    with pytest.raises(InputError, match=r"point 1 '0.01:nan': 'nan' is not a number"):
        csvio.parse_points("0.01:nan")


# -- formula-injection guard -------------------------------------------------------------

@pytest.mark.parametrize("text", ["=1+1", "+cmd", "-2 spare", "@SUM(A1)", "\tTAB", "\rCR", "'quoted", "''two"])
def test_guard_neutralises_and_import_restores(text):
    # OWASP "CSV Injection": prefix cells starting with = + - @ tab CR with a single quote;
    # SPEC §5 adds ' itself so that the guard can be undone exactly.
    guarded = csvio.guard_text(text)
    assert guarded == "'" + text
    assert csvio.unguard_text(guarded) == text


def test_guard_leaves_plain_text_alone():
    assert csvio.guard_text("glass axial") == "glass axial"


def test_formula_injection_round_trip_through_a_library(library, rectifier, tmp_path):
    nasty = {"manufacturer": "=HYPERLINK(\"http://x\")", "package": "-SMA", "notes": "@risk\r\nline two",
             "datasheet": "'already quoted"}
    library.save_part(rectifier("TST-F1", ir_t_C=-40.0, ir_A=1e-6, ir_vr_V=400.0, **nasty))
    out = tmp_path / "out.csv"
    library.export_csv(out)
    text = out.read_text(encoding="utf-8")
    assert "'=HYPERLINK" in text and ",'-SMA," in text and "'@risk" in text and "''already quoted" in text
    assert ",-40," in text  # a number stays a number
    # No cell of the exported file starts with a formula character.
    import csv

    for row in list(csv.reader(io.StringIO(text, newline="")))[1:]:
        for cell, name in zip(row, FIELD_NAMES):
            if FIELDS_BY_NAME[name].type == "text" and cell:
                assert not cell.startswith(("=", "+", "-", "@", "\t", "\r")), (name, cell)
    with open_library(tmp_path / "copy.sqlite", create=True) as copy:
        copy.import_csv(out)
        stored = copy.get_part("TST-F1")
    for key, value in nasty.items():
        assert stored[key] == value


# -- reading ------------------------------------------------------------------------------

def test_columns_in_any_order_missing_columns_unknown(library, write_csv):
    path = write_csv("rs_ohm,n,is_A,if_avg_A,vrrm_V,kind,part_number\n0.04,1.9,2n,1,400,rectifier,TST-A\n")
    summary = library.import_csv(path)
    assert summary.added == ["TST-A"]
    part = library.get_part("TST-A")
    assert part["is_A"] == 2e-9 and part["manufacturer"] is None and part["vf_points"] == []


def test_bom_and_no_bom_read_the_same(library, write_csv):
    text = f"{HEADER},notes\nTST-B,rectifier,400,1,2e-9,1.9,0.04,Ω µ °C\n"
    assert library.import_csv(write_csv(text, "bom.csv", bom=True)).added == ["TST-B"]
    assert library.import_csv(write_csv(text, "plain.csv")).unchanged == ["TST-B"]
    assert library.get_part("TST-B")["notes"] == "Ω µ °C"


def test_not_utf8_is_refused_with_its_line(library, tmp_path):
    path = tmp_path / "latin1.csv"
    path.write_bytes(f"{HEADER},notes\nTST-C,rectifier,400,1,2e-9,1.9,0.04,ok\n".encode()
                     + "TST-D,rectifier,400,1,2e-9,1.9,0.04,50 µA\n".encode("latin-1"))
    with pytest.raises(InputError, match=r"line 3: not UTF-8 text \(byte 0xb5\)"):
        library.import_csv(path)
    assert library.list_parts() == []


@pytest.mark.parametrize(
    "header, message",
    [
        ("part_number,kind,colour", r"line 1, column colour: unknown column 'colour'"),
        ("part_number,kind,vrrm_V,vrrm_V", r"column 'vrrm_V' appears twice"),
        ("part_number,vrrm_V", r"column 'kind' is missing \(required\)"),
        ("part_number,kind, vrrm_V", r"unknown column ' vrrm_V' \(did you mean 'vrrm_V'\?\)"),
    ],
)
def test_bad_headers(library, write_csv, header, message):
    with pytest.raises(InputError, match=message):
        library.import_csv(write_csv(header + "\n"))


def test_empty_file(library, write_csv):
    with pytest.raises(InputError, match="the file is empty"):
        library.import_csv(write_csv(""))


def test_every_bad_row_is_reported_with_line_and_column(library, write_csv):
    text = (
        f"{HEADER},notes\n"
        "TST-1,rectifier,400,1,2e-9,1.9,0.04,good\n"               # line 2
        "TST-2,rectifier,4.7kk,1,2e-9,1.9,0.04,bad number\n"        # line 3
        'TST-3,rectifier,400,1,2e-9,1.9,0.04,"two\nlines"\n'        # lines 4-5, good
        "TST-4,rectifier,400,1,2e-9,9,0.04,n out of range\n"        # line 6
        "TST-5,diode,400,1,2e-9,1.9,0.04,bad kind\n"                # line 7
        "TST-1,rectifier,400,1,2e-9,1.9,0.04,duplicate\n"           # line 8
        "TST-6,rectifier,400,1\n"                                   # line 9: short row
        "\n"                                                        # line 10: blank, skipped
        ",,,,,,,\n"                                                 # line 11: empty row, skipped
        "TST-7,signal,nan,1e400,2e-9,1.9,0.04,two bad cells\n"      # line 12
    )
    with pytest.raises(InputError) as caught:
        library.import_csv(write_csv(text))
    problems = [(p.line, p.column) for p in caught.value.problems]
    assert problems == [
        (3, "vrrm_V"),
        (6, "n"),
        (7, "kind"),
        (8, "part_number"),
        (9, None),
        (12, "vrrm_V"),
        (12, "if_avg_A"),
    ]
    message = str(caught.value)
    assert message.startswith("parts.csv: 6 bad rows, nothing imported: line 3, column vrrm_V:") or \
        "6 bad rows, nothing imported: line 3, column vrrm_V: '4.7kk'" in message
    assert "line 8, column part_number: part_number TST-1 already appears on line 2" in message
    assert "line 9: the row has 4 cells, the header has 8 columns" in message
    assert "line 6, column n: part TST-4: n = 9 is out of range (allowed: 0.5 ≤ value ≤ 4)" in message
    assert "\n" not in message  # one line on stderr
    assert library.list_parts() == []


def test_fit_refusal_is_a_bad_row(library, write_csv):
    text = "part_number,kind,vrrm_V,if_avg_A,vf_points\nTST-8,rectifier,400,1,0.1:0.7;0.2:0.71;1:2.5\n"
    with pytest.raises(InputError, match=r"line 2, column vf_points: part TST-8: the forward model cannot be "
                                         r"fitted to vf_points \(.*\); give is_A, n and rs_ohm instead"):
        library.import_csv(write_csv(text))


# -- writing, round trip, updates ----------------------------------------------------------

def _diode_points(saturation_current, ideality, series_resistance, currents):
    """Synthetic datasheet points from the Shockley equation with Rs, rounded to 1 mV like a datasheet."""
    vt = 1.380649e-23 * 298.15 / 1.602176634e-19  # CODATA 2018 k and q (exact SI values)
    return [(i, round(ideality * vt * math.log1p(i / saturation_current) + i * series_resistance, 3))
            for i in currents]


def test_export_import_export_is_byte_identical(library, rectifier, zener, tmp_path):
    points = _diode_points(2e-9, 1.9, 0.04, (0.01, 0.1, 0.5, 1.0, 3.0))
    library.save_part(rectifier("TST-R2", is_A=None, n=None, rs_ohm=None, vf_points=points, notes="fitted"))
    library.save_part(rectifier("TST-R1", vf_points=[(0.1, 0.8), (1.0, 0.95)], vf_max_V=1.1, vf_max_at_A=1.0))
    library.save_part(zener("TST-Z1", vz_tc_pct_per_K=-0.035, notes='comma, "quote"\nnewline'))
    first = tmp_path / "first.csv"
    library.export_csv(first)
    with open_library(tmp_path / "empty.sqlite", create=True) as fresh:
        summary = fresh.import_csv(first)
        assert sorted(summary.added) == ["TST-R1", "TST-R2", "TST-Z1"] and summary.fitted == []
        second = io.StringIO(newline="")
        fresh.export_csv(second)
        reimported = fresh.get_part("TST-R2")
    assert second.getvalue().encode("utf-8") == first.read_bytes()
    original = library.get_part("TST-R2")
    assert original["model_source"] == "fitted"
    for name in ("is_A", "n", "rs_ohm", "model_source", "vf_points"):
        assert reimported[name] == original[name]
    # The residual is recomputed from the stored model and its points.
    assert reimported["fit_residual_mV"] == pytest.approx(original["fit_residual_mV"], abs=1e-9)
    assert original["fit_residual_mV"] < 1.0  # points rounded to 1 mV: the fit is within a millivolt


def test_fit_on_import_matches_the_generating_model(library, write_csv):
    # Points generated from Is = 2 nA, n = 1.9, Rs = 40 mΩ and rounded to 1 mV; the fit must land near them.
    points = _diode_points(2e-9, 1.9, 0.04, (0.01, 0.1, 0.5, 1.0, 3.0))
    cell = ";".join(f"{i}:{v}" for i, v in points)
    text = f"part_number,kind,vrrm_V,if_avg_A,vf_points\nTST-P,rectifier,400,1,{cell}\n"
    summary = library.import_csv(write_csv(text))
    assert summary.fitted == ["TST-P"]
    part = library.get_part("TST-P")
    assert part["model_source"] == "fitted"
    assert part["n"] == pytest.approx(1.9, rel=0.03)
    assert part["rs_ohm"] == pytest.approx(0.04, rel=0.1)
    assert part["fit_residual_mV"] <= 0.5 + 1e-9  # rounding to 1 mV leaves at most 0.5 mV


def test_update_summary_added_updated_unchanged(library, write_csv):
    library.import_csv(write_csv(f"{HEADER}\nTST-1,rectifier,400,1,2e-9,1.9,0.04\nTST-2,rectifier,200,1,2e-9,1.9,0.04\n"))
    summary = library.import_csv(write_csv(
        f"{HEADER},price\nTST-1,rectifier,400,1,2e-9,1.9,0.04,\nTST-2,rectifier,600,1,2e-9,1.9,0.04,\n"
        "TST-3,signal,75,0.2,3e-9,1.8,0.6,0.01\n"))
    assert (summary.added, summary.updated, summary.unchanged) == (["TST-3"], ["TST-2"], ["TST-1"])
    assert summary.text().endswith("added 1, updated 1, unchanged 1")
    assert library.get_part("TST-2")["vrrm_V"] == 600.0
    # A row updates the stored part: a column the file does not carry keeps its value (SPEC §5) ...
    library.import_csv(write_csv("part_number,kind,vrrm_V,if_avg_A,is_A,n,rs_ohm\nTST-3,signal,75,0.2,3e-9,1.8,0.6\n"))
    assert library.get_part("TST-3")["price"] == 0.01
    # ... and with replace the row replaces it whole: a column left out means "not known".
    library.import_csv(write_csv("part_number,kind,vrrm_V,if_avg_A,is_A,n,rs_ohm\nTST-3,signal,75,0.2,3e-9,1.8,0.6\n"),
                       replace=True)
    assert library.get_part("TST-3")["price"] is None


def test_dry_run_writes_nothing(library, library_path, write_csv):
    library.close()  # every change checkpointed into the file
    before = library_path.read_bytes()
    with open_library(library_path) as reopened:
        summary = reopened.import_csv(write_csv(f"{HEADER}\nTST-1,rectifier,400,1,2e-9,1.9,0.04\n"), dry_run=True)
        assert summary.added == ["TST-1"] and summary.dry_run and not summary.written
        assert "dry run, nothing written" in summary.text()
        assert reopened.list_parts() == []
    assert library_path.read_bytes() == before


def _many_rows(count: int) -> str:
    return HEADER + "\n" + "".join(f"TST-{i:05d},rectifier,400,1,2e-9,1.9,0.04\n" for i in range(count))


def test_progress_is_reported_and_reaches_the_end(library, write_csv):
    calls = []
    library.import_csv(write_csv(_many_rows(2500)), progress=lambda done, total: calls.append((done, total)))
    assert calls[-1] == (7500, 7500)  # read, checked, written: three steps per row
    assert [done for done, _ in calls] == sorted(done for done, _ in calls)
    assert len(calls) >= 10


@pytest.mark.parametrize("stop_after", [1, 7, 12])  # during reading, checking, writing
def test_cancel_writes_nothing(library, write_csv, stop_after):
    polls = []

    def cancel():
        polls.append(1)
        return len(polls) >= stop_after

    summary = library.import_csv(write_csv(_many_rows(5000)), cancel=cancel)
    assert summary.cancelled and not summary.written
    assert library.list_parts() == []


def test_random_parts_round_trip_exactly(tmp_path):
    # Seeded random parts: every float drawn across its whole allowed range (log-uniform where the
    # range spans decades), text with the characters that stress CSV quoting and the formula guard.
    import random

    from partpick.library.fields import PART_FIELDS

    rng = random.Random(20261201)
    # Line breaks only in notes; tabs and other control characters are refused in text (SPEC §5).
    alphabet = ["a", "Z", "0", ",", '"', "'", "=", "+", "-", "@", ";", ":", "Ω", "µ", " "]

    def text(limit, breaks=False):
        letters = alphabet + ["\n", "\r\n"] if breaks else alphabet
        return "".join(rng.choice(letters) for _ in range(rng.randint(1, min(limit, 12)))).strip() or "x"

    parts = []
    for index in range(200):
        part = {"part_number": f"RND-{index:03d}", "kind": "rectifier", "vf_points": []}
        for spec in PART_FIELDS:
            if spec.type != "float" or rng.random() < 0.3:
                continue
            low, high = spec.minimum, spec.maximum
            if low > 0 and high / low > 1e3:
                value = 10 ** rng.uniform(math.log10(low), math.log10(high))
            else:
                value = rng.uniform(low, high)
            part[spec.name] = min(max(value, math.nextafter(low, math.inf)), high)
        part.update(vrrm_V=rng.uniform(1, 1000), if_avg_A=rng.uniform(0.1, 10), is_A=10 ** rng.uniform(-15, -3),
                    n=rng.uniform(1, 4), rs_ohm=rng.uniform(0, 1), tj_max_C=rng.uniform(100, 250),
                    model_source="entered", vf_max_V=None, vf_max_at_A=None, ir_A=None, ir_vr_V=None,
                    izk_A=None, zzk_ohm=None, pd_ref_C=25.0, if_ref_C=25.0, ir_t_C=None,
                    ir_hot_A=None, ir_hot_t_C=None, rth_ja_area_mm2=None, rth_ja_large_K_per_W=None,
                    rth_ja_large_area_mm2=None, ppp2_W=None)
        # Values SPEC §5 orders (VRRM ≤ VRSM, VWM < VBR min ≤ VBR max, the parts of the thermal path
        # below RthJA): the drawn values are put in that order rather than left to refusal.
        for chain in (("vrrm_V", "vrsm_V"), ("vwm_V", "vbr_min_V", "vbr_max_V"),
                      ("rth_jc_K_per_W", "rth_jl_K_per_W", "rth_ja_K_per_W")):
            present = [name for name in chain if part.get(name) is not None]
            for name, value in zip(present, sorted(part[name] for name in present)):
                part[name] = value
        for name in ("manufacturer", "package", "datasheet", "notes"):
            part[name] = text(64, breaks=name == "notes")
        parts.append(part)
    with open_library(tmp_path / "a.sqlite", create=True) as first:
        for part in parts:
            first.save_part(part)
        exported = io.StringIO(newline="")
        first.export_csv(exported)
        stored = first.list_parts()
    (tmp_path / "a.csv").write_bytes(exported.getvalue().encode("utf-8"))
    with open_library(tmp_path / "b.sqlite", create=True) as second:
        second.import_csv(tmp_path / "a.csv")
        again = io.StringIO(newline="")
        second.export_csv(again)
        reread = second.list_parts()
    assert again.getvalue() == exported.getvalue()
    assert reread == stored
    for original, back in zip(sorted(parts, key=lambda p: p["part_number"]), reread):
        for key, value in original.items():
            assert back[key] == value, (original["part_number"], key)

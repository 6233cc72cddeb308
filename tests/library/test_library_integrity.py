"""Nothing lost: CSV rows update parts, damaged content is named, bad input is bounded, text is clean,
contradictions are refused, migrations back up once (SPEC §5)."""

from __future__ import annotations

import json
import os
import sqlite3
import subprocess
import sys
import tomllib
import unicodedata
from pathlib import Path

import pytest

from partpick.cli import main
from partpick.errors import InputError, LibraryError
from partpick.library import migrate, models
from partpick.library.fields import part_problems
from partpick.library.store import open_library

REPO = Path(__file__).resolve().parents[2]

FULL_HEADER = "part_number,kind,manufacturer,package,vrrm_V,if_avg_A,is_A,n,rs_ohm,price,lifecycle,notes"
FULL_ROW = "UPD-1,rectifier,Testing Works,axial-2,400,1,2e-9,1.9,0.04,0.05,active,first batch"


def _points(is_A, n, rs_ohm) -> str:
    """Invented VF points of a 1 A silicon rectifier: the Shockley model with Rs, rounded to 0.1 mV."""
    from partpick.library.rules import typical_forward_voltage

    return ";".join(f"{i:g}:{typical_forward_voltage(i, is_A, n, rs_ohm):.4f}" for i in (0.01, 0.1, 0.5, 1.0, 3.0))


POINTS = _points(2e-9, 1.9, 0.04)
POINTS_2 = _points(1e-9, 1.8, 0.03)


@pytest.fixture
def stored(library, write_csv):
    library.import_csv(write_csv(f"{FULL_HEADER}\n{FULL_ROW}\n"))
    return library


# -- item 6: rows update the columns they carry ----------------------------------------------------

def test_a_price_only_row_updates_the_price_and_keeps_every_other_field(stored, write_csv):
    before = stored.get_part("UPD-1")
    summary = stored.import_csv(write_csv("part_number,kind,price\nUPD-1,rectifier,0.07\n", "price.csv"))
    after = stored.get_part("UPD-1")
    assert summary.updated == ["UPD-1"]
    assert after["price"] == 0.07
    assert {k: v for k, v in after.items() if k != "price"} == {k: v for k, v in before.items() if k != "price"}


def test_an_empty_cell_clears_that_field_only(stored, write_csv):
    stored.import_csv(write_csv("part_number,kind,notes,price\nUPD-1,rectifier,,0.05\n", "clear.csv"))
    after = stored.get_part("UPD-1")
    assert after["notes"] is None and after["manufacturer"] == "Testing Works" and after["vrrm_V"] == 400.0


def test_replace_replaces_the_part_whole(stored, write_csv):
    path = write_csv("part_number,kind,vrrm_V,if_avg_A,is_A,n,rs_ohm\nUPD-1,rectifier,400,1,2e-9,1.9,0.04\n", "r.csv")
    stored.import_csv(path, replace=True)
    after = stored.get_part("UPD-1")
    assert after["price"] is None and after["manufacturer"] is None and after["notes"] is None


def test_dry_run_lists_per_part_what_would_change_or_be_cleared(stored, write_csv, library_path, capsys):
    path = write_csv("part_number,kind,price,notes,vrrm_V\nUPD-1,rectifier,0.08,,400\nUPD-2,signal,,,75\n", "d.csv")
    before = library_path.read_bytes()
    # UPD-2 is new and incomplete: make it complete so the dry run passes.
    path.write_text("part_number,kind,price,notes,vrrm_V,if_avg_A,is_A,n,rs_ohm\n"
                    "UPD-1,rectifier,0.08,,400,,,,\n"
                    "UPD-2,signal,,,75,0.2,3e-9,1.8,0.6\n", encoding="utf-8")
    with pytest.raises(InputError, match="UPD-1|if_avg_A"):
        stored.import_csv(path, dry_run=True)  # the merged UPD-1 lost if_avg_A and its model: refused whole
    path.write_text("part_number,kind,price,notes,vrrm_V\nUPD-1,rectifier,0.08,,400\n", encoding="utf-8")
    summary = stored.import_csv(path, dry_run=True)
    assert summary.changes["UPD-1"] == (["price"], ["notes"])
    assert library_path.read_bytes() == before
    assert main(["library", "import", str(path), "--dry-run", "--library", str(library_path)]) == 0
    out = capsys.readouterr().out
    assert "UPD-1: would change price; would clear notes" in out
    assert stored.get_part("UPD-1")["price"] == 0.05  # nothing written


def test_the_merged_part_is_validated_whole(stored, write_csv):
    # The row alone is fine; merged with the stored IF(AV) rating the Tj rule is broken.
    stored.import_csv(write_csv("part_number,kind,tj_max_C\nUPD-1,rectifier,150\n", "tj.csv"))
    with pytest.raises(InputError, match=r"if_ref_C = 160 °C is not below tj_max_C = 150"):
        stored.import_csv(write_csv("part_number,kind,if_ref_C\nUPD-1,rectifier,160\n", "ref.csv"))
    assert stored.get_part("UPD-1")["if_ref_C"] is None


def test_new_vf_points_without_a_new_model_are_fitted_again(library, write_csv):
    library.import_csv(write_csv(f"part_number,kind,vrrm_V,if_avg_A,vf_points\nFIT-1,rectifier,400,1,{POINTS}\n"))
    first = library.get_part("FIT-1")
    assert first["model_source"] == "fitted"
    summary = library.import_csv(write_csv(f"part_number,kind,vf_points\nFIT-1,rectifier,{POINTS_2}\n", "new.csv"))
    second = library.get_part("FIT-1")
    assert summary.fitted == ["FIT-1"] and second["model_source"] == "fitted"
    assert second["vf_points"] == [tuple(map(float, p.split(":"))) for p in POINTS_2.split(";")]
    # The new model follows the new points: at 1 A it gives the new point's VF within the 5 mV fit limit.
    from partpick.library.rules import typical_forward_voltage

    new_vf = dict(second["vf_points"])[1.0]
    old_vf = dict(first["vf_points"])[1.0]
    assert abs(new_vf - old_vf) > 0.02
    assert typical_forward_voltage(1.0, second["is_A"], second["n"], second["rs_ohm"]) == pytest.approx(new_vf, abs=5e-3)


def test_new_points_with_a_new_model_keep_the_entered_model(library, write_csv):
    library.import_csv(write_csv(f"part_number,kind,vrrm_V,if_avg_A,vf_points\nFIT-2,rectifier,400,1,{POINTS}\n"))
    library.import_csv(write_csv(f"part_number,kind,vf_points,is_A,n,rs_ohm,model_source\n"
                                 f"FIT-2,rectifier,{POINTS_2},3e-9,1.9,0.05,entered\n", "m.csv"))
    part = library.get_part("FIT-2")
    assert (part["is_A"], part["n"], part["rs_ohm"], part["model_source"]) == (3e-9, 1.9, 0.05, "entered")


def test_an_edited_model_in_an_exported_file_is_entered_not_fitted(library, write_csv, tmp_path):
    library.import_csv(write_csv(f"part_number,kind,vrrm_V,if_avg_A,vf_points\nFIT-3,rectifier,400,1,{POINTS}\n"))
    out = tmp_path / "all.csv"
    library.export_csv(out)
    text = out.read_text(encoding="utf-8")
    fitted_n = library.get_part("FIT-3")["n"]
    from partpick.library.csvio import format_number

    out.write_text(text.replace(f",{format_number(fitted_n)},", ",1.85,"), encoding="utf-8")  # edit n only
    library.import_csv(out)
    part = library.get_part("FIT-3")
    assert part["n"] == 1.85 and part["model_source"] == "entered"


# -- item 7: damaged stored content -----------------------------------------------------------------

def _tamper(path, sql, *args):
    connection = sqlite3.connect(path)
    connection.execute("PRAGMA ignore_check_constraints = ON")  # damage the way another program could
    with connection:
        connection.execute(sql, args)
    connection.close()


@pytest.mark.parametrize("argv", [["library", "list"], ["library", "export"], ["check", "REQ"]])
def test_a_number_column_holding_text_is_exit_1_naming_part_and_field(stored, library_path, tmp_path, argv, capsys):
    _tamper(library_path, "UPDATE part SET vrrm_V = 'four hundred' WHERE part_number = 'UPD-1'")
    req = tmp_path / "req.toml"
    req.write_text('name = "x"\nrole = "series"\nsupply_min_V = 5.0\nsupply_max_V = 6.0\nload_min_A = 0.1\n'
                   'load_max_A = 0.2\nambient_min_C = 25.0\nambient_max_C = 40.0\n', encoding="utf-8")
    argv = [str(req) if a == "REQ" else a for a in argv]
    assert main([*argv, "--library", str(library_path)]) == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "UPD-1" in err and "vrrm_V" in err and "damaged" in err


def test_a_stored_policy_that_is_not_json_is_exit_1_naming_it(library, library_path, capsys):
    library.save_policy({"name": "house", "description": "", "groups": {}})
    _tamper(library_path, "UPDATE policy SET body = '{not json' WHERE name = 'house'")
    with pytest.raises(LibraryError, match=r"stored policy 'house', field body"):
        library.list_policies()
    assert main(["policy", "list", "--library", str(library_path)]) == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "house" in err and "Traceback" not in err


def test_a_damaged_choice_and_a_damaged_point_are_named(stored, library_path):
    _tamper(library_path, "UPDATE part SET kind = 'toaster'")
    with pytest.raises(LibraryError, match=r"part 'UPD-1', field kind holds 'toaster'"):
        stored.list_parts()
    _tamper(library_path, "UPDATE part SET kind = 'rectifier'")
    stored.import_csv(Path(_write(library_path.parent / "p.csv", f"part_number,kind,vf_points\nUPD-1,rectifier,{POINTS}\n")))
    _tamper(library_path, "UPDATE vf_point SET voltage_V = 'x' WHERE seq = 1")
    with pytest.raises(LibraryError, match=r"part 'UPD-1', field vf_points"):
        stored.list_parts()


def _write(path, text):
    Path(path).write_text(text, encoding="utf-8")
    return path


# -- item 8: bounded messages and readers -----------------------------------------------------------

def test_bad_input_lists_at_most_50_problems_then_and_n_more(library, write_csv):
    rows = "".join(f"BAD-{i},rectifier,-1\n" for i in range(120))
    with pytest.raises(InputError) as caught:
        library.import_csv(write_csv("part_number,kind,vrrm_V\n" + rows))
    message = str(caught.value)
    assert len(caught.value.problems) > 120  # every problem is kept for the window's list
    assert message.count("line ") == 50
    shown = message.rsplit("; and ", 1)
    assert len(shown) == 2 and shown[1].endswith(" more") and int(shown[1].split()[0]) == len(caught.value.problems) - 50


@pytest.mark.parametrize("source", ["/dev/zero", "fifo"])
def test_a_non_regular_input_is_refused_in_one_line(library_path, library, tmp_path, source, capsys):
    if source == "fifo":
        source = tmp_path / "in.fifo"
        os.mkfifo(source)  # nobody writes it: reading it would wait for ever
    elif not os.path.exists(source):
        pytest.skip("no /dev/zero here")
    assert main(["library", "import", str(source), "--library", str(library_path)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "not a regular file" in err
    req = str(source)
    assert main(["check", req, "--library", str(library_path)]) == 2
    assert main(["policy", "import", req, "--library", str(library_path)]) == 2
    assert "not a regular file" in capsys.readouterr().err


def test_inputs_over_256_mib_are_refused(library, library_path, tmp_path, capsys):
    big = tmp_path / "big.csv"
    with open(big, "wb") as handle:  # a sparse file: 256 MiB + 1 byte without writing them
        handle.truncate(256 * 1024 * 1024 + 1)
    assert main(["library", "import", str(big), "--library", str(library_path)]) == 2
    assert "larger than 256 MiB" in capsys.readouterr().err
    big_toml = tmp_path / "big.toml"
    os.replace(big, big_toml)
    assert main(["check", str(big_toml), "--library", str(library_path)]) == 2
    assert "larger than 256 MiB" in capsys.readouterr().err


@pytest.mark.parametrize("depth, refused", [(31, False), (40, True), (5000, True)])
def test_toml_nested_past_32_levels_is_refused(tmp_path, depth, refused):
    from partpick.checks.requirement import load_requirement

    path = tmp_path / "deep.toml"
    path.write_text('name = "x"\nrole = "series"\ndeep = ' + "[" * depth + "1" + "]" * depth + "\n", encoding="utf-8")
    with pytest.raises(InputError) as caught:
        load_requirement(path)
    message = str(caught.value)
    assert ("nested deeper than 32" in message) == refused
    assert "\n" not in message


# -- item 9: text rules -----------------------------------------------------------------------------

@pytest.mark.parametrize("field, text, reason", [
    ("manufacturer", "Evil\u202eWorks", "bidirectional control"),
    ("package", "SMA\u200b", "zero-width"),
    ("datasheet", "rev\x1b[2J", "control character"),
    ("notes", "two\x85lines", "control character"),  # C1 NEL
    ("notes", "tab\there", "control character"),
    ("part_number", "PN\u2066X", "bidirectional control"),
    ("part_number", "PN\u00a0X", "not printable"),  # no-break space: printable_only
])
def test_text_fields_refuse_controls_bidi_and_zero_width(rectifier, library, field, text, reason):
    with pytest.raises(InputError, match=reason):
        library.save_part(rectifier(**{field: text}))


def test_notes_may_hold_line_breaks(rectifier, library):
    library.save_part(rectifier(notes="line one\r\nline two\nline three"))
    assert library.get_part("TST-R1")["notes"] == "line one\r\nline two\nline three"


def test_names_are_nfc_normalised(rectifier, library, write_csv):
    decomposed = "Me\u0301tal"  # e + combining acute
    library.save_part(rectifier("PN-\u0065\u0301", manufacturer=decomposed))
    composed = unicodedata.normalize("NFC", "PN-\u0065\u0301")
    part = library.get_part(composed)
    assert part is not None and part["manufacturer"] == "M\u00e9tal"
    # A CSV row naming the same part decomposed updates it rather than adding a twin.
    summary = library.import_csv(write_csv("part_number,kind,price\nPN-e\u0301,rectifier,0.3\n"))
    assert summary.updated == [composed] and not summary.added


def test_the_reviewer_name_follows_the_text_rules(tmp_path, library_path, library, capsys):
    req = tmp_path / "req.toml"
    req.write_text('name = "x"\nrole = "series"\nsupply_min_V = 5.0\nsupply_max_V = 6.0\nload_min_A = 0.1\n'
                   'load_max_A = 0.2\nambient_min_C = 25.0\nambient_max_C = 40.0\n', encoding="utf-8")
    assert main(["check", str(req), "--library", str(library_path), "--reviewer", "A. \u202eKcab"]) == 2
    assert "--reviewer" in capsys.readouterr().err


def test_requirement_and_policy_names_follow_the_text_rules(library):
    from partpick.checks.requirement import requirement_from_toml

    with pytest.raises(InputError, match="name holds a bidirectional control"):
        requirement_from_toml('name = "PSU \u202erev B"\nrole = "series"\n', "r.toml")
    with pytest.raises(InputError, match="description holds a control character"):
        library.save_policy({"name": "house", "description": "ok\x1b[31m red"})


def test_the_windows_problem_list_is_bounded_too(library, write_csv):
    from partpick.gui.commands import _problem_lines

    rows = "".join(f"BAD-{i},rectifier,-1\n" for i in range(80))
    with pytest.raises(InputError) as caught:
        library.import_csv(write_csv("part_number,kind,vrrm_V\n" + rows))
    lines = _problem_lines(caught.value)
    assert len(lines) == 51 and lines[-1] == f"and {len(caught.value.problems) - 50} more"


# -- item 10: contradictory values ------------------------------------------------------------------

@pytest.mark.parametrize("changes, field, words", [
    ({"zzk_ohm": 20.0}, "zzk_ohm", "below zzt_ohm"),
    ({"izk_A": 6e-3}, "izk_A", "not below izt_A"),
])
def test_zener_contradictions_are_refused(zener, changes, field, words):
    problems = part_problems(zener(**changes))
    assert any(name == field and words in message for name, message in problems), problems


@pytest.mark.parametrize("changes, field, words", [
    ({"is_A": 1e-320}, "is_A", "outside 1e-20"),
    ({"n": 0.7}, "n", "outside 1 … 4 for an entered model"),
    # Typical model at 1 A: 1.9·VT·ln(1 + 1/2e-9) + 1·0.04 = 1.9 × 0.025693 × 20.03 + 0.04 ≈ 1.018 V
    # (VT = kT/q at 298.15 K, CODATA 2018 exact k and q); a VF max of 0.9 V is below it.
    ({"vf_max_V": 0.9, "vf_max_at_A": 1.0}, "vf_max_V", "below the typical forward model"),
    ({"tj_max_C": 150.0, "pd_ref_C": 150.0}, "pd_ref_C", "not below tj_max_C"),
    ({"tj_max_C": 150.0, "if_ref_C": 175.0}, "if_ref_C", "not below tj_max_C"),
])
def test_diode_contradictions_are_refused(rectifier, changes, field, words):
    problems = part_problems(rectifier(**changes))
    assert any(name == field and words in message for name, message in problems), problems


@pytest.mark.parametrize("changes, field, words", [
    ({"vrsm_V": 300.0}, "vrsm_V", "below vrrm_V"),  # the rectifier's VRRM is 400 V
    ({"ir_A": 1e-6, "ir_vr_V": 400.0, "ir_t_C": 25.0, "ir_hot_A": 5e-7, "ir_hot_t_C": 125.0}, "ir_hot_A",
     "not above ir_A"),
    ({"ir_A": 1e-6, "ir_vr_V": 400.0, "ir_t_C": 100.0, "ir_hot_A": 5e-5, "ir_hot_t_C": 100.0}, "ir_hot_t_C",
     "not above ir_t_C"),
    ({"rth_ja_K_per_W": 80.0, "rth_ja_area_mm2": 100.0, "rth_ja_large_K_per_W": 60.0,
      "rth_ja_large_area_mm2": 50.0}, "rth_ja_large_area_mm2", "not above rth_ja_area_mm2"),
    ({"rth_ja_K_per_W": 80.0, "rth_ja_area_mm2": 25.0, "rth_ja_large_K_per_W": 95.0,
      "rth_ja_large_area_mm2": 600.0}, "rth_ja_large_K_per_W", "more copper never raises RthJA"),
    ({"rth_ja_K_per_W": 80.0, "rth_jc_K_per_W": 80.0}, "rth_jc_K_per_W", "not below rth_ja_K_per_W"),
    ({"rth_ja_K_per_W": 80.0, "rth_jl_K_per_W": 120.0}, "rth_jl_K_per_W", "not below rth_ja_K_per_W"),
])
def test_contradictions_of_the_schema_2_columns_are_refused(rectifier, changes, field, words):
    problems = part_problems(rectifier(**changes))
    assert any(name == field and words in message for name, message in problems), problems


@pytest.mark.parametrize("changes, field, words", [
    ({"vbr_min_V": 7.5, "vbr_max_V": 7.0}, "vbr_min_V", "above vbr_max_V"),
    ({"vwm_V": 6.8}, "vwm_V", "not below vbr_min_V"),
])
def test_tvs_contradictions_are_refused(changes, field, words):
    # An invented 5 V stand-off TVS (values of the trade's usual ordering VWM < VBR min ≤ VBR max < VC).
    tvs = {"part_number": "TVS-1", "kind": "tvs", "vwm_V": 5.0, "vbr_min_V": 6.4, "vbr_max_V": 7.0, "it_A": 10e-3,
           "vc_V": 9.2, "ipp_A": 43.0, "ppp_W": 400.0, "tj_max_C": 150.0, "vrrm_V": 5.0, "if_avg_A": 1.0,
           "is_A": 1e-12, "n": 1.5, "rs_ohm": 0.1}
    assert [p for p in part_problems(tvs) if p[0] in ("vbr_min_V", "vwm_V")] == []
    problems = part_problems({**tvs, **changes})
    assert any(name == field and words in message for name, message in problems), problems


def test_the_vf_max_rule_against_an_independent_typical_value(rectifier):
    # Independent value: the Shockley equation with Rs evaluated by hand above (≈ 1.018 V at 1 A).
    import math

    vt = 1.380649e-23 * 298.15 / 1.602176634e-19
    typical = 1.9 * vt * math.log(1 + 1.0 / 2e-9) + 1.0 * 0.04
    assert typical == pytest.approx(1.018, abs=2e-3)
    assert not [p for p in part_problems(rectifier(vf_max_V=typical * 1.01, vf_max_at_A=1.0)) if p[0] == "vf_max_V"]
    assert [p for p in part_problems(rectifier(vf_max_V=typical * 0.99, vf_max_at_A=1.0)) if p[0] == "vf_max_V"]


def test_a_fitted_model_may_have_n_below_1_and_the_example_library_is_consistent():
    from partpick.library import example

    with open_library(example.EXAMPLE_COPIES[0]) as library:
        for part in library.list_parts():
            assert part_problems(part) == [], part["part_number"]


# -- item 11: one migration backup per old version -------------------------------------------------

def test_a_failed_migration_backs_up_once_and_says_where(library, library_path, rectifier, monkeypatch):
    library.save_part(rectifier())
    library.close()
    old = models.SCHEMA_VERSION

    def broken(operations):
        raise RuntimeError("step failed")

    monkeypatch.setattr(models, "SCHEMA_VERSION", old + 1)
    monkeypatch.setitem(migrate.MIGRATIONS, old, broken)
    backup = library_path.with_name(f"{library_path.name}.backup-v{old}")
    for attempt in range(3):
        with pytest.raises(LibraryError) as caught:
            open_library(library_path)
        assert str(backup) in str(caught.value)
    folder = sorted(p.name for p in library_path.parent.iterdir() if "backup" in p.name)
    assert folder == [backup.name]  # not .backup2, .backup3, ...

    def works(operations):
        pass

    monkeypatch.setitem(migrate.MIGRATIONS, old, works)
    with open_library(library_path) as migrated:
        assert str(backup) in migrated.note
    with open_library(library_path) as again:
        assert again.note is None
    assert sorted(p.name for p in library_path.parent.iterdir() if "backup" in p.name) == [backup.name]


# -- item 12: the licence -----------------------------------------------------------------------------

def test_the_licence_is_an_spdx_string():
    project = tomllib.loads((REPO / "pyproject.toml").read_text(encoding="utf-8"))["project"]
    assert isinstance(project["license"], str) and project["license"].startswith("LicenseRef-")
    build = tomllib.loads((REPO / "pyproject.toml").read_text(encoding="utf-8"))["build-system"]
    assert any(r.replace(" ", "").startswith("setuptools>=77") for r in build["requires"])  # PEP 639 support

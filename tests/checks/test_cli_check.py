"""`partpick check` and `partpick policy`: exit codes 0 / 3 / 2 / 1 judged on the subject (SPEC §5)."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from checks_builders import make_part
from partpick.cli import main

store = pytest.importorskip("partpick.library.store")

REQ = """\
name = "cli test"
role = "series"
supply_min_V = 12.0
supply_max_V = 14.0
load_min_A = 0.5
load_max_A = 1.0
ambient_min_C = 25.0
ambient_max_C = 50.0
"""


def _diode(number, is_A, package="SMA"):
    # Invented parts, valid library records.
    return make_part(part_number=number, kind="rectifier", package=package, vrrm_V=100.0, if_avg_A=2.0,
                     tj_max_C=150.0, rth_ja_K_per_W=50.0, is_A=is_A, n=1.0, rs_ohm=0.05, model_source="entered",
                     ir_A=1e-6, ir_vr_V=100.0, ir_t_C=25.0, price=0.1, lifecycle="active")


@pytest.fixture
def library(library_location):
    # A SQLite file and, with a server (PARTPICK_TEST_POSTGRES_URL), a PostgreSQL library.
    with store.open_library(library_location, create=True) as lib:
        for part in (_diode("CL-A", 1e-12), _diode("CL-B", 1e-10), _diode("CL-C", 1e-11, package="SMB")):
            lib.save_part(part)
    return str(library_location)


@pytest.fixture
def req_file(tmp_path):
    def write(extra: str = "", name: str = "req.toml"):
        path = tmp_path / name
        path.write_text(REQ + extra, encoding="utf-8")
        return str(path)

    return write


def _json_out(capsysbinary):
    return json.loads(capsysbinary.readouterr().out.decode("utf-8"))


def test_pass_is_exit_0_with_the_json_contract(library, req_file, capsysbinary):
    assert main(["check", req_file(), "--library", library, "--format", "json"]) == 0
    result = _json_out(capsysbinary)
    assert [c["part_number"] for c in result["candidates"]][0] == "CL-B"
    location = result["library"]["location"]
    if "://" in library:  # a server library: its URL, the password hidden
        assert location.startswith("postgresql") and ":partpick@" not in location
    else:
        assert location.endswith("lib.sqlite")
    assert len(result["library"]["content_hash"]) == 64


def test_fail_is_exit_3(library, req_file, capsysbinary):
    assert main(["check", req_file("max_forward_drop_V = 0.3\n"), "--library", library, "--format", "json"]) == 3
    assert _json_out(capsysbinary)["subject_passed"] is False


def test_subject_is_the_part_or_the_substitutes(library, req_file, capsysbinary):
    req = req_file("max_forward_drop_V = 0.72\n")  # CL-A (0.760 V) fails; CL-B (0.642 V), CL-C (0.701 V) pass
    assert main(["check", req, "--library", library, "--format", "json", "--part", "CL-A"]) == 3
    assert [c["part_number"] for c in _json_out(capsysbinary)["candidates"]] == ["CL-A"]
    assert main(["check", req, "--library", library, "--format", "json", "--part", "CL-B"]) == 0
    capsysbinary.readouterr()
    assert main(["check", req, "--library", library, "--format", "json", "--top", "1"]) == 0
    assert len(_json_out(capsysbinary)["candidates"]) == 1
    assert main(["check", req, "--library", library, "--format", "json", "--substitutes-for", "CL-A"]) == 0
    subs = _json_out(capsysbinary)
    assert {c["part_number"] for c in subs["candidates"]} == {"CL-B", "CL-C"}
    assert {c["part_number"]: c["deltas"]["same_package"] for c in subs["candidates"]} == {"CL-B": True,
                                                                                           "CL-C": False}
    strict = req_file("max_forward_drop_V = 0.30\n", "strict.toml")
    assert main(["check", strict, "--library", library, "--format", "json", "--substitutes-for", "CL-A"]) == 3


@pytest.mark.parametrize(("args", "extra", "message"), [
    (["--part", "NOPE"], "", "part 'NOPE' is not in the library"),
    (["--top", "0"], "", "--top: 0 must be at least 1"),
    (["--yield", "100"], "", "--yield: role 'series' has no regulation limit"),
    ([], "supply_max = 3\n", "line 9: supply_max: unknown key (did you mean 'supply_max_V'?)"),
    ([], 'policy = "nope"\n', "policy 'nope' is neither built in nor in the library"),
    (["--part", "CL-A", "--substitutes-for", "CL-B"], "", "cannot be combined"),
    # an earlier version's name of a percentage key (SPEC §4): refused with the new key named
    ([], "current_derating_pct = 70\n", "line 9: current_derating_pct: this key was renamed: write "
                                         "current_limit_pct = 70 instead"),
])
def test_bad_input_is_exit_2_with_one_line(library, req_file, capsys, args, extra, message):
    assert main(["check", req_file(extra), "--library", library, *args]) == 2
    err = capsys.readouterr().err
    assert message in err and err.count("\n") == 1


def test_missing_requirement_file_is_exit_2(library, tmp_path, capsys):
    assert main(["check", str(tmp_path / "none.toml"), "--library", library]) == 2
    assert "none.toml: cannot read the requirement file" in capsys.readouterr().err


def test_a_file_that_is_not_a_library_is_exit_1(req_file, tmp_path, capsys):
    bogus = tmp_path / "notes.sqlite"
    bogus.write_text("not a database", encoding="utf-8")
    assert main(["check", req_file(), "--library", str(bogus)]) == 1
    assert capsys.readouterr().err.startswith("partpick: ")


def test_output_file_and_other_formats(library, req_file, tmp_path, capsysbinary):
    out = tmp_path / "out.json"
    assert main(["check", req_file(), "--library", library, "--format", "json", "--output", str(out)]) == 0
    assert json.loads(out.read_text(encoding="utf-8"))["subject_passed"] is True
    for fmt in ("table", "csv"):
        assert main(["check", req_file(), "--library", library, "--format", fmt]) == 0
        assert b"CL-B" in capsysbinary.readouterr().out


def test_policy_commands(library, tmp_path, req_file, capsys):
    assert main(["policy", "list", "--library", library]) == 0
    listing = capsys.readouterr().out
    for name in ("ratings_only", "commercial", "high_reliability"):
        assert name in listing
    assert main(["policy", "show", "commercial", "--library", library]) == 0
    assert "reverse_pct = 75.0" in capsys.readouterr().out  # the Schottky group
    team = tmp_path / "team.toml"
    team.write_text('name = "team"\ndescription = "ours"\n[pn]\ncurrent_pct = 20\n', encoding="utf-8")
    assert main(["policy", "import", str(team), "--library", library]) == 0
    capsys.readouterr()
    # The stored policy is used by `check`: 1 A against 20 % of 1.6 A fails.
    assert main(["check", req_file('policy = "team"\n'), "--library", library, "--format", "json"]) == 3
    capsys.readouterr()
    exported = tmp_path / "exported.toml"
    assert main(["policy", "export", "team", "--library", library, "--output", str(exported)]) == 0
    assert "current_pct = 20.0" in exported.read_text(encoding="utf-8")
    clash = tmp_path / "clash.toml"
    clash.write_text('name = "commercial"\n', encoding="utf-8")
    assert main(["policy", "import", str(clash), "--library", library]) == 2
    assert "is a built-in policy" in capsys.readouterr().err
    assert main(["policy", "show", "comercial", "--library", library]) == 2
    assert "did you mean 'commercial'" in capsys.readouterr().err
    broken = tmp_path / "broken.toml"
    broken.write_text('name = "b"\n[pn]\nreverse_pct = 150\n', encoding="utf-8")
    assert main(["policy", "import", str(broken), "--library", library]) == 2
    assert "broken.toml, line 3: pn.reverse_pct: 150 is out of range" in capsys.readouterr().err


def test_end_to_end_process_exit_codes(library, req_file):
    ok = subprocess.run([sys.executable, "-m", "partpick", "check", req_file(), "--library", library, "--format",
                         "json"], capture_output=True, text=True)
    assert ok.returncode == 0, ok.stderr
    assert json.loads(ok.stdout)["subject_passed"] is True
    bad = subprocess.run([sys.executable, "-m", "partpick", "check", req_file("max_leakage_A = -1\n"), "--library",
                          library], capture_output=True, text=True)
    assert bad.returncode == 2 and bad.stdout == ""


def test_unwritable_output_and_unreadable_policy_file(library, req_file, tmp_path, capsys):
    assert main(["check", req_file(), "--library", library, "--output", str(tmp_path / "no" / "out.txt")]) == 2
    assert "--output" in capsys.readouterr().err
    assert main(["policy", "import", str(tmp_path / "absent.toml"), "--library", library]) == 2
    assert "absent.toml: cannot read the policy file" in capsys.readouterr().err
    assert main(["policy", "--library", library]) == 2


def test_a_damaged_stored_policy_is_exit_1(library, req_file, capsys):
    with store.open_library(library) as lib:
        lib.save_policy({"name": "bad", "groups": {"pn": {"reverse_pct": 500}}})
    assert main(["check", req_file(), "--library", library]) == 1
    assert "stored policy 'bad'" in capsys.readouterr().err


EXAMPLES = sorted((__import__("pathlib").Path(__file__).resolve().parents[2] / "resources").glob("requirements/*.toml"))


@pytest.fixture(scope="module")
def example_library(tmp_path_factory):
    from pathlib import Path

    csv = Path(__file__).resolve().parents[2] / "resources" / "example_library" / "parts.csv"
    if not csv.exists():
        pytest.skip("the example library is not there")
    path = tmp_path_factory.mktemp("example") / "example.sqlite"
    with store.open_library(path, create=True) as lib:
        lib.import_csv(csv)
    return str(path)


@pytest.mark.parametrize("requirement", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_example_requirements_on_the_example_library(example_library, requirement, capsysbinary):
    code = main(["check", str(requirement), "--library", example_library, "--format", "json"])
    text = capsysbinary.readouterr().out.decode("utf-8")
    result = json.loads(text)  # strict JSON: json.loads accepts NaN, so look for it too
    assert "NaN" not in text and "Infinity" not in text
    assert code == (0 if result["subject_passed"] else 3)
    assert result["candidates"], "the example library has candidates for every example requirement"
    ranks = [c["rank"] for c in result["candidates"]]
    assert ranks == list(range(1, len(ranks) + 1))
    passing = [c["passed"] for c in result["candidates"]]
    assert passing == sorted(passing, reverse=True)  # passing parts first
    for cand in result["candidates"]:
        for check in cand["checks"]:
            assert (check["value"] is None) == ("reason" in check)
            assert check["corner"] is not None or check["name"] == "data_missing" or "reason" in check
            _holds_the_margin_rule(check, result["requirement"]["role"])
        assert cand["passed"] == (cand["failed_checks"] == [])


def _holds_the_margin_rule(check, role):
    """SPEC §4 "Margins", recomputed from the check's own value, limit and corner (not from the checker)."""
    value, limit, margin, pct = check["value"], check["limit"], check["margin"], check["margin_pct"]
    if role == "series" and check["name"] == "reverse_runaway":
        return  # its own rule (runaway ambient in K, share of RthJA)
    if check.get("reason") == "ambient at or above the limit":
        assert check["unit"] == "°C" and pct == -100.0 and not check["passed"]
        assert check["limit"] <= check["corner"]["ambient_C"]
        return
    if value is None or limit is None:
        assert margin is None
        return
    assert abs(margin) == pytest.approx(abs(limit - value), rel=1e-9, abs=1e-12), check
    assert (margin >= -1e-12) == check["passed"] or check["name"] == "data_missing", check
    if check["unit"] == "°C":  # the share of the allowed rise, limit − ambient at that corner
        budget = limit - check["corner"]["ambient_C"]
    else:
        budget = abs(limit)
    expected = 100.0 * margin / budget if budget > 0 else (0.0 if margin >= 0 else -100.0)
    assert pct == pytest.approx(expected, rel=1e-9, abs=1e-9), check

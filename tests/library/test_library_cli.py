"""`partpick library ...`: outputs and exit codes (SPEC §5: 0 done, 2 bad input, 1 library unusable)."""

import json
import sqlite3

import pytest

from partpick.cli import main
from partpick.library.store import open_library

HEADER = "part_number,kind,vrrm_V,if_avg_A,is_A,n,rs_ohm,price"
GOOD = HEADER + "\nTST-2,rectifier,400,1,2e-9,1.9,0.04,0.05\nTST-1,schottky,40,3,10u,1.05,20m,\n"


@pytest.fixture
def made(library_location, capsys):
    # A new SQLite file and, with a server (PARTPICK_TEST_POSTGRES_URL), the PostgreSQL test database.
    path = library_location
    assert main(["library", "new", str(path)]) == 0
    assert capsys.readouterr().out.startswith("created library ")
    return path


def _one_line(err: str) -> str:
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    return lines[0]


def test_new_refuses_an_existing_file(made, capsys):
    assert main(["library", "new", str(made)]) == 2
    assert "already exists" in _one_line(capsys.readouterr().err)


def test_import_list_export(made, write_csv, capsys, tmp_path):
    csv_path = write_csv(GOOD)
    assert main(["library", "import", str(csv_path), "--dry-run", "--library", str(made)]) == 0
    assert "dry run, nothing written; would have added 2" in capsys.readouterr().out
    assert main(["library", "import", str(csv_path), "--library", str(made)]) == 0
    assert capsys.readouterr().out.strip().endswith("added 2, updated 0, unchanged 0")

    assert main(["library", "list", "--library", str(made)]) == 0
    table = capsys.readouterr().out.splitlines()
    assert table[0].split()[:2] == ["Part", "number"]
    assert table[1].startswith("TST-1") and "40 V" in table[1] and "3 A" in table[1]
    assert table[2].startswith("TST-2") and "400 V" in table[2]
    assert table[-1].startswith("2 parts in ")

    assert main(["library", "list", "--format", "json", "--library", str(made)]) == 0
    records = json.loads(capsys.readouterr().out)
    assert [r["part_number"] for r in records] == ["TST-1", "TST-2"]
    assert records[0]["rs_ohm"] == 0.02 and records[0]["price"] is None and records[0]["vf_points"] == []
    assert "fit_residual_mV" not in records[0]

    out = tmp_path / "out.csv"
    assert main(["library", "export", "--output", str(out), "--library", str(made)]) == 0
    assert main(["library", "export", "--library", str(made)]) == 0
    with open(out, encoding="utf-8", newline="") as written:
        assert capsys.readouterr().out == written.read()
    assert out.read_text(encoding="utf-8").splitlines()[1].startswith("TST-1,schottky")


def test_global_library_option_before_the_command(made, capsys):
    assert main(["--library", str(made), "library", "list", "--format", "json"]) == 0
    assert json.loads(capsys.readouterr().out) == []


def test_bad_csv_is_exit_2_with_one_line(made, write_csv, capsys):
    csv_path = write_csv(HEADER + "\nTST-1,rectifier,4.7kk,1,2e-9,1.9,0.04,\nTST-2,zener,1,1,,,,nan\n")
    assert main(["library", "import", str(csv_path), "--library", str(made)]) == 2
    line = _one_line(capsys.readouterr().err)
    assert line.startswith(f"partpick: {csv_path}: 2 bad rows, nothing imported: line 2, column vrrm_V: '4.7kk'")
    assert "line 3, column price: 'nan' is not a number" in line
    with open_library(made) as library:
        assert library.list_parts() == []


@pytest.mark.parametrize("argv", [
    ["library"],
    ["library", "list", "--format", "xml"],
    ["library", "import"],
])
def test_bad_usage_is_exit_2(argv, capsys):
    assert main(argv) == 2
    _one_line(capsys.readouterr().err)


def test_missing_csv_is_exit_2(made, tmp_path, capsys):
    assert main(["library", "import", str(tmp_path / "none.csv"), "--library", str(made)]) == 2
    assert "cannot read" in _one_line(capsys.readouterr().err)


def test_unusable_library_is_exit_1(tmp_path, capsys):
    not_library = tmp_path / "photos.sqlite"
    connection = sqlite3.connect(not_library)
    connection.execute("CREATE TABLE photos (id INTEGER)")
    connection.close()
    assert main(["library", "list", "--library", str(not_library)]) == 1
    assert "is not a partpick library" in _one_line(capsys.readouterr().err)
    assert main(["library", "list", "--library", str(tmp_path / "missing.sqlite")]) == 1
    assert "no library at" in _one_line(capsys.readouterr().err)


def test_default_library_is_the_users_own(tmp_path, monkeypatch, capsys):
    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path / "data"))
    assert main(["library", "list", "--format", "json"]) == 0
    assert len(json.loads(capsys.readouterr().out)) >= 60
    assert (tmp_path / "data" / "partpick" / "library.sqlite").is_file()

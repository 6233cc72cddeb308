"""Never lose or half-write a library: atomic imports, kills, two writers, foreign and newer files."""

import os
import signal
import sqlite3
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

from partpick.errors import InputError, LibraryError
from partpick.library import migrate, models
from partpick.library.store import open_library

HEADER = "part_number,kind,vrrm_V,if_avg_A,is_A,n,rs_ohm"
SQLITE_HEADER = b"SQLite format 3\x00"  # sqlite.org "Database File Format", section 1.3.1


def _rows(prefix: str, count: int) -> str:
    return "".join(f"{prefix}-{i:05d},rectifier,400,1,2e-9,1.9,0.04\n" for i in range(count))


def _closed_bytes(path) -> bytes:
    return path.read_bytes()


def test_bad_row_among_good_ones_leaves_file_byte_for_byte(library, library_path, rectifier, write_csv):
    library.save_part(rectifier("TST-KEEP"))
    library.close()
    before = library_path.read_bytes()
    text = HEADER + "\n" + _rows("TST-NEW", 300) + "TST-BAD,rectifier,-400,1,2e-9,1.9,0.04\n" + _rows("TST-MORE", 300)
    with open_library(library_path) as reopened:
        with pytest.raises(InputError, match=r"line 302, column vrrm_V: part TST-BAD: vrrm_V = -400 V is out of"):
            reopened.import_csv(write_csv(text))
        # An update of the kept part in a bad file is not applied either.
        with pytest.raises(InputError):
            reopened.import_csv(write_csv(HEADER + "\nTST-KEEP,rectifier,999,1,2e-9,1.9,0.04\nX,zener\n"))
    assert library_path.read_bytes() == before
    assert not (library_path.parent / (library_path.name + "-wal")).exists()


_CHILD_IMPORT = textwrap.dedent("""
    import sys, time
    from pathlib import Path
    from partpick.library.store import open_library
    library, csv_path, marker, pause = sys.argv[1], sys.argv[2], Path(sys.argv[3]), float(sys.argv[4])
    lib = open_library(library)
    def progress(done, total):
        # Writing has started and at least one chunk is in the open transaction.
        if done > 2 * total // 3 + 1000 and not marker.exists():
            marker.write_text("writing")
            time.sleep(pause)
    print(lib.import_csv(csv_path, progress=progress).text())
    lib.close()
""")


def _start_import(library_path, csv_path, marker, pause):
    return subprocess.Popen(
        [sys.executable, "-c", _CHILD_IMPORT, str(library_path), str(csv_path), str(marker), str(pause)],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
    )


def _wait_for(marker, process, timeout=60.0):
    deadline = time.monotonic() + timeout
    while not marker.exists():
        if process.poll() is not None:
            raise AssertionError(f"child ended early: {process.communicate()}")
        if time.monotonic() > deadline:
            process.kill()
            raise AssertionError("child never reached the write phase")
        time.sleep(0.02)


def test_kill_in_the_middle_of_an_import_leaves_the_library_as_it_was(library, library_path, rectifier,
                                                                     write_csv, tmp_path):
    library.save_part(rectifier("TST-KEEP"))
    before = library.list_parts()
    library.close()
    csv_path = write_csv(HEADER + "\n" + _rows("TST-K", 3000) + "TST-KEEP,rectifier,999,1,2e-9,1.9,0.04\n")
    marker = tmp_path / "writing"
    child = _start_import(library_path, csv_path, marker, pause=60)
    _wait_for(marker, child)
    os.kill(child.pid, signal.SIGKILL)
    child.wait(timeout=30)
    assert child.returncode == -signal.SIGKILL
    with open_library(library_path) as reopened:
        assert reopened.list_parts() == before
        # The lock died with the process: the same import now goes through whole.
        summary = reopened.import_csv(csv_path)
        assert len(summary.added) == 3000 and summary.updated == ["TST-KEEP"]
    check = sqlite3.connect(library_path)
    assert check.execute("PRAGMA integrity_check").fetchone() == ("ok",)
    check.close()


def test_two_processes_writing_at_once(library, library_path, rectifier, write_csv, tmp_path):
    library.close()
    csv_path = write_csv(HEADER + "\n" + _rows("TST-A", 2000))
    marker = tmp_path / "writing"
    child = _start_import(library_path, csv_path, marker, pause=6)
    try:
        _wait_for(marker, child)
        # While the child holds the write lock: readers still read (WAL), a writer is told it is busy.
        with open_library(library_path, busy_timeout_s=0.3) as impatient:
            assert impatient.list_parts() == []
            started = time.monotonic()
            with pytest.raises(LibraryError, match=r"is busy: another program is writing to it"):
                impatient.save_part(rectifier("TST-B"))
            assert time.monotonic() - started < 5.0
        # A patient writer waits for the child's commit and then writes.
        with open_library(library_path, busy_timeout_s=30) as patient:
            patient.save_part(rectifier("TST-B"))
        out, err = child.communicate(timeout=60)
    finally:
        if child.poll() is None:
            child.kill()
    assert child.returncode == 0, err
    assert "added 2000" in out
    with open_library(library_path) as reopened:
        numbers = [p["part_number"] for p in reopened.list_parts()]
    assert len(numbers) == 2001 and "TST-B" in numbers


@pytest.fixture
def foreign_files(tmp_path):
    text = tmp_path / "notes.csv"
    text.write_text("part_number,kind\nX,signal\n")
    empty = tmp_path / "empty.sqlite"
    empty.write_bytes(b"")
    other = tmp_path / "other.sqlite"
    connection = sqlite3.connect(other)
    connection.execute("CREATE TABLE photos (id INTEGER PRIMARY KEY, name TEXT)")
    connection.execute("INSERT INTO photos (name) VALUES ('cat')")
    connection.commit()
    connection.close()
    fake = tmp_path / "fake.sqlite"
    fake.write_bytes(SQLITE_HEADER + b"\x00" * 200)  # right magic, broken file
    return {"text": text, "empty": empty, "other": other, "fake": fake}


@pytest.mark.parametrize("name, message", [
    ("text", r"is not a partpick library \(not an SQLite database file\); left untouched"),
    ("empty", r"is not a partpick library \(not an SQLite database file\)"),
    ("other", r"is not a partpick library \(no schema version record\); left untouched"),
    ("fake", r"is not a partpick library|cannot read library"),
])
@pytest.mark.parametrize("create", [False, True])
def test_not_a_library_is_refused_and_untouched(foreign_files, name, message, create):
    path = foreign_files[name]
    before = path.read_bytes()
    listing = sorted(os.listdir(path.parent))
    with pytest.raises(LibraryError, match=message):
        open_library(path, create=create)
    assert path.read_bytes() == before
    assert sorted(os.listdir(path.parent)) == listing  # no -wal, -shm or backup left behind


def test_folder_and_missing_file(tmp_path):
    with pytest.raises(LibraryError, match="is a folder, not a partpick library"):
        open_library(tmp_path)
    with pytest.raises(LibraryError, match=r"no library at .*missing.sqlite \(create one with"):
        open_library(tmp_path / "missing.sqlite")
    assert not (tmp_path / "missing.sqlite").exists()
    with pytest.raises(LibraryError, match="folder .* does not exist"):
        open_library(tmp_path / "no" / "such.sqlite", create=True)


def _dump(path) -> list[str]:
    connection = sqlite3.connect(path)
    try:
        return list(connection.iterdump())
    finally:
        connection.close()


def _set_version(path, version):
    connection = sqlite3.connect(path)
    connection.execute("UPDATE schema_version SET version = ?", (version,))
    connection.commit()
    connection.close()


def test_newer_schema_is_refused_and_untouched(library, library_path, rectifier):
    library.save_part(rectifier())
    library.close()
    _set_version(library_path, models.SCHEMA_VERSION + 1)
    before = library_path.read_bytes()
    with pytest.raises(LibraryError, match=rf"written by a newer partpick \(schema {models.SCHEMA_VERSION + 1}; "
                                           rf"this partpick reads up to schema {models.SCHEMA_VERSION}\)"):
        open_library(library_path)
    assert library_path.read_bytes() == before


def test_older_schema_is_backed_up_then_migrated(library, library_path, rectifier, monkeypatch):
    library.save_part(rectifier())
    library.close()
    old_dump = _dump(library_path)
    old = models.SCHEMA_VERSION
    applied = []

    def add_supplier_code(operations):
        # A step as a developer would write one: portable ALTER TABLE through alembic.
        import sqlalchemy as sa

        operations.add_column("part", sa.Column("supplier_code", sa.String(32)))
        applied.append(old)

    monkeypatch.setattr(models, "SCHEMA_VERSION", old + 1)
    monkeypatch.setitem(migrate.MIGRATIONS, old, add_supplier_code)
    with open_library(library_path) as migrated:
        assert migrated.note.startswith(f"migrated library from schema {old} to {old + 1}; backup of the old file at")
        assert migrated.get_part("TST-R1")["vrrm_V"] == 400.0
    assert applied == [old]
    backup = library_path.with_name(f"{library_path.name}.backup-v{old}")
    assert f"backup of the old file at {backup}" in migrated.note
    assert _dump(backup) == old_dump  # the backup holds the old library, schema and rows
    connection = sqlite3.connect(library_path)
    assert connection.execute("SELECT version FROM schema_version").fetchone() == (old + 1,)
    assert "supplier_code" in [row[1] for row in connection.execute("PRAGMA table_info(part)")]
    connection.close()
    with open_library(library_path) as again:  # already current: nothing more to do
        assert again.note is None


def test_failed_migration_rolls_back(library, library_path, rectifier, monkeypatch):
    library.save_part(rectifier())
    library.close()
    old = models.SCHEMA_VERSION

    def broken(operations):
        import sqlalchemy as sa

        operations.add_column("part", sa.Column("half_done", sa.Integer))
        raise RuntimeError("step failed")

    monkeypatch.setattr(models, "SCHEMA_VERSION", old + 1)
    monkeypatch.setitem(migrate.MIGRATIONS, old, broken)
    with pytest.raises(LibraryError, match=r"from schema \d+ failed \(step failed\); the library is unchanged; backup"):
        open_library(library_path)
    monkeypatch.setattr(models, "SCHEMA_VERSION", old)
    connection = sqlite3.connect(library_path)
    assert connection.execute("SELECT version FROM schema_version").fetchone() == (old,)
    assert "half_done" not in [row[1] for row in connection.execute("PRAGMA table_info(part)")]
    connection.close()


def test_first_run_copies_the_bundled_example(tmp_path, monkeypatch):
    from partpick.library import location

    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path / "data"))
    target = location.user_library_path()
    assert str(target).startswith(str(tmp_path / "data"))
    assert not target.exists()
    with open_library(None) as library:
        assert library.location == str(target)
        assert len(library.list_parts()) >= 60
    with open_library(None) as library:  # the second run opens the same file
        library.delete_part(library.list_parts()[0]["part_number"])
        count = len(library.list_parts())
    with open_library(None) as library:
        assert len(library.list_parts()) == count


def test_schema1_library_gains_the_schema2_columns(tmp_path):
    # tests/library/data/schema1.sqlite was written by partpick at schema 1 (five example parts).
    import shutil

    path = tmp_path / "team.sqlite"
    shutil.copyfile(Path(__file__).parent / "data" / "schema1.sqlite", path)
    with open_library(path) as migrated:
        assert migrated.note.startswith("migrated library from schema 1 to 2")
        parts = {p["part_number"]: p for p in migrated.list_parts()}
        assert len(parts) == 5
        assert parts["QFS-101"]["vrsm_V"] is None and parts["QFS-101"]["junction"] is None
        assert parts["QFS-101"]["vrrm_V"] > 0
        assert all(parts[number]["vf_points"] for number in ("QFS-101", "MGR1A-0050"))  # rebuilt table kept them
        # the widened kind constraint takes the new kinds, the new choice columns are constrained
        bridge = dict(migrated.get_part("QFS-101"), part_number="TST-BR1", kind="bridge", junction="pn")
        migrated.save_part(bridge)
        assert migrated.get_part("TST-BR1")["junction"] == "pn"
    connection = sqlite3.connect(path)
    try:
        assert connection.execute("SELECT version FROM schema_version").fetchone() == (2,)
        with pytest.raises(sqlite3.IntegrityError):
            connection.execute("UPDATE part SET junction = 'germanium' WHERE part_number = 'TST-BR1'")
    finally:
        connection.close()

"""Outputs and files (SPEC §5): nothing is ever lost or replaced by mistake.

Every command that writes a file is tried against the targets that used to go
wrong: a symbolic link, a FIFO, a device node, the open library, another
database, the command's own input, a full disk, a full stdout, a terminal, and
a SIGKILL in the middle of a write. Device nodes are private ones made with
``os.mknod`` in the test's folder (never a system device).
"""

from __future__ import annotations

import errno
import os
import signal
import sqlite3
import stat
import subprocess
import sys
import textwrap
import threading
from pathlib import Path

import pytest

from partpick.cli import main
from partpick.errors import InputError, OutputError
from partpick.library.store import open_library
from partpick.outputs import prepare_output, write_output

ROOT = hasattr(os, "geteuid") and os.geteuid() == 0

REQ = """\
name = "output test"
role = "series"
supply_min_V = 12.0
supply_max_V = 14.0
load_min_A = 0.5
load_max_A = 1.0
ambient_min_C = 25.0
ambient_max_C = 50.0
"""

POLICY = """\
name = "house_rules"
description = "invented for the output tests"
[pn]
current_pct = 70
"""


def _diode(number: str, is_A: float) -> dict:
    # Invented parts.
    return {"part_number": number, "kind": "rectifier", "package": "SMA", "vrrm_V": 100.0, "if_avg_A": 2.0,
            "tj_max_C": 150.0, "rth_ja_K_per_W": 50.0, "is_A": is_A, "n": 1.0, "rs_ohm": 0.05,
            "model_source": "entered", "price": 0.1, "lifecycle": "active"}


@pytest.fixture
def lib(tmp_path) -> Path:
    path = tmp_path / "lib.sqlite"
    with open_library(path, create=True) as library:
        for index, is_A in enumerate((1e-12, 1e-10, 1e-11)):
            library.save_part(_diode(f"OUT-{index}", is_A))
    (tmp_path / "policy.toml").write_text(POLICY, encoding="utf-8")
    assert main(["policy", "import", str(tmp_path / "policy.toml"), "--library", str(path)]) == 0
    return path


@pytest.fixture
def req(tmp_path) -> Path:
    path = tmp_path / "req.toml"
    path.write_text(REQ, encoding="utf-8")
    return path


def _commands(lib: Path, req: Path, output: Path) -> dict[str, list[str]]:
    """Every command that writes an output file, writing to ``output``."""
    return {
        "check": ["check", str(req), "--library", str(lib), "--format", "json", "--output", str(output)],
        "library export": ["library", "export", "--library", str(lib), "--output", str(output)],
        "policy export": ["policy", "export", "house_rules", "--library", str(lib), "--output", str(output)],
    }


def _snapshot(path: Path) -> bytes:
    return path.read_bytes()


def _read_fifo(path: Path, sink: list, limit: int | None = None) -> threading.Thread:
    def reader():
        with open(path, "rb") as handle:
            sink.append(handle.read() if limit is None else handle.read(limit))

    thread = threading.Thread(target=reader, daemon=True)
    thread.start()
    return thread


# -- item 2: links, FIFOs and devices ---------------------------------------------------------------

@pytest.mark.parametrize("command", ["check", "library export", "policy export"])
def test_a_symlink_output_is_followed_the_link_stays(lib, req, tmp_path, command, capsys):
    target = tmp_path / "real" / "out.txt"
    target.parent.mkdir()
    target.write_text("old\n")
    link = tmp_path / "link.txt"
    link.symlink_to(target)
    code = main(_commands(lib, req, link)[command])
    assert code in (0, 3), capsys.readouterr().err
    assert link.is_symlink() and os.readlink(link) == str(target)  # the link is still the link
    assert target.read_text() != "old\n" and len(target.read_bytes()) > 20  # and its target was written
    assert [p.name for p in target.parent.iterdir()] == ["out.txt"]  # no temporary file left


def test_a_dangling_symlink_creates_its_target(lib, req, tmp_path):
    target = tmp_path / "made.csv"
    link = tmp_path / "link.csv"
    link.symlink_to(target)
    assert main(["library", "export", "--library", str(lib), "--output", str(link)]) == 0
    assert link.is_symlink() and target.read_text(encoding="utf-8").startswith("part_number,")


@pytest.mark.parametrize("command", ["check", "library export", "policy export"])
def test_a_fifo_output_is_written_to_not_replaced(lib, req, tmp_path, command):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    received: list = []
    thread = _read_fifo(fifo, received)
    code = main(_commands(lib, req, fifo)[command])
    thread.join(timeout=30)
    assert code in (0, 3)
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode)  # still the FIFO
    assert received and len(received[0]) > 20  # the reader got the whole output
    if command == "library export":
        assert received[0].startswith(b"part_number,")


@pytest.mark.skipif(not ROOT, reason="os.mknod of a character device needs root")
def test_a_private_device_node_is_written_directly_never_replaced(lib, req, tmp_path):
    # A private node with the numbers of the null device (Linux devices.txt: char 1:3), made in
    # the test's own folder.
    node = tmp_path / "nulldev"
    os.mknod(node, 0o600 | stat.S_IFCHR, os.makedev(1, 3))
    before = os.lstat(node)
    for argv in _commands(lib, req, node).values():
        assert main(argv) in (0, 3)
        after = os.lstat(node)
        assert stat.S_ISCHR(after.st_mode) and after.st_rdev == before.st_rdev and after.st_ino == before.st_ino


@pytest.mark.skipif(not ROOT, reason="os.mknod of a character device needs root")
def test_a_full_device_as_output_is_exit_1_naming_the_file(lib, req, capsys, tmp_path):
    # A private node with the numbers of the full device (Linux devices.txt: char 1:7), which fails
    # every write with ENOSPC, made in the test's own folder: a regression that replaced its output
    # would replace this node, never the system's /dev/full. It is written directly (not replaced)
    # and the failure is one line naming the file.
    node = tmp_path / "fulldev"
    os.mknod(node, 0o600 | stat.S_IFCHR, os.makedev(1, 7))
    before = os.lstat(node)
    assert main(["library", "export", "--library", str(lib), "--output", str(node)]) == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and str(node) in err and "No space left" in err
    after = os.lstat(node)
    assert stat.S_ISCHR(after.st_mode) and after.st_ino == before.st_ino


def test_a_reader_that_goes_away_is_one_line_not_a_traceback(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    received: list = []
    thread = _read_fifo(fifo, received, limit=1)  # reads one byte, then closes its end
    target = prepare_output(fifo)
    with pytest.raises(OutputError, match=r"cannot write .*pipe: Broken pipe"):
        target.write(b"x" * (4 << 20))  # more than any pipe buffer
    thread.join(timeout=30)
    assert received == [b"x"]


# -- item 3: refused before anything runs -------------------------------------------------------------

@pytest.mark.parametrize("command", ["check", "library export", "policy export"])
def test_output_onto_the_open_library_is_refused_before_anything_runs(lib, req, command, capsys):
    before = _snapshot(lib)
    assert main(_commands(lib, req, lib)[command]) == 2
    err = capsys.readouterr().err
    assert "open library" in err and err.count("\n") == 1
    assert _snapshot(lib) == before
    with open_library(lib) as library:
        assert len(library.list_parts()) == 3


@pytest.mark.parametrize("command", ["check", "library export", "policy export"])
def test_output_onto_another_database_is_refused(lib, req, tmp_path, command, capsys):
    other = tmp_path / "other.sqlite"
    connection = sqlite3.connect(other)
    connection.execute("CREATE TABLE precious (x)")
    connection.commit()
    connection.close()
    before = _snapshot(other)
    assert main(_commands(lib, req, other)[command]) == 2
    assert "SQLite database" in capsys.readouterr().err
    assert _snapshot(other) == before


def test_output_onto_the_library_through_a_link_or_its_wal_is_refused(lib, req, tmp_path, capsys):
    link = tmp_path / "innocent.json"
    link.symlink_to(lib)
    before = _snapshot(lib)
    assert main(_commands(lib, req, link)["check"]) == 2
    assert main(_commands(lib, req, Path(f"{lib}-wal"))["check"]) == 2
    assert _snapshot(lib) == before and not Path(f"{lib}-wal").exists()


def test_output_onto_the_requirement_input_is_refused(lib, req, capsys):
    before = req.read_bytes()
    assert main(["check", str(req), "--library", str(lib), "--output", str(req)]) == 2
    assert "inputs" in capsys.readouterr().err
    assert req.read_bytes() == before


def test_output_into_a_missing_folder_or_onto_a_folder_is_bad_input(lib, req, tmp_path, capsys):
    assert main(_commands(lib, req, tmp_path / "absent" / "x.json")["check"]) == 2
    assert main(_commands(lib, req, tmp_path)["library export"]) == 2


# -- item 4: atomic replacement -----------------------------------------------------------------------

def test_replacing_keeps_the_mode_and_leaves_no_temporary_file(lib, req, tmp_path):
    out = tmp_path / "reports" / "shortlist.json"
    out.parent.mkdir()
    out.write_text("old")
    os.chmod(out, 0o640)
    assert main(_commands(lib, req, out)["check"]) in (0, 3)
    assert stat.S_IMODE(os.stat(out).st_mode) == 0o640
    assert sorted(p.name for p in out.parent.iterdir()) == ["shortlist.json"]


@pytest.mark.skipif(not ROOT, reason="mounting a tmpfs needs root")
def test_a_full_disk_keeps_the_old_report_and_leaves_no_partial_file(lib, req, tmp_path, capsys):
    small = tmp_path / "small"
    small.mkdir()
    result = subprocess.run(["mount", "-t", "tmpfs", "-o", "size=64k", "tmpfs", str(small)], capture_output=True)
    if result.returncode != 0:
        pytest.skip(f"cannot mount a tmpfs here: {result.stderr.decode().strip()}")
    try:
        out = small / "report.html"
        out.write_bytes(b"<html>the previous report</html>")
        code = main(["check", str(req), "--library", str(lib), "--format", "html", "--output", str(out)])
        err = capsys.readouterr().err
        assert code == 1, err
        assert err.count("\n") == 1 and "report.html" in err and "No space left" in err
        assert out.read_bytes() == b"<html>the previous report</html>"
        assert sorted(p.name for p in small.iterdir()) == ["report.html"]
    finally:
        subprocess.run(["umount", str(small)], check=False)


_KILL_SCRIPT = textwrap.dedent("""
    import os, sys, time
    import partpick.outputs as outputs
    real_fsync = os.fsync
    def slow_fsync(fd):
        sys.stdout.write("writing\\n"); sys.stdout.flush()
        time.sleep(60)  # killed here, the new report half on its way
        real_fsync(fd)
    outputs.os.fsync = slow_fsync
    from partpick.cli import main
    sys.exit(main(sys.argv[1:]))
""")


def test_sigkill_during_a_report_write_leaves_the_old_report(lib, req, tmp_path):
    out = tmp_path / "out" / "report.html"
    out.parent.mkdir()
    out.write_bytes(b"<html>the previous report</html>")
    process = subprocess.Popen(
        [sys.executable, "-c", _KILL_SCRIPT, "check", str(req), "--library", str(lib), "--format", "html",
         "--output", str(out)],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, env={**os.environ, "QT_QPA_PLATFORM": "offscreen"})
    try:
        line = process.stdout.readline()
        assert line == b"writing\n", process.stderr.read()
        process.send_signal(signal.SIGKILL)
        process.wait(timeout=30)
    finally:
        if process.poll() is None:
            process.kill()
    assert process.returncode == -signal.SIGKILL
    assert out.read_bytes() == b"<html>the previous report</html>"
    assert sorted(p.name for p in out.parent.iterdir()) == ["report.html"]  # no partial file beside it


# -- item 8: stdout and terminals ---------------------------------------------------------------------

@pytest.mark.skipif(not ROOT, reason="os.mknod of a character device needs root")
@pytest.mark.parametrize("argv", [["library", "list"], ["library", "export"], ["policy", "list"], ["check", "REQ"]])
def test_a_full_stdout_is_exit_1_with_one_line(lib, req, argv, tmp_path):
    argv = [str(req) if a == "REQ" else a for a in argv] + ["--library", str(lib)]
    node = tmp_path / "fulldev"  # a private full device (char 1:7), as above
    os.mknod(node, 0o600 | stat.S_IFCHR, os.makedev(1, 7))
    with open(node, "wb") as full:
        result = subprocess.run([sys.executable, "-m", "partpick", *argv], stdout=full, stderr=subprocess.PIPE,
                                env={**os.environ, "QT_QPA_PLATFORM": "offscreen"})
    err = result.stderr.decode()
    assert result.returncode == 1, err
    assert err.count("\n") == 1 and "standard output" in err and "Traceback" not in err


def test_pdf_to_a_terminal_is_refused_output_required(lib, req, tmp_path):
    master, slave = os.openpty()
    try:
        result = subprocess.run([sys.executable, "-m", "partpick", "check", str(req), "--library", str(lib),
                                 "--format", "pdf"], stdout=slave, stderr=subprocess.PIPE, timeout=120)
        assert result.returncode == 2
        assert "--output" in result.stderr.decode()
        with pytest.raises(InputError, match="terminal"):
            prepare_output(os.ttyname(slave), binary=True)
        # Text may go to a terminal.
        assert prepare_output(os.ttyname(slave)).regular is False
    finally:
        os.close(master)
        os.close(slave)


def test_terminal_output_never_prints_a_raw_control_character(tmp_path):
    # A damaged library (written behind partpick's back) holds an escape sequence that would retitle
    # the terminal (ECMA-48 OSC 0) in a part number.
    path = tmp_path / "lib.sqlite"
    with open_library(path, create=True) as library:
        library.save_part(_diode("ESC-1", 1e-12))
    connection = sqlite3.connect(path)
    with connection:
        connection.execute("UPDATE part SET manufacturer = ?, part_number = ?",
                           ("evil\x1b]0;owned\x07", "ESC-1\x1b[2J"))
    connection.close()
    master, slave = os.openpty()
    try:
        result = subprocess.run([sys.executable, "-m", "partpick", "library", "list", "--library", str(path)],
                                stdout=slave, stderr=subprocess.PIPE, timeout=120)
        os.close(slave)
        slave = None
        chunks = []
        while True:
            try:
                chunk = os.read(master, 65536)
            except OSError as error:  # EIO once the child's end is closed
                assert error.errno == errno.EIO
                break
            if not chunk:
                break
            chunks.append(chunk)
    finally:
        os.close(master)
        if slave is not None:
            os.close(slave)
    shown = b"".join(chunks).decode("utf-8")
    assert result.returncode == 0, result.stderr
    assert "\x1b" not in shown and "\x07" not in shown
    assert "\\x1b" in shown  # shown escaped instead

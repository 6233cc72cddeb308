"""Read-only libraries (SPEC §5): a library in a read-only folder or a read-only file opens read-only.

Root ignores file permissions, so the read-only places are made the ways that
hold for root too: a read-only bind mount of the folder, and an immutable file
(``chattr +i``). Each is skipped, with the reason, where it cannot be made.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys

import pytest

from partpick.cli import main
from partpick.errors import LibraryError
from partpick.library.store import open_library

ROOT = hasattr(os, "geteuid") and os.geteuid() == 0

REQ = """\
name = "read-only test"
role = "series"
supply_min_V = 12.0
supply_max_V = 14.0
load_min_A = 0.5
load_max_A = 1.0
ambient_min_C = 25.0
ambient_max_C = 50.0
"""


def _run(*command):
    return subprocess.run(list(command), capture_output=True, text=True)


@pytest.fixture
def filled(tmp_path, rectifier):
    folder = tmp_path / "shared"
    folder.mkdir()
    path = folder / "lib.sqlite"
    with open_library(path, create=True) as library:
        library.save_part(rectifier("RO-1"))
        library.save_part(rectifier("RO-2", vrrm_V=600.0))
    return path


@pytest.fixture
def read_only_folder(filled, tmp_path):
    """The library's folder, bind-mounted read-only at another place."""
    if not ROOT or shutil.which("mount") is None:
        pytest.skip("a read-only bind mount needs root and mount(8)")
    view = tmp_path / "view"
    view.mkdir()
    result = _run("mount", "--bind", str(filled.parent), str(view))
    if result.returncode != 0:
        pytest.skip(f"cannot bind-mount here: {result.stderr.strip()}")
    try:
        result = _run("mount", "-o", "remount,ro,bind", str(view))
        if result.returncode != 0:
            pytest.skip(f"cannot remount read-only here: {result.stderr.strip()}")
        yield view / filled.name
    finally:
        _run("umount", str(view))


@pytest.fixture
def immutable_file(filled):
    if not ROOT or shutil.which("chattr") is None:
        pytest.skip("chattr +i needs root and chattr(1)")
    result = _run("chattr", "+i", str(filled))
    if result.returncode != 0:
        pytest.skip(f"chattr +i not supported on this filesystem: {result.stderr.strip()}")
    try:
        yield filled
    finally:
        _run("chattr", "-i", str(filled))


@pytest.fixture(params=["read-only folder", "immutable file"])
def read_only_library(request):
    return request.getfixturevalue("read_only_folder" if request.param == "read-only folder" else "immutable_file")


def test_a_read_only_library_reads_and_refuses_writes(read_only_library, rectifier):
    before = read_only_library.read_bytes()
    with open_library(read_only_library) as library:
        assert library.read_only is True
        assert [p["part_number"] for p in library.list_parts()] == ["RO-1", "RO-2"]
        assert library.content_hash()
        with pytest.raises(LibraryError, match="library .* is read-only: cannot save part RO-3"):
            library.save_part(rectifier("RO-3"))
        with pytest.raises(LibraryError, match="is read-only"):
            library.delete_part("RO-1")
        with pytest.raises(LibraryError, match="is read-only"):
            library.save_policy({"name": "x", "description": ""})
    assert read_only_library.read_bytes() == before
    siblings = sorted(p.name for p in read_only_library.parent.iterdir())
    assert siblings == [read_only_library.name]  # no -wal/-shm made (no journal-mode switch)


def test_the_commands_on_a_read_only_library(read_only_library, tmp_path, capsys):
    lib = str(read_only_library)
    assert main(["library", "list", "--library", lib]) == 0
    assert "RO-1" in capsys.readouterr().out
    req = tmp_path / "req.toml"
    req.write_text(REQ, encoding="utf-8")
    assert main(["check", str(req), "--library", lib, "--format", "json"]) in (0, 3)
    out = tmp_path / "export.csv"
    assert main(["library", "export", "--library", lib, "--output", str(out)]) == 0
    assert "RO-2" in out.read_text(encoding="utf-8")
    capsys.readouterr()
    # A dry run reads only: it works.
    assert main(["library", "import", str(out), "--dry-run", "--library", lib]) == 0
    capsys.readouterr()
    assert main(["library", "import", str(out), "--library", lib]) == 1
    err = capsys.readouterr().err
    assert "library is read-only" in err.replace(f"library {lib} is", "library is") and err.count("\n") == 1
    (tmp_path / "p.toml").write_text('name = "mine"\ndescription = ""\n', encoding="utf-8")
    assert main(["policy", "import", str(tmp_path / "p.toml"), "--library", lib]) == 1
    assert "read-only" in capsys.readouterr().err


def test_a_writable_library_is_not_read_only(filled):
    with open_library(filled) as library:
        assert library.read_only is False


def test_the_window_shows_read_only_and_disables_editing(read_only_library, qtbot):
    from partpick.gui.commands import COMMANDS, Workbench
    from partpick.gui.main_window import MainWindow

    bench = Workbench(open_library(read_only_library))
    window = MainWindow(bench)
    qtbot.addWidget(window)
    try:
        assert bench.read_only
        assert "read-only" in window.windowTitle()
        assert "read-only" in window.location_label.text()
        bench.select_parts(["RO-1"])
        for command_id in ("part.add", "part.edit", "part.duplicate", "part.delete", "library.import"):
            assert COMMANDS[command_id].edits_library
            assert not window.actions[command_id].isEnabled(), command_id
        assert window.actions["library.export"].isEnabled()
    finally:
        window.close()
        bench.close()


def test_a_read_only_library_refuses_the_edit_commands_run_directly(read_only_library):
    from partpick.gui.commands import COMMANDS, Workbench

    shown = []

    class Prompt:
        def show_error(self, title, text):
            shown.append((title, text))

        def edit_part(self, *_):  # pragma: no cover - must not be reached
            raise AssertionError("the editor opened on a read-only library")

    bench = Workbench(open_library(read_only_library), prompt=Prompt())
    try:
        bench.select_parts(["RO-1"])
        for command_id in ("part.add", "part.edit", "part.delete"):
            COMMANDS[command_id].run(bench)
        assert len(shown) == 3 and all("read-only" in text for _, text in shown)
        assert [p["part_number"] for p in bench.library.parts] == ["RO-1", "RO-2"]
    finally:
        bench.close()


def test_process_exit_code_for_a_write_to_a_read_only_library(read_only_library, tmp_path):
    csv = tmp_path / "one.csv"
    csv.write_text("part_number,kind,price\nRO-1,rectifier,0.2\n", encoding="utf-8")
    result = subprocess.run([sys.executable, "-m", "partpick", "library", "import", str(csv), "--library",
                             str(read_only_library)], capture_output=True, text=True)
    assert result.returncode == 1 and "is read-only" in result.stderr and "Traceback" not in result.stderr

"""The window's export commands follow the output rules of SPEC §5 (through partpick.outputs)."""

from __future__ import annotations

import os
import sqlite3
import stat
import threading

import pytest


def _reader(path, sink):
    def read():
        with open(path, "rb") as handle:
            sink.append(handle.read())

    thread = threading.Thread(target=read, daemon=True)
    thread.start()
    return thread


@pytest.mark.parametrize("command", ["library.export", "report.export", "curves.export", "requirement.save_as"])
def test_a_window_export_onto_the_open_library_is_refused(window, prompt, library_path, command):
    before = library_path.read_bytes()
    target = library_path
    if command == "report.export":  # a report needs a .html/.pdf name: the library under a second name
        target = library_path.with_name("library.html")
        os.link(library_path, target)
    prompt.paths.append(str(target))
    window.actions[command].trigger()
    assert os.stat(target).st_ino == os.stat(library_path).st_ino  # still the library, not replaced
    assert prompt.errors, "the user was not told"
    title, text = prompt.errors[-1]
    assert "library" in text or "SQLite" in text
    assert library_path.read_bytes() == before
    assert len(window.bench.library.library.list_parts()) == len(window.bench.library.parts) > 0


def test_a_window_export_onto_another_database_is_refused(window, prompt, tmp_path):
    other = tmp_path / "keep.db"
    connection = sqlite3.connect(other)
    connection.execute("CREATE TABLE keep (x)")
    connection.commit()
    connection.close()
    before = other.read_bytes()
    prompt.paths.append(str(other))
    window.actions["library.export"].trigger()
    assert prompt.errors and "SQLite database" in prompt.errors[-1][1]
    assert other.read_bytes() == before


def test_the_report_may_not_replace_the_requirement_it_came_from(window, prompt, tmp_path):
    from partpick.gui.commands import save_requirement_file

    requirement = tmp_path / "req.html"  # a TOML file under a name a report could take
    save_requirement_file(window.bench, requirement)
    before = requirement.read_bytes()
    prompt.paths.append(str(requirement))
    window.actions["report.export"].trigger()
    assert requirement.read_bytes() == before
    assert prompt.errors and "inputs" in prompt.errors[-1][1]


def test_window_exports_follow_links_and_write_fifos(window, prompt, tmp_path):
    target = tmp_path / "real.csv"
    target.write_text("old")
    link = tmp_path / "link.csv"
    link.symlink_to(target)
    prompt.paths.append(str(link))
    window.actions["library.export"].trigger()
    assert link.is_symlink() and target.read_text(encoding="utf-8").startswith("part_number,")
    fifo = tmp_path / "report.fifo.html"
    os.mkfifo(fifo)
    received: list = []
    thread = _reader(fifo, received)
    prompt.paths.append(str(fifo))
    window.actions["report.export"].trigger()
    thread.join(timeout=60)
    assert prompt.errors == []
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode) and received and b"<html" in received[0].lower()


def test_a_curves_image_keeps_the_mode_of_the_file_it_replaces(window, prompt, tmp_path):
    image = tmp_path / "curves.png"
    image.write_bytes(b"old")
    os.chmod(image, 0o600)
    prompt.paths.append(str(image))
    window.actions["curves.export"].trigger()
    assert prompt.errors == []
    assert image.read_bytes().startswith(b"\x89PNG") and stat.S_IMODE(os.stat(image).st_mode) == 0o600
    assert sorted(p.name for p in tmp_path.iterdir() if p.name.startswith(".")) == []

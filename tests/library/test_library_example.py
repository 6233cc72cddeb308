"""The example library: built reproducibly from its readable source, and the committed files match it."""

import sqlite3
from collections import Counter

import pytest

from partpick.library import example
from partpick.library.store import open_library

pytestmark = pytest.mark.skipif(not example.SOURCE_CSV.is_file(), reason="example source CSV not in this checkout")


def _dump(path) -> list[str]:
    connection = sqlite3.connect(path)
    try:
        return list(connection.iterdump())
    finally:
        connection.close()


def _sqlite_version_number() -> int:
    major, minor, patch = sqlite3.sqlite_version_info
    return major * 1_000_000 + minor * 1_000 + patch


@pytest.fixture(scope="module")
def fresh_build(tmp_path_factory):
    return example.build_example(example.SOURCE_CSV, tmp_path_factory.mktemp("example") / "fresh.sqlite")


def test_build_is_byte_reproducible(fresh_build, tmp_path):
    again = example.build_example(example.SOURCE_CSV, tmp_path / "again.sqlite")
    assert again.read_bytes() == fresh_build.read_bytes()


@pytest.mark.parametrize("committed", example.EXAMPLE_COPIES, ids=lambda p: p.parent.name or "top")
def test_committed_example_matches_its_source(fresh_build, committed):
    assert committed.is_file(), f"{committed} missing: run `python -m partpick.library.example`"
    # Same tables and rows as a fresh build: the source and the file agree.
    assert _dump(committed) == _dump(fresh_build), "rebuild with `python -m partpick.library.example`"
    # Bytes too, when this SQLite is the one that wrote the file (SQLITE_VERSION_NUMBER
    # at header offset 96, sqlite.org "Database File Format" 1.3.17).
    written_by = int.from_bytes(committed.read_bytes()[96:100], "big")
    if written_by == _sqlite_version_number():
        assert committed.read_bytes() == fresh_build.read_bytes()


def test_opening_the_example_does_not_change_it(fresh_build, tmp_path):
    copy = tmp_path / "copy.sqlite"
    copy.write_bytes(fresh_build.read_bytes())
    with open_library(copy) as library:
        library.list_parts()
        library.content_hash()
    assert copy.read_bytes() == fresh_build.read_bytes()
    assert fresh_build.read_bytes()[18:20] == b"\x02\x02"  # WAL mode in the header (file format 1.3.3)


def test_example_covers_the_scenario(fresh_build):
    with open_library(fresh_build) as library:
        parts = library.list_parts()
    kinds = Counter(p["kind"] for p in parts)
    assert len(parts) >= 60
    assert {"rectifier", "signal", "schottky", "fast_recovery", "zener", "tvs"} <= set(kinds)
    assert any(p["ifrm_A"] is not None and p["trr_s"] is not None for p in parts)  # coil-clamp diodes
    assert any(p["lifecycle"] in ("nrnd", "obsolete") for p in parts)
    assert any(p["model_source"] == "fitted" for p in parts)
    assert any(p["model_source"] == "entered" and not p["vf_points"] for p in parts)
    for part in parts:
        if part["model_source"] == "fitted":
            assert part["fit_residual_mV"] <= 5.0  # SPEC §3 fit limit

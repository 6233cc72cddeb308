"""Fixtures for the library tests: invented parts and a fresh library file per test."""

from __future__ import annotations

import pytest

from partpick.library.store import open_library


def _rectifier(number: str = "TST-R1", **changes) -> dict:
    """An invented 1 A / 400 V rectifier with an entered forward model."""
    part = {
        "part_number": number,
        "kind": "rectifier",
        "manufacturer": "Testing Works",
        "package": "axial-2",
        "vrrm_V": 400.0,
        "if_avg_A": 1.0,
        "ifsm_A": 30.0,
        "tj_max_C": 150.0,
        "pd_W": 1.5,
        "is_A": 2e-9,
        "n": 1.9,
        "rs_ohm": 0.04,
        "price": 0.05,
        "lifecycle": "active",
    }
    part.update(changes)
    return part


def _zener(number: str = "TST-Z1", **changes) -> dict:
    """An invented 5.1 V Zener."""
    part = {
        "part_number": number,
        "kind": "zener",
        "package": "SOD-123",
        "vz_V": 5.1,
        "vz_tol_pct": 5.0,
        "izt_A": 5e-3,
        "zzt_ohm": 30.0,
        "izk_A": 0.25e-3,
        "zzk_ohm": 500.0,
        "vz_tc_pct_per_K": 0.01,
        "pd_W": 0.5,
        "tj_max_C": 150.0,
    }
    part.update(changes)
    return part


@pytest.fixture
def rectifier():
    """Factory of invented rectifier records: rectifier("P1", vrrm_V=100.0)."""
    return _rectifier


@pytest.fixture
def zener():
    """Factory of invented Zener records."""
    return _zener


@pytest.fixture
def library_path(tmp_path):
    return tmp_path / "lib.sqlite"


@pytest.fixture
def library(library_location):
    """A new, empty library: a SQLite file (``library_path``) and, with a server, a PostgreSQL database."""
    lib = open_library(library_location, create=True)
    yield lib
    lib.close()


@pytest.fixture
def write_csv(tmp_path):
    """Write CSV text to a file (bytes exactly as given, UTF-8) and return its path."""

    def write(text: str, name: str = "parts.csv", *, bom: bool = False):
        path = tmp_path / name
        path.write_bytes((b"\xef\xbb\xbf" if bom else b"") + text.encode("utf-8"))
        return path

    return write

"""Fixtures for the report tests: invented parts and a check result written by hand to SPEC §5's keys.

The parts are invented (demo data, not from any datasheet). The result follows
SPEC §5 "JSON result" key for key, so the renderers are tested against the
contract itself, not against one checker's output.
"""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import sys  # noqa: E402

# The shared demo data module sits beside this file (also under pytest's importlib import mode).
sys.path.insert(0, os.path.dirname(__file__))

import pytest  # noqa: E402
from report_data import EVIL, RECTIFIER, SCHOTTKY, ZENER, series_result, zener_result  # noqa: E402


@pytest.fixture
def parts_by_number():
    return {p["part_number"]: p for p in (SCHOTTKY, RECTIFIER, EVIL, ZENER)}


@pytest.fixture
def series():
    return series_result()


@pytest.fixture
def zener():
    return zener_result()

"""Fixtures for the curve and plot tests: invented parts (demo data) and requirements as dicts of SPEC §5 keys."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import sys  # noqa: E402

# The shared demo data module sits beside this file (also under pytest's importlib import mode).
sys.path.insert(0, os.path.dirname(__file__))

import pytest  # noqa: E402
from plot_data import SCHOTTKY, SERIES_REQ, ZENER, ZENER_CANDIDATE, ZENER_REQ  # noqa: E402


@pytest.fixture
def series_curves():
    from partpick.checks.curves import curves_for

    return curves_for(SERIES_REQ, SCHOTTKY, {"part_number": "TST-S40", "metrics": {}, "checks": []})


@pytest.fixture
def zener_curves():
    from partpick.checks.curves import curves_for

    return curves_for(ZENER_REQ, ZENER, ZENER_CANDIDATE)

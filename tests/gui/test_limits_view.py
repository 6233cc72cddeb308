"""The window's operating limits: the thermal group of the form, the panel, the optional column."""

from __future__ import annotations

from partpick.checks.service import ANALYSED_CANDIDATES
from partpick.gui.limits_view import SHOWN
from partpick.gui.models import RequirementModel


def test_window_analyses_as_many_candidates_as_the_cli():
    assert SHOWN == ANALYSED_CANDIDATES


def test_thermal_group_sends_only_the_mounts_keys():
    model = RequirementModel()
    assert "thermal" not in model.requirement_dict()  # no mount: the parts' datasheet RthJA
    model.set_text("thermal.mount", "heatsink")
    model.set_text("thermal.rth_sa_K_per_W", "4 K/W")
    model.set_text("thermal.copper_area_mm2", "300")
    assert not model.applies("thermal.copper_area_mm2")
    assert model.requirement_dict()["thermal"] == {"mount": "heatsink", "rth_sa_K_per_W": 4.0}
    assert model.build_requirement().thermal.interface == 1.0
    model.set_text("thermal.mount", "board")
    assert model.requirement_dict()["thermal"] == {"mount": "board", "copper_area_mm2": 300.0}


def test_heatsink_without_rthsa_is_marked_at_the_form():
    model = RequirementModel()
    model.set_text("thermal.mount", "heatsink")
    try:
        model.build_requirement()
    except Exception as exc:  # the checker's reader refuses it, naming the key
        assert "rth_sa_K_per_W" in str(exc)
    else:
        raise AssertionError("a heatsink mount without RthSA was accepted")

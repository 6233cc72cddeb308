"""The Library API: parts, policies, content hash, one transaction per action."""

import math

import pytest

from partpick.errors import InputError
from partpick.library.fields import FIELD_NAMES
from partpick.library.store import open_library, prepare_part


def test_save_get_list(library, rectifier, zener):
    stored = library.save_part(rectifier("TST-B"))
    library.save_part(zener("TST-A"))
    assert stored["model_source"] == "entered"  # an entered model says so
    parts = library.list_parts()
    assert [p["part_number"] for p in parts] == ["TST-A", "TST-B"]
    assert set(parts[0]) == set(FIELD_NAMES) | {"fit_residual_mV"}
    got = library.get_part("TST-B")
    for key, value in rectifier("TST-B").items():
        assert got[key] == value, key
    assert isinstance(got["vrrm_V"], float) and got["vf_points"] == []
    assert library.get_part("nope") is None


def test_ints_become_floats_and_empty_text_unknown(library, rectifier):
    library.save_part(rectifier(vrrm_V=400, manufacturer="", vf_points=[[0.1, 0.8], [1, 0.95]]))
    part = library.get_part("TST-R1")
    assert part["vrrm_V"] == 400.0 and isinstance(part["vrrm_V"], float)
    assert part["manufacturer"] is None
    assert part["vf_points"] == [(0.1, 0.8), (1.0, 0.95)]


def test_save_refuses_invalid_and_duplicate(library, rectifier):
    with pytest.raises(InputError, match=r"part TST-R1: vrrm_V = -1 V is out of range \(allowed: 0 < value"):
        library.save_part(rectifier(vrrm_V=-1.0))
    library.save_part(rectifier())
    with pytest.raises(InputError, match="part_number TST-R1 is already in the library"):
        library.save_part(rectifier(vrrm_V=100.0))
    assert library.get_part("TST-R1")["vrrm_V"] == 400.0


def test_replace_edits_and_renames(library, rectifier):
    library.save_part(rectifier("TST-1"))
    library.save_part(rectifier("TST-2"))
    library.save_part(rectifier("TST-1", vrrm_V=600.0, vf_points=[(0.1, 0.8), (1.0, 0.95)]), replace="TST-1")
    assert library.get_part("TST-1")["vrrm_V"] == 600.0
    library.save_part(rectifier("TST-1b", vrrm_V=600.0), replace="TST-1")
    assert [p["part_number"] for p in library.list_parts()] == ["TST-1b", "TST-2"]
    with pytest.raises(InputError, match="part_number TST-2 is already in the library"):
        library.save_part(rectifier("TST-2"), replace="TST-1b")
    with pytest.raises(InputError, match="part TST-9 is not in the library"):
        library.save_part(rectifier("TST-9"), replace="TST-9")
    # The failed actions rolled back whole: nothing lost.
    assert [p["part_number"] for p in library.list_parts()] == ["TST-1b", "TST-2"]


def test_delete(library, rectifier):
    library.save_part(rectifier(vf_points=[(0.1, 0.8), (1.0, 0.95)]))
    library.delete_part("TST-R1")
    assert library.list_parts() == []
    with pytest.raises(InputError, match="part TST-R1 is not in the library"):
        library.delete_part("TST-R1")


def test_points_only_part_is_fitted_on_save(library, rectifier):
    # Points from the Shockley equation with Rs (SPEC §3), Is = 5 nA, n = 1.8, Rs = 60 mΩ, to 1 mV.
    vt = 1.380649e-23 * 298.15 / 1.602176634e-19  # CODATA 2018 (exact SI) k and q at 25 °C
    points = [(i, round(1.8 * vt * math.log1p(i / 5e-9) + 0.06 * i, 3)) for i in (0.01, 0.1, 0.5, 1.0, 3.0)]
    record = library.save_part(rectifier(is_A=None, n=None, rs_ohm=None, vf_points=points))
    assert record["model_source"] == "fitted"
    assert 1.0 <= record["n"] <= 4.0 and record["is_A"] > 0 and record["rs_ohm"] >= 0
    assert library.get_part("TST-R1")["fit_residual_mV"] == pytest.approx(record["fit_residual_mV"])
    assert record["fit_residual_mV"] <= 5.0  # SPEC §3: fits above 5 mV are refused


def test_prepare_part_reports_fields(rectifier):
    _, problems = prepare_part(rectifier(n=7.0, tj_max_C=20.0))
    assert sorted(field for field, _ in problems) == ["n", "tj_max_C"]


def test_policies(library):
    commercial = {"name": "team", "description": "ours", "zener": {"power_pct": 60.0}}
    library.save_policy(commercial)
    library.save_policy({"name": "alpha", "pn": {"reverse_pct": 70.0}})
    assert [p["name"] for p in library.list_policies()] == ["alpha", "team"]
    assert library.get_policy("team") == commercial
    library.save_policy({**commercial, "description": "changed"})
    assert library.get_policy("team")["description"] == "changed"
    library.delete_policy("alpha")
    assert library.get_policy("alpha") is None
    with pytest.raises(InputError, match="policy alpha is not in the library"):
        library.delete_policy("alpha")
    with pytest.raises(InputError, match="policy name '' is not valid"):
        library.save_policy({"name": ""})
    with pytest.raises(InputError, match="policy bad: cannot be stored"):
        library.save_policy({"name": "bad", "limit": float("nan")})


def test_content_hash_follows_content(tmp_path, rectifier):
    with open_library(tmp_path / "a.sqlite", create=True) as a, open_library(tmp_path / "b.sqlite", create=True) as b:
        assert a.content_hash() == b.content_hash()
        a.save_part(rectifier("TST-1"))
        b.save_part(rectifier("TST-1"))
        assert a.content_hash() == b.content_hash()
        b.save_part(rectifier("TST-1", price=0.06), replace="TST-1")
        assert a.content_hash() != b.content_hash()
        before = a.content_hash()
        a.save_policy({"name": "p"})
        assert a.content_hash() != before
        assert len(before) == 64


def test_url_location(tmp_path, rectifier):
    url = f"sqlite:///{tmp_path / 'u.sqlite'}"
    with open_library(url, create=True) as library:
        library.save_part(rectifier())
        assert library.location == url
    with open_library(tmp_path / "u.sqlite") as library:
        assert library.get_part("TST-R1") is not None


def test_parts_with_arrays_match_the_dicts(library, rectifier, zener):
    library.save_part(rectifier("TST-2"))
    library.save_part(zener("TST-1"))
    parts, arrays = library.list_parts_with_arrays()
    assert parts == library.list_parts()
    assert list(arrays["vz_V"][:1]) == [5.1] and math.isnan(arrays["vz_V"][1])
    assert math.isnan(arrays["vrrm_V"][0]) and arrays["vrrm_V"][1] == 400.0
    _, some = library.list_parts_with_arrays(["pd_W"])
    assert list(some) == ["pd_W"] and list(some["pd_W"]) == [0.5, 1.5]

"""The part record: columns, ranges, required fields by kind, validation messages."""

import subprocess
import sys

import pytest

from partpick.library.fields import (
    FIELD_NAMES,
    FIELDS_BY_NAME,
    KINDS,
    PART_FIELDS,
    columns_as_arrays,
    kind_group,
    validate_part,
)

# The parts CSV columns in the order SPEC §5 lists them (copied from the spec text).
SPEC_COLUMNS = (
    "part_number kind manufacturer package datasheet vrrm_V if_avg_A if_ref_C ifsm_A ifsm_ms pd_W "
    "pd_ref_C tj_max_C rth_ja_K_per_W is_A n rs_ohm rs_temp_exponent eg_eV is_temp_exponent model_source "
    "vf_points pd_ref_point if_ref_point rth_jc_K_per_W rth_jl_K_per_W rth_ja_area_mm2 rth_ja_large_K_per_W "
    "rth_ja_large_area_mm2 tau_th_s ifrm_A trr_s qrr_C junction vwm_V vbr_min_V vbr_max_V it_A vc_V ipp_A "
    "ppp_W ppp_waveform ppp2_W ppp2_waveform bidirectional vbr_tc_pct_per_K "
    "vf_max_V vf_max_at_A ir_A ir_vr_V ir_t_C ir_hot_A ir_hot_t_C ir_double_K vrsm_V vz_V vz_tol_pct izt_A "
    "zzt_ohm izk_A zzk_ohm vz_tc_pct_per_K price lifecycle notes"
).split()


def test_fields_are_the_spec_columns_in_order():
    assert list(FIELD_NAMES) == SPEC_COLUMNS
    for spec in PART_FIELDS:
        assert spec.type in ("float", "text", "choice", "points")
        assert spec.label and spec.help
        if spec.type == "float":
            assert spec.minimum is not None and spec.maximum is not None and spec.minimum < spec.maximum


def test_unit_in_column_name_matches_display_unit():
    # The unit suffix of a column name (SPEC §5) and the editor's base unit agree.
    suffix_unit = {"_V": "V", "_A": "A", "_ohm": "Ω", "_W": "W", "_C": "°C", "_K_per_W": "K/W", "_eV": "eV",
                   "_pct": "%", "_K": "K", "_pct_per_K": "%/K"}
    for spec in PART_FIELDS:
        suffixes = [suffix for suffix in suffix_unit if spec.name.endswith(suffix)]
        if spec.name == "qrr_C":  # SPEC §5: recovery charge in coulombs, not °C
            assert spec.unit == "C"
        elif spec.type == "float" and suffixes:
            longest = max(suffixes, key=len)  # _K_per_W over _W, _pct_per_K over _K
            assert spec.unit == suffix_unit[longest], spec.name


def test_fields_module_does_not_load_sqlalchemy():
    code = "import sys, partpick.library.fields, partpick.library; print('sqlalchemy' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "False"


def test_kind_groups():
    assert [kind_group(k) for k in KINDS] == ["pn", "pn", "schottky", "pn", "zener", "pn", "tvs"]
    assert kind_group("bridge", "schottky") == "schottky"  # a bridge follows its legs' junction
    with pytest.raises(ValueError, match="'tunnel' is not one of"):
        kind_group("tunnel")


def test_valid_parts_have_no_problems(rectifier, zener):
    assert validate_part(rectifier()) == []
    assert validate_part(zener()) == []
    points_only = rectifier(is_A=None, n=None, rs_ohm=None, vf_points=[(0.01, 0.62), (0.1, 0.72), (1.0, 0.93)])
    assert validate_part(points_only) == []


@pytest.mark.parametrize(
    "field, value, allowed",
    [
        ("vrrm_V", 0.0, "0 < value ≤ 100000 V"),  # issue 3: VRRM > 0
        ("vrrm_V", -5.0, "0 < value ≤ 100000 V"),
        ("n", 0.4, "0.5 ≤ value ≤ 4"),  # issue 3: 0.5 ≤ n ≤ 4
        ("n", 4.5, "0.5 ≤ value ≤ 4"),
        ("tj_max_C", 25.0, "25 < value ≤ 250 °C"),  # issue 3: Tj max above 25 °C
        ("rs_ohm", -0.1, "0 ≤ value ≤ 1000 Ω"),
        ("price", -1.0, "0 ≤ value ≤ 1e+06"),
    ],
)
def test_out_of_range_names_part_field_value_and_range(rectifier, field, value, allowed):
    problems = validate_part(rectifier("TST-9", **{field: value}))
    assert len(problems) == 1, problems
    assert problems[0].startswith(f"part TST-9: {field} = {value:g}")
    assert f"allowed: {allowed}" in problems[0]


@pytest.mark.parametrize("value", [float("nan"), float("inf"), "400", True])
def test_non_numbers_are_refused(rectifier, value):
    problems = validate_part(rectifier(vrrm_V=value))
    assert len(problems) == 1 and "vrrm_V" in problems[0]


def test_choices_and_unknown_fields(rectifier):
    problems = validate_part(rectifier(kind="tunnel", lifecycle="retired", colour="red"))
    assert any("kind = 'tunnel' is not allowed (allowed: one of rectifier, signal" in p for p in problems)
    assert any("lifecycle = 'retired' is not allowed" in p for p in problems)
    assert any("'colour' is not a part field" in p for p in problems)


def test_missing_identity():
    problems = validate_part({"vrrm_V": 100.0})
    assert any("part_number is missing" in p for p in problems)
    assert any("kind is missing" in p for p in problems)
    assert any("part_number" in p and "spaces" in p for p in validate_part({"part_number": " X", "kind": "signal"}))


def test_zener_required_fields(zener):
    problems = validate_part(zener(vz_V=None, vz_tol_pct=None, izt_A=None, zzt_ohm=None, pd_W=None))
    for name in ("vz_V", "vz_tol_pct", "izt_A", "zzt_ohm"):
        assert any(f"{name} is required for a Zener" in p for p in problems), name
    assert any("needs pd_W or rth_ja_K_per_W" in p for p in problems)
    # Either Pd or RthJA is enough: one gives the other with Tj max (SPEC §3).
    assert validate_part(zener(pd_W=None, rth_ja_K_per_W=250.0)) == []


def test_diode_needs_ratings_and_a_forward_model(rectifier):
    problems = validate_part(rectifier(vrrm_V=None, if_avg_A=None, is_A=None, n=None, rs_ohm=None))
    assert any("vrrm_V is required for a rectifier" in p for p in problems)
    assert any("if_avg_A is required" in p for p in problems)
    assert any("needs a forward model" in p for p in problems)
    incomplete = validate_part(rectifier(rs_ohm=None))
    assert incomplete == ["part TST-R1: forward model incomplete: is_A, n given without rs_ohm "
                          "(give is_A, n and rs_ohm together, or only vf_points to have them fitted)"]


def test_vf_points_rise_strictly_in_both(rectifier):
    falling_if = validate_part(rectifier(vf_points=[(0.1, 0.7), (0.1, 0.8)]))
    assert falling_if == ["part TST-R1: vf_points point 2 IF = 0.1 A is not above the previous 0.1 A "
                          "(points must rise strictly in IF)"]
    falling_vf = validate_part(rectifier(vf_points=[(0.1, 0.7), (1.0, 0.7)]))
    assert len(falling_vf) == 1 and "rise strictly in VF" in falling_vf[0]
    negative = validate_part(rectifier(vf_points=[(-0.1, 0.7)]))
    assert len(negative) == 1 and "IF = -0.1 is out of range" in negative[0]


def test_pairs_and_consistency(rectifier, zener):
    assert any("vf_max_V is given without vf_max_at_A" in p for p in validate_part(rectifier(vf_max_V=1.1)))
    assert any("ir_A is given without ir_vr_V" in p for p in validate_part(rectifier(ir_A=5e-6)))
    assert any("ir_vr_V = 500 V is above vrrm_V" in p
               for p in validate_part(rectifier(ir_A=5e-6, ir_vr_V=500.0)))
    assert any("pd_ref_C = 160 °C is not below tj_max_C" in p for p in validate_part(rectifier(pd_ref_C=160.0)))
    assert any("izk_A = 0.01 A is not below izt_A" in p for p in validate_part(zener(izk_A=0.01)))
    assert any("zzk_ohm is given without izk_A" in p for p in validate_part(zener(izk_A=None)))
    assert any("'fitted' needs the vf_points" in p for p in validate_part(rectifier(model_source="fitted")))


def test_columns_as_arrays(rectifier, zener):
    arrays = columns_as_arrays([rectifier(), zener()])
    assert arrays["vrrm_V"][0] == 400.0
    assert arrays["vrrm_V"][1] != arrays["vrrm_V"][1]  # NaN: a Zener has no VRRM here
    assert set(arrays) == {s.name for s in PART_FIELDS if s.type == "float"}
    assert FIELDS_BY_NAME["vf_points"].type == "points"

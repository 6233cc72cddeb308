"""Ranking by objective, ties, the command's subject, filters, substitutes and the JSON contract."""

from __future__ import annotations

import json

import pytest

from checks_builders import make_part, make_requirement
from partpick.checks.policy import Policy
from partpick.checks.service import run_check
from partpick.errors import InputError


def diode(number, *, is_A=1e-12, n=1.0, rs=0.05, price=0.1, package="SMA", lifecycle="active", kind="rectifier",
          **more):
    return make_part(part_number=number, kind=kind, package=package, vrrm_V=100.0, if_avg_A=2.0, tj_max_C=150.0,
                     rth_ja_K_per_W=50.0, is_A=is_A, n=n, rs_ohm=rs, ir_A=1e-6, ir_vr_V=100.0, price=price,
                     lifecycle=lifecycle, **more)


# Larger Is → lower drop. A (0.76 V), B (lower), C (lowest); prices C > A > B.
PARTS = [diode("A", is_A=1e-12, price=0.10), diode("B", is_A=1e-11, price=0.05), diode("C", is_A=1e-10, price=0.30)]


def _numbers(result):
    return [c["part_number"] for c in result["candidates"]]


def test_objectives_order_the_passing_parts():
    drop = run_check(make_requirement(objective="drop"), PARTS)
    assert _numbers(drop) == ["C", "B", "A"]
    drops = [c["metrics"]["forward_drop_V"] for c in drop["candidates"]]
    assert drops == sorted(drops)
    assert _numbers(run_check(make_requirement(objective="dissipation"), PARTS)) == ["C", "B", "A"]
    assert _numbers(run_check(make_requirement(objective="price"), PARTS)) == ["B", "A", "C"]
    head = run_check(make_requirement(objective="headroom"), PARTS)
    smallest = [min(k["margin_pct"] for k in c["checks"]) for c in head["candidates"]]
    assert smallest == sorted(smallest, reverse=True)
    assert [c["rank"] for c in drop["candidates"]] == [1, 2, 3]


def test_balanced_sums_the_scaled_criteria():
    result = run_check(make_requirement(), PARTS)  # objective defaults to balanced
    cands = {c["part_number"]: c for c in result["candidates"]}

    def scaled(values):
        low, high = min(values.values()), max(values.values())
        return {k: (v - low) / (high - low) if high > low else 0.0 for k, v in values.items()}

    drop = scaled({k: c["metrics"]["forward_drop_V"] for k, c in cands.items()})
    diss = scaled({k: c["metrics"]["dissipation_W"] for k, c in cands.items()})
    margin = scaled({k: -min(x["margin_pct"] for x in c["checks"]) for k, c in cands.items()})
    price = scaled({"A": 0.10, "B": 0.05, "C": 0.30})
    score = {k: drop[k] + diss[k] + margin[k] + price[k] for k in cands}
    assert _numbers(result) == sorted(score, key=score.get)


def test_unknown_price_ranks_last_and_ties_break_on_part_number():
    twins = [diode("Z2"), diode("Z1"), diode("Z0", price=None)]
    assert _numbers(run_check(make_requirement(objective="price"), twins)) == ["Z1", "Z2", "Z0"]
    assert _numbers(run_check(make_requirement(objective="drop"), twins)) == ["Z0", "Z1", "Z2"]


def test_failing_parts_follow_fewest_failures_then_worst_margin():
    # Drops: A 0.760 V, B 0.701 V, C 0.642 V. With max_forward_drop_V = 0.68 V and min_output_V = 11.265 V
    # only C passes; B fails the drop check only, A fails both (drop and output_min).
    req = make_requirement(max_forward_drop_V=0.68, min_output_V=11.265)
    result = run_check(req, PARTS)
    cands = result["candidates"]
    assert cands[0]["part_number"] == "C" and cands[0]["passed"]
    failing = cands[1:]
    assert all(not c["passed"] for c in failing)
    counts = [len(c["failed_checks"]) for c in failing]
    assert counts == sorted(counts)
    assert [c["part_number"] for c in failing] == ["B", "A"]
    assert failing[-1]["failed_checks"][0] == "forward_drop"  # the most negative margin first


def test_subject_is_the_whole_list_before_top_or_the_named_part():
    req = make_requirement(max_forward_drop_V=0.72)
    full = run_check(req, PARTS)
    top = run_check(req, PARTS, top=1)
    assert len(top["candidates"]) == 1 and top["subject_passed"] == full["subject_passed"] is True
    only_a = run_check(req, PARTS, part="A")
    assert _numbers(only_a) == ["A"] and only_a["subject_passed"] is False
    assert only_a["candidates"][0]["rank"] == 3
    assert run_check(req, PARTS, part="C")["subject_passed"] is True


def test_refusals_of_the_service():
    req = make_requirement()
    with pytest.raises(InputError, match=r"part 'D' is not in the library"):
        run_check(req, PARTS, part="D")
    with pytest.raises(InputError, match=r"part 'AA' is not in the library \(did you mean 'A'\?\)"):
        run_check(req, PARTS, substitutes_for="AA")
    zener = make_part(part_number="Z", kind="zener", vz_V=5.1, vz_tol_pct=5.0, izt_A=5e-3, zzt_ohm=10.0, pd_W=0.5)
    with pytest.raises(InputError, match=r"part 'Z' is a zener part; role 'series' considers"):
        run_check(req, PARTS + [zener], part="Z")
    with pytest.raises(InputError, match=r"--part and --substitutes-for cannot be combined"):
        run_check(req, PARTS, part="A", substitutes_for="B")
    with pytest.raises(InputError, match=r"--top: 0 must be a whole number of at least 1"):
        run_check(req, PARTS, top=0)
    with pytest.raises(InputError, match=r"policy 'comercial' is neither built in nor in the library .*"
                                         r"did you mean 'commercial'"):
        run_check(make_requirement(policy="comercial"), PARTS)


def test_filters_remove_parts_before_checking():
    parts = PARTS + [diode("D", package="DO-41", lifecycle="obsolete", price=None, kind="schottky", is_A=1e-6, n=1.1)]
    assert _numbers(run_check(make_requirement(kinds=["schottky"]), parts)) == ["D"]
    assert "D" not in _numbers(run_check(make_requirement(lifecycle=["active"]), parts))
    assert _numbers(run_check(make_requirement(packages=["do-41"]), parts)) == ["D"]
    assert sorted(_numbers(run_check(make_requirement(max_price=0.1), parts))) == ["A", "B"]
    zener = make_part(part_number="Z", kind="zener", vz_V=5.1, vz_tol_pct=5.0, izt_A=5e-3, zzt_ohm=10.0, pd_W=0.5)
    assert "Z" not in _numbers(run_check(make_requirement(), parts + [zener]))


def test_substitutes_with_deltas():
    ref = diode("OLD", is_A=1e-12, price=0.20, lifecycle="obsolete", package="SMA")
    parts = PARTS + [ref, diode("BIG", is_A=1e-12, package="SMB", price=0.25, lifecycle="nrnd")]
    req = make_requirement(objective="drop", lifecycle=["active", "nrnd"])  # the reference is filtered out...
    result = run_check(req, parts, substitutes_for="OLD")  # ...but still evaluated as the reference
    json.dumps(result, allow_nan=False)
    assert result["reference"]["part_number"] == "OLD"
    numbers = _numbers(result)
    assert "OLD" not in numbers and numbers[0] == "C" and result["subject_passed"]
    by = {c["part_number"]: c for c in result["candidates"]}
    d = by["C"]["deltas"]
    ref_m = result["reference"]["metrics"]
    assert d["same_package"] is True and by["BIG"]["deltas"]["same_package"] is False
    assert d["forward_drop_V"] == pytest.approx(by["C"]["metrics"]["forward_drop_V"] - ref_m["forward_drop_V"])
    assert d["forward_drop_V"] < 0 and d["dissipation_W"] < 0 and d["junction_temp_C"] < 0
    assert d["price"] == pytest.approx(0.30 - 0.20)
    assert d["lifecycle"] == {"from": "obsolete", "to": "active"}
    assert by["BIG"]["deltas"]["forward_drop_V"] == pytest.approx(0.0, abs=1e-12)
    # No substitute passes: the subject fails.
    none = run_check(make_requirement(max_forward_drop_V=0.5), parts, substitutes_for="OLD")
    assert none["candidates"] == [] and none["subject_passed"] is False


def test_a_library_policy_is_used_and_echoed_with_sources():
    team = Policy.from_dict({"name": "team", "description": "ours", "groups": {"pn": {"current_pct": 50}}})
    req = make_requirement(policy="team", current_limit_pct=60.0)
    result = run_check(req, PARTS, policies={"team": team}, library={"location": "lib.sqlite", "content_hash": "ab"})
    assert result["policy"]["name"] == "team"
    limit = result["policy"]["limits"]["pn"]["current_pct"]
    assert limit == {"value": 60.0, "unit": "%", "description": "forward current, % of derated IF(AV)",
                     "source": "requirement current_limit_pct"}
    assert result["policy"]["limits"]["pn"]["reverse_pct"]["source"] == "policy team"
    assert set(result["policy"]["limits"]) == {"pn", "schottky"}
    assert result["library"] == {"location": "lib.sqlite", "content_hash": "ab"}
    check = {c["name"]: c for c in result["candidates"][0]["checks"]}["forward_current"]
    assert check["limit_source"].startswith("requirement current_limit_pct")


def test_result_has_the_contract_keys_and_plain_json():
    result = run_check(make_requirement(), PARTS)
    for key in ("partpick_version", "requirement", "policy", "library", "candidates", "subject_passed"):
        assert key in result
    cand = result["candidates"][0]
    assert set(cand) == {"rank", "part_number", "kind", "package", "passed", "failed_checks", "checks", "metrics",
                         "operating_limits", "sensitivity"}
    for check in cand["checks"]:
        assert {"name", "value", "limit", "unit", "limit_source", "margin_pct", "passed", "corner"} <= set(check)
        assert set(check["corner"]) == {"supply_V", "load_A", "ambient_C", "state"}
    text = json.dumps(result, allow_nan=False)
    assert json.loads(text) == result
    assert result["requirement"]["policy"] == "ratings_only"


def test_empty_library_fails_the_subject():
    result = run_check(make_requirement(), [])
    assert result["candidates"] == [] and result["subject_passed"] is False


def test_candidate_details_refuses_a_part_the_role_does_not_consider():
    from partpick.checks.service import candidate_details

    zener = make_part(part_number="Z", kind="zener", vz_V=5.1, vz_tol_pct=5.0, izt_A=5e-3, zzt_ohm=10.0, pd_W=0.5)
    with pytest.raises(InputError, match=r"part 'Z' is a zener part; role 'series' considers rectifier"):
        candidate_details(make_requirement(), zener)
    details = candidate_details(make_requirement(), PARTS[0])
    assert details["role"] == "series" and len(details["points"]) == 17
    assert details["metric_corners"]["forward_drop_V"]["state"] == "cold_start"
    json.dumps(details, allow_nan=False)

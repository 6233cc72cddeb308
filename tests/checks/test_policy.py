"""Derating policies: the built-ins of SPEC §4, TOML and dict forms, overrides and their sources."""

from __future__ import annotations

import pytest

from dataclasses import fields

from partpick.checks.policy import (BUILTIN_POLICIES, GROUPS, GroupLimits, Policy, policy_from_toml,
                                    policy_to_toml, resolve_limits)
from partpick.errors import InputError

from checks_builders import make_requirement


def test_commercial_is_as_specified():
    # SPEC §4, "commercial" (ours): reverse ≤ 80 % of VRRM, Schottky 75 %; current ≤ 80 %;
    # Tj ≤ min(125 °C, Tj max − 25 K); Zener power ≤ 60 %; resistor power ≤ 60 %.
    c = BUILTIN_POLICIES["commercial"]
    assert c.groups["pn"].reverse_pct == 80.0
    assert c.groups["schottky"].reverse_pct == 75.0
    for g in GROUPS:
        assert c.groups[g].current_pct == 80.0
        assert c.groups[g].tj_cap_C == 125.0
        assert c.groups[g].tj_margin_K == 25.0
        assert c.groups[g].resistor_power_pct == 60.0
    assert c.groups["zener"].power_pct == 60.0


def test_high_reliability_follows_the_transcribed_table():
    # MIL-STD-975M appendix A as transcribed (REFERENCES.md; a cancelled standard — verify before relying on it):
    # diodes PIV ≤ 70 %, surge ≤ 50 %, current ≤ 50 %, Tj ≤ 125 °C; Zener power ≤ 50 %, Tj ≤ 125 °C.
    h = BUILTIN_POLICIES["high_reliability"]
    for g in ("pn", "schottky"):
        assert (h.groups[g].reverse_pct, h.groups[g].current_pct, h.groups[g].surge_pct) == (70.0, 50.0, 50.0)
        assert h.groups[g].tj_cap_C == 125.0
    assert h.groups["zener"].power_pct == 50.0 and h.groups["zener"].tj_cap_C == 125.0
    assert "MIL-STD-975M" in h.description and "cancelled" in h.description
    assert "own organisation" in h.description


def test_high_reliability_junction_and_resistor_limits():
    # SPEC §4 (fourth revision): Tj ≤ min(125 °C, Tj max − 40 K) and resistor power ≤ 50 % of the class
    # rating — both "from memory — verify", which the policy's own text must say.
    h = BUILTIN_POLICIES["high_reliability"]
    for g in GROUPS:
        assert h.groups[g].tj_cap_C == 125.0 and h.groups[g].tj_margin_K == 40.0
        assert h.groups[g].resistor_power_pct == 50.0
    assert "Tj ≤ min(125 °C, Tj max − 40 K)" in h.description
    assert h.description.count("from memory — verify") >= 2


# Which way each kind of limit tightens: a smaller % of a rating, a lower Tj cap (none = no cap, the
# loosest), a larger margin below Tj max. A new limit whose name fits none of these fails the test below
# until its direction is written here.
def _stricter_or_equal(key, value, reference):
    if key.endswith("_pct"):
        return value <= reference
    if key == "tj_cap_C":
        return reference is None or (value is not None and value <= reference)
    if key == "tj_margin_K":
        return value >= reference
    raise AssertionError(f"limit {key!r}: say in this test which way it tightens")


@pytest.mark.parametrize("name", sorted(set(BUILTIN_POLICIES) - {"ratings_only"}))
def test_no_builtin_policy_is_looser_than_commercial(name):
    # SPEC §4: no built-in policy may be looser than commercial on any limit. ratings_only is the
    # ratings themselves ("no derating policy"), loosest by definition; it is checked the other way round.
    commercial = BUILTIN_POLICIES["commercial"]
    looser = [f"{g}.{f.name}: {getattr(BUILTIN_POLICIES[name].groups[g], f.name)!r} against commercial's "
              f"{getattr(commercial.groups[g], f.name)!r}"
              for g in GROUPS for f in fields(GroupLimits)
              if not _stricter_or_equal(f.name, getattr(BUILTIN_POLICIES[name].groups[g], f.name),
                                        getattr(commercial.groups[g], f.name))]
    assert not looser, f"{name} is looser than commercial: " + "; ".join(looser)


def test_the_strictness_rule_sees_every_limit_and_catches_a_looser_one():
    # The rule above must know every GroupLimits field, and must fail for a limit loosened by one step.
    commercial = BUILTIN_POLICIES["commercial"].groups["pn"]
    for f in fields(GroupLimits):
        value = getattr(commercial, f.name)
        loosened = {"tj_cap_C": None, "tj_margin_K": value - 1.0}.get(f.name, value + 1.0)
        assert _stricter_or_equal(f.name, value, value)
        assert not _stricter_or_equal(f.name, loosened, value), f.name
    for g in GROUPS:  # and ratings_only is never stricter than commercial
        for f in fields(GroupLimits):
            assert _stricter_or_equal(f.name, getattr(BUILTIN_POLICIES["commercial"].groups[g], f.name),
                                      getattr(BUILTIN_POLICIES["ratings_only"].groups[g], f.name))


def test_percentage_keys_override_with_their_names():
    # SPEC §4: current_limit_pct, power_limit_pct, resistor_power_limit_pct = "at most x % of the rating".
    req = make_requirement(policy="commercial", current_limit_pct=60.0, power_limit_pct=55.0,
                           resistor_power_limit_pct=45.0)
    limits = resolve_limits(BUILTIN_POLICIES["commercial"], req)
    for g in GROUPS:
        assert limits[g]["current_pct"].value == 60.0
        assert limits[g]["power_pct"].value == 55.0
        assert limits[g]["resistor_power_pct"].value == 45.0
        assert limits[g]["power_pct"].source == "requirement power_limit_pct"
        assert limits[g]["resistor_power_pct"].source == "requirement resistor_power_limit_pct"


def test_ratings_only_is_the_ratings():
    r = BUILTIN_POLICIES["ratings_only"]
    for g in GROUPS:
        limits = r.groups[g]
        assert (limits.reverse_pct, limits.current_pct, limits.power_pct, limits.surge_pct) == (100, 100, 100, 100)
        assert limits.tj_cap_C is None and limits.tj_margin_K == 0


@pytest.mark.parametrize("name", sorted(BUILTIN_POLICIES))
def test_toml_and_dict_round_trips(name):
    policy = BUILTIN_POLICIES[name]
    assert policy_from_toml(policy_to_toml(policy), "p.toml") == policy
    assert Policy.from_dict(policy.to_dict()) == policy


def test_requirement_keys_override_and_are_named():
    req = make_requirement(policy="commercial", reverse_margin_pct=25.0, tj_margin_K=40.0, current_limit_pct=70.0)
    limits = resolve_limits(BUILTIN_POLICIES["commercial"], req)
    # reverse_margin_pct m → VR ≤ VRRM/(1 + m/100): 25 % margin = 80 % of VRRM (SPEC §4)
    assert limits["pn"]["reverse_pct"].value == pytest.approx(80.0)
    assert limits["pn"]["reverse_pct"].source == "requirement reverse_margin_pct"
    assert limits["pn"]["tj_margin_K"].value == 40.0
    assert limits["pn"]["current_pct"].source == "requirement current_limit_pct"
    assert limits["pn"]["power_pct"].source == "policy commercial"
    unnamed = resolve_limits(BUILTIN_POLICIES["ratings_only"], make_requirement(), named=False)
    assert unnamed["pn"]["reverse_pct"].source == "default (no derating policy: ratings only)"


GOOD = """\
name = "team_a"
description = "Our team's limits"
[pn]
reverse_pct = 60
tj_cap_C = 110
[zener]
power_pct = 40
"""


def test_partial_policy_fills_ratings():
    p = policy_from_toml(GOOD, "team.toml")
    assert p.groups["pn"].reverse_pct == 60 and p.groups["pn"].current_pct == 100.0
    assert p.groups["schottky"] == BUILTIN_POLICIES["ratings_only"].groups["schottky"]


@pytest.mark.parametrize(("text", "pattern"), [
    (GOOD.replace("reverse_pct = 60", "reverse_pc = 60"), r"team\.toml, line 4: \[pn\] unknown limit 'reverse_pc' "
                                                          r"\(did you mean 'reverse_pct'\?\)"),
    (GOOD.replace("reverse_pct = 60", "reverse_pct = 160"), r"team\.toml, line 4: pn\.reverse_pct: 160 is out of range"),
    (GOOD.replace("tj_cap_C = 110", 'tj_cap_C = "hot"'), r"line 5: pn\.tj_cap_C: 'hot' is not a finite number"),
    (GOOD.replace("[zener]", "[zenner]"), r"unknown key 'zenner' \(did you mean 'zener'\?\)"),
    (GOOD.replace('name = "team_a"', 'name = ""'), r"name '' must be text of 1 to 64"),
    (GOOD + "oops", r"team\.toml: not valid TOML"),
])
def test_policy_refusals(text, pattern):
    with pytest.raises(InputError, match=pattern):
        policy_from_toml(text, "team.toml")


@pytest.mark.parametrize(("data", "pattern"), [
    ("not a table", r"src: a policy must be a table of keys"),
    ({"name": "p", "description": 3}, r"description 3 is not text"),
    ({"name": "p", "groups": []}, r"groups must be a table of pn, schottky, zener"),
    ({"name": "p", "groups": {"schotky": {}}}, r"unknown kind group 'schotky' .*did you mean 'schottky'"),
    ({"name": "p", "groups": {"pn": 5}}, r"\[pn\] must be a table of limits"),
    ({"name": "p", "groups": {"pn": {"tj_margin_K": -1}}}, r"pn\.tj_margin_K: -1 is out of range"),
    ({"name": "p", "groups": {"pn": {"tj_cap_C": 20}}}, r"pn\.tj_cap_C: 20 is out of range"),
    ({"name": "p", "groups": {"pn": {"current_pct": True}}}, r"pn\.current_pct: True is not a finite number"),
    ({"name": "x" * 65}, r"must be text of 1 to 64"),
])
def test_policy_dict_refusals(data, pattern):
    with pytest.raises(InputError, match=pattern):
        Policy.from_dict(data, "src")


def test_tvs_pulse_power_limits():
    # SPEC §4: TVS parts get a pulse-power limit, commercial 80 %, high_reliability 50 %
    # (MIL-STD-975M appendix A as transcribed: transient suppressors, power ≤ 50 %).
    assert BUILTIN_POLICIES["commercial"].groups["tvs"].pulse_power_pct == 80.0
    assert BUILTIN_POLICIES["high_reliability"].groups["tvs"].pulse_power_pct == 50.0
    assert BUILTIN_POLICIES["ratings_only"].groups["tvs"].pulse_power_pct == 100.0
    with pytest.raises(InputError, match=r"tvs\.pulse_power_pct: 120 is out of range"):
        policy_from_toml('name = "x"\n[tvs]\npulse_power_pct = 120\n', "p.toml")

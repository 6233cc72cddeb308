"""A role's own requirement table (`partpick.checks.role_table`): validation, defaults, unused keys, form group.

A throw-away role registered for the test stands for any role that declares a table.
"""

from __future__ import annotations

import pytest

from partpick.checks import roles
from partpick.checks.requirement import requirement_from_toml, requirement_to_toml
from partpick.checks.role_table import RoleTable, TableKey
from partpick.checks.roles.base import Role
from partpick.errors import InputError


class _DemoRole(Role):
    name = "demo_role"
    label = "Demo"
    kinds = ("rectifier",)
    required_keys = ("load_min_A", "load_max_A")
    unused_keys = {"supply_min_V": "the demo has no DC supply", "supply_max_V": "the demo has no DC supply"}
    table = RoleTable("demo", "Demo table", (
        TableKey("mode", "", "Mode", "How it runs.", kind="choice", required=True, choices=("a", "b")),
        TableKey("width_m", "m", "Width", "How wide.", required=True, low=0.0, low_inclusive=False, high=10.0),
        TableKey("share_pct", "%", "Share", "A share.", default=20.0, high=100.0),
        TableKey("on", "", "On", "Switch.", kind="bool", default=True),
    ))

    def check_table(self, values, common, fail):
        if values.get("share_pct", 20.0) > 50.0 and values["mode"] == "a":
            fail("share_pct", "above 50 % in mode a")


@pytest.fixture()
def demo(monkeypatch):
    monkeypatch.setitem(roles.ROLES, "demo_role", _DemoRole())


GOOD = """\
name = "demo"
role = "demo_role"
load_min_A = 0.0
load_max_A = 1.0
ambient_min_C = 0.0
ambient_max_C = 40.0

[demo]
mode = "a"
width_m = 2.5
"""


def test_table_values_defaults_echo_and_round_trip(demo):
    req = requirement_from_toml(GOOD, "d.toml")
    t = req.table("demo")
    assert (t.mode, t.width_m, t.share_pct, t.on) == ("a", 2.5, 20.0, True)
    echoed = req.to_dict()
    assert echoed["demo"] == {"mode": "a", "width_m": 2.5, "share_pct": 20.0, "on": True}
    assert "supply_min_V" not in echoed  # a key the role does not use is not echoed
    again = requirement_from_toml(requirement_to_toml(req), "again.toml")
    assert again == req
    assert "share_pct" not in requirement_to_toml(req)  # defaults stay defaults
    changed = req.with_changes(demo={"mode": "b", "width_m": 1.0, "share_pct": 70.0})
    assert changed.table("demo").share_pct == 70.0


@pytest.mark.parametrize(("text", "pattern"), [
    (GOOD.replace("width_m = 2.5", "width_m = 0"), r"d\.toml, line 10: demo\.width_m: 0 is out of range"),
    (GOOD.replace("width_m = 2.5", "width_m = 11"), r"line 10: demo\.width_m: 11 is out of range"),
    (GOOD.replace("width_m = 2.5", 'width_m = "2 m"'), r"line 10: demo\.width_m: '2 m' is not a number"),
    (GOOD.replace('mode = "a"', 'mode = "c"'), r"line 9: demo\.mode: 'c' is not one of a, b"),
    (GOOD + "on = 1\n", r"line 11: demo\.on: 1 is not true or false"),
    (GOOD + "widht_m = 1\n", r"line 11: demo\.widht_m: unknown key in \[demo\] \(did you mean 'width_m'\?\)"),
    (GOOD.replace("width_m = 2.5\n", ""), r"\[demo\] required key 'width_m' is missing"),
    (GOOD + "share_pct = 60\n", r"line 11: demo\.share_pct: above 50 % in mode a"),
    (GOOD.split("[demo]")[0], r"role 'demo_role' needs an \[demo\] table with mode, width_m"),
    (GOOD.replace("load_min_A = 0.0\n", "supply_min_V = 5.0\n"),
     r"line 3: supply_min_V: role 'demo_role' does not use this key: the demo has no DC supply"),
    (GOOD.replace("load_max_A = 1.0\n", ""), r"required key 'load_max_A' is missing \(required for role 'demo_role'"),
    (GOOD + "\n[zener]\ntarget_V = 5.0\nmax_regulation_error_pct = 5\n", r"\[zener\] table belongs to role .zener_shunt."),
])
def test_bad_table_input_names_file_line_and_key(demo, text, pattern):
    with pytest.raises(InputError, match=pattern):
        requirement_from_toml(text, "d.toml")


def test_a_table_of_another_role_is_refused(demo):
    series = ("name = 's'\nrole = 'series'\nsupply_min_V = 11.0\nsupply_max_V = 13.0\nload_min_A = 0.1\n"
              "load_max_A = 1.0\nambient_min_C = 0.0\nambient_max_C = 40.0\n\n[demo]\nmode = 'a'\nwidth_m = 1\n")
    with pytest.raises(InputError, match=r"line 10: \[demo\]: the \[demo\] table belongs to role 'demo_role'"):
        requirement_from_toml(series, "s.toml")


def test_form_group_is_qt_free_description():
    group = _DemoRole().form_group()
    assert (group.role, group.table, group.title) == ("demo_role", "demo", "Demo table")
    by_key = {f.key: f for f in group.fields}
    assert by_key["mode"].kind == "choice" and by_key["mode"].choices == ("a", "b") and by_key["mode"].required
    assert by_key["width_m"].unit == "m" and by_key["width_m"].minimum == 0.0
    assert "Default: 20 %" in by_key["share_pct"].help
    assert by_key["on"].choices == ("true", "false")
